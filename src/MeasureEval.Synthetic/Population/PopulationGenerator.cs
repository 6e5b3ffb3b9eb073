using Hl7.Fhir.Model;

namespace MeasureEval.Synthetic.Population;

/// <summary>
/// Generates a synthetic population of the Riverbend Community Health scenario. Deterministic: the same
/// options give the same resources (and the same bytes once written), whatever the machine, culture or clock.
/// Patient <c>i</c> depends only on the seed, <c>i</c>, the as-of date and the clinician roster, so a larger
/// population with the same seed starts with a similar set of patients.
/// </summary>
public sealed class PopulationGenerator
{

    public PopulationGenerator(PopulationOptions options)
    {
        ArgumentNullException.ThrowIfNull(options);
        var problems = options.Validate();
        if (problems.Count > 0)
        {
            throw new ArgumentException(string.Join("; ", problems), nameof(options));
        }

        Options = options;
        Network = ScenarioNetwork.Create(options.Seed, options.Patients);
    }

    public PopulationOptions Options { get; }

    internal ScenarioNetwork Network { get; }

    /// <summary>Organizations (clinic network, sites, payers) and Practitioners that patients reference.</summary>
    public IReadOnlyList<Resource> SharedResources() => [.. Network.Resources()];

    /// <summary>The patients in index order, generated lazily: memory does not grow with the population.</summary>
    public IEnumerable<PatientRecord> Patients()
    {
        for (var i = 0; i < Options.Patients; i++)
        {
            yield return PatientSimulator.Simulate(Options.Seed, i, Network, Options.AsOf);
        }
    }
}
