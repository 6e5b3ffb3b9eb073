using Hl7.Fhir.Model;
using MeasureEval.Core.Fhir;
using MeasureEval.Core.Index;
using MeasureEval.Engine.Tests.Support;

namespace MeasureEval.Engine.Tests.Evaluation;

/// <summary>Date semantics through a real measure (colorectal-cancer-screening, MP 2026), patients of TestData/date-semantics.json.</summary>
public sealed class MeasureEvaluatorTests
{
    private static readonly IReadOnlyList<PatientFacts> Patients = PatientFactsAssembler.Assemble(
        FhirJson.Parse<Bundle>(File.ReadAllText(Path.Combine(AppContext.BaseDirectory, "TestData", "date-semantics.json"))).Entry.Select(e => e.Resource!));

    private static PatientResult Evaluate(string patientId) =>
        new MeasureEvaluator(RepositoryPaths.Repository).Evaluate(TestPanel.Measure("colorectal-cancer-screening"), Patients.Single(p => p.PatientId == patientId), TestPanel.Year2026);

    [Theory]
    [InlineData("s-01", true)] // FIT 2026-01-01T00:30:00+14:00: stated date 2026-01-01, in MP (UTC would be 2025-12-31)
    [InlineData("s-02", false)] // FIT 2025-12-31T23:30:00-10:00: stated date 2025-12-31 (UTC would be 2026-01-01)
    [InlineData("s-03", true)] // FIT "2026": the whole year is inside MP
    [InlineData("s-04", true)] // colonoscopy "2017": inside [2017-01-01, 2026-12-31] (MP or the 9 years before)
    [InlineData("s-05", false)] // colonoscopy "2016-12": not inside
    public void Evaluate_StatedAndPartialDates_DecideTheNumerator(string patientId, bool numerator)
    {
        var result = Evaluate(patientId);
        Assert.True(result.InitialPopulation);
        Assert.Equal(numerator, result.Numerator);
    }

    [Fact]
    public void Evaluate_HospiceProcedureOngoingSinceLastYear_OverlapsAndExcludes()
    {
        var result = Evaluate("s-06");
        Assert.True(result.DenominatorExclusion);
        Assert.Contains("common.hospice-or-palliative-care", result.MetDefinitions[PopulationKind.DenominatorExclusion]);
        Assert.Equal(["Procedure/s-06-hospice"], result.EvaluatedResources[PopulationKind.DenominatorExclusion]);
    }

    [Fact]
    public void Evaluate_EffectiveTiming_NeverQualifiesAndIsReported()
    {
        var result = Evaluate("s-07");
        Assert.False(result.Numerator);
        Assert.Contains(result.Findings, f => f.Code == FindingCodes.NoUsableTime && f.Resource == "Observation/s-07-fit");
    }

    [Fact]
    public void EvaluateAll_SeveralMeasures_SameResultsAsOneByOne()
    {
        var evaluator = new MeasureEvaluator(RepositoryPaths.Repository);
        var measures = RepositoryPaths.Repository.Measures.ToList();
        foreach (var patient in TestPanel.Patients)
        {
            var together = evaluator.EvaluateAll(measures, patient, TestPanel.Year2026);
            for (var i = 0; i < measures.Count; i++)
            {
                var alone = evaluator.Evaluate(measures[i], patient, TestPanel.Year2026);
                Assert.Equal(
                    (alone.InitialPopulation, alone.Denominator, alone.DenominatorExclusion, alone.DenominatorException, alone.Numerator),
                    (together[i].InitialPopulation, together[i].Denominator, together[i].DenominatorExclusion, together[i].DenominatorException, together[i].Numerator));
            }
        }
    }
}
