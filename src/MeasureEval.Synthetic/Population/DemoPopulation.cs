namespace MeasureEval.Synthetic.Population;

/// <summary>
/// The demo population committed under <c>fhir-bundles/demo/</c>, produced by
/// <c>dotnet run --project src/MeasureEval.Cli -- generate --patients 500 --seed 20261130 --as-of 2026-11-30 --format bundles --out fhir-bundles/demo</c>.
/// A test regenerates it from these options and compares the bytes, so the files cannot drift from the generator.
/// </summary>
public static class DemoPopulation
{
    public const string RelativeDirectory = "fhir-bundles/demo";

    public static PopulationOptions Options { get; } = new()
    {
        Patients = 500,
        Seed = 20261130,
        AsOf = new DateOnly(2026, 11, 30),
        PatientsPerBundle = 50,
    };
}
