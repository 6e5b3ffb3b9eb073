using System.Globalization;
using Hl7.Fhir.Model;
using MeasureEval.Core.Index;
using MeasureEval.Engine.Gaps;
using MeasureEval.Engine.Tests.Support;

namespace MeasureEval.Engine.Tests.Gaps;

/// <summary>Gap test inputs: Gaps/Inputs/&lt;name&gt;.json, one invented patient per Bundle, measurement period 2026.</summary>
internal static class GapInputs
{
    public static MeasurementPeriod Year2026 { get; } = MeasurementPeriod.CalendarYear(2026);

    public static PatientFacts Patient(string name)
    {
        var bundle = MeasureHarness.LoadCase(Path.Combine(AppContext.BaseDirectory, "Gaps", "Inputs", name + ".json"));
        return Assert.Single(PatientFactsAssembler.Assemble([.. bundle.Entry.Select(e => e.Resource).OfType<Resource>()]));
    }

    public static CareGap Analyze(string measureId, string input, string? horizon = null)
    {
        var repository = RepositoryPaths.Repository;
        var analyzer = new GapAnalyzer(new MeasureEvaluator(repository));
        return analyzer.Analyze(TestPanel.Measure(measureId), Patient(input), Year2026, horizon is null ? null : Date(horizon));
    }

    public static DateOnly Date(string text) => DateOnly.ParseExact(text, "yyyy-MM-dd", CultureInfo.InvariantCulture);
}
