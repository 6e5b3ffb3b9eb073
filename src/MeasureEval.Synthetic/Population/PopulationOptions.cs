namespace MeasureEval.Synthetic.Population;

/// <summary>
/// What to generate. <see cref="AsOf"/> is the data-extract date: nothing happens after it, and the measurement
/// year the data is shaped for is its calendar year. The same options always give the same population.
/// </summary>
public sealed record PopulationOptions
{
    public required int Patients { get; init; }

    public required ulong Seed { get; init; }

    public required DateOnly AsOf { get; init; }

    /// <summary>Patients per transaction bundle.</summary>
    public int PatientsPerBundle { get; init; } = 50;

    /// <summary>Every problem found, empty when the options can be used.</summary>
    public IReadOnlyList<string> Validate()
    {
        var problems = new List<string>();
        if (Patients < 1)
        {
            problems.Add("patients must be at least 1");
        }

        if (PatientsPerBundle < 1)
        {
            problems.Add("patients per bundle must be at least 1");
        }

        if (AsOf.Year < 1950 || AsOf.Year > 2200)
        {
            problems.Add("as-of date must be between 1950 and 2200");
        }

        return problems;
    }
}
