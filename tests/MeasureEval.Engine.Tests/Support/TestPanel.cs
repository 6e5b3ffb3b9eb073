using Hl7.Fhir.Model;
using MeasureEval.Core.Fhir;
using MeasureEval.Core.Index;

namespace MeasureEval.Engine.Tests.Support;

/// <summary>The invented Riverbend Community Health panel of TestData/riverbend-panel.json, as index entries.</summary>
public static class TestPanel
{
    public static MeasurementPeriod Year2026 { get; } = MeasurementPeriod.CalendarYear(2026);

    public static IReadOnlyList<Resource> Resources { get; } =
        [.. FhirJson.Parse<Bundle>(File.ReadAllText(Path.Combine(AppContext.BaseDirectory, "TestData", "riverbend-panel.json"))).Entry.Select(e => e.Resource!)];

    public static IReadOnlyList<PatientFacts> Patients { get; } = PatientFactsAssembler.Assemble(Resources);

    public static async IAsyncEnumerable<PatientFacts> Stream()
    {
        foreach (var patient in Patients)
        {
            await System.Threading.Tasks.Task.Yield();
            yield return patient;
        }
    }

    public static MeasureDefinition Measure(string id) =>
        RepositoryPaths.Repository.TryGetMeasure(id, out var measure) ? measure : throw new InvalidOperationException($"measure {id} not loaded");
}
