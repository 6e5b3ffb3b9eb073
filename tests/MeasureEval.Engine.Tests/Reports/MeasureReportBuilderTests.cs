using Hl7.Fhir.Model;
using MeasureEval.Core.Fhir;
using MeasureEval.Engine.Reports;
using MeasureEval.Engine.Tests.Support;
using MeasureEval.Testing;

namespace MeasureEval.Engine.Tests.Reports;

public sealed class MeasureReportBuilderTests
{
    private static readonly MeasureReportBuilder Builder = new(TimeProvider.System);

    private static async Task<IReadOnlyList<PopulationSummary>> SummarizeAll(bool keepSubjects) =>
        await new PopulationEvaluator(new MeasureEvaluator(RepositoryPaths.Repository))
            .SummarizeAsync(TestPanel.Stream(), [.. RepositoryPaths.Repository.Measures], TestPanel.Year2026, keepSubjects, CancellationToken.None);

    [Fact]
    public async System.Threading.Tasks.Task Summary_EveryMeasure_ValidatesAgainstBaseR4()
    {
        foreach (var summary in await SummarizeAll(keepSubjects: true))
        {
            Assert.Empty(BaseR4Validator.Shared.Errors(Builder.Summary(summary)));
            Assert.Empty(BaseR4Validator.Shared.Errors(Builder.SubjectList(summary)));
        }
    }

    [Fact]
    public void Individual_EveryMeasureAndPatient_ValidatesAgainstBaseR4()
    {
        var evaluator = new MeasureEvaluator(RepositoryPaths.Repository);
        foreach (var measure in RepositoryPaths.Repository.Measures)
        {
            foreach (var patient in TestPanel.Patients)
            {
                var report = Builder.Individual(measure, TestPanel.Year2026, evaluator.Evaluate(measure, patient, TestPanel.Year2026));
                Assert.Empty(BaseR4Validator.Shared.Errors(report));
            }
        }
    }

    [Fact]
    public async System.Threading.Tasks.Task Summary_DiabetesBelow8_CountsScoreAndInterval()
    {
        var summary = (await SummarizeAll(keepSubjects: false)).Single(s => s.Measure.Id == "diabetes-a1c-below-8");
        var group = Builder.Summary(summary).Group.Single();

        // rb-001: 64 mmol/mol = 8.007 % (not < 8); rb-002: 7.2 % (< 8); rb-004: 75 mmol/mol = 9.013 %; rb-003 is 77 (outside 18–75).
        Assert.Equal(3, Count(group, "initial-population"));
        Assert.Equal(1, Count(group, "numerator"));
        Assert.Equal(1m / 3m, group.MeasureScore!.Value!.Value, 10);

        // Wilson 95 % for 1/3, worked by hand from the NIST e-Handbook 7.2.4.1 formula: 0.0615–0.7923.
        var interval = group.MeasureScore.GetExtension(ReportExtensions.ScoreInterval)!;
        Assert.Equal(0.0615m, Math.Round(Part<FhirDecimal>(interval, "lower").Value!.Value, 4));
        Assert.Equal(0.7923m, Math.Round(Part<FhirDecimal>(interval, "upper").Value!.Value, 4));

        var payer = group.Stratifier.Single(s => s.Code[0].Coding[0].Code == "payer");
        Assert.Equal(["Organization/cedar-valley-health-plan", "self-pay"], payer.Stratum.Select(s => s.Value!.Text));
    }

    [Fact]
    public async System.Threading.Tasks.Task Summary_SameDataTwice_IdenticalButForIdAndDate()
    {
        string Normalized(MeasureReport report)
        {
            report.Id = null;
            report.Date = null;
            return FhirJson.Serialize(report);
        }

        var first = (await SummarizeAll(keepSubjects: true)).Select(s => Normalized(Builder.SubjectList(s))).ToList();
        var second = (await SummarizeAll(keepSubjects: true)).Select(s => Normalized(Builder.SubjectList(s))).ToList();
        Assert.Equal(first, second);
    }

    [Fact]
    public void Individual_Hypertension_NamesDefinitionsAndDecidingReadings()
    {
        var measure = TestPanel.Measure("hypertension-bp-below-140-90");
        var patient = TestPanel.Patients.Single(p => p.PatientId == "rb-002");
        var report = Builder.Individual(measure, TestPanel.Year2026, new MeasureEvaluator(RepositoryPaths.Repository).Evaluate(measure, patient, TestPanel.Year2026));

        Assert.Equal("https://measureeval.example.org/fhir/Measure/hypertension-bp-below-140-90|1.0.0", report.Measure);
        var numerator = report.Group[0].Population.Single(p => p.Code!.Coding[0].Code == "numerator");
        Assert.Equal(1, numerator.Count);
        Assert.Contains("controlled", numerator.Extension.Where(e => e.Url == ReportExtensions.PopulationDefinition).Select(e => ((FhirString)e.Value!).Value));

        // 150/85 and 135/95 on one day: the lowest systolic comes from bp2, the lowest diastolic from bp1 (common practice).
        var evidence = numerator.Extension.Where(e => e.Url == ReportExtensions.PopulationEvaluatedResource).Select(e => ((ResourceReference)e.Value!).Reference!).Order().ToList();
        Assert.Equal(["Observation/rb-002-bp1", "Observation/rb-002-bp2"], evidence);
    }

    [Fact]
    public void Individual_ImmunizationsByAge2_ReportsDosesCountedAndMissing()
    {
        var measure = TestPanel.Measure("immunizations-by-age-2");
        var patient = TestPanel.Patients.Single(p => p.PatientId == "rb-005");
        var report = Builder.Individual(measure, TestPanel.Year2026, new MeasureEvaluator(RepositoryPaths.Repository).Evaluate(measure, patient, TestPanel.Year2026));

        var details = report.GetExtensions(ReportExtensions.CountDetail).ToDictionary(
            e => Part<FhirString>(e, "label").Value!,
            e => (Part<Integer>(e, "counted").Value, Part<Integer>(e, "missing").Value));

        // CVX 110 (DTaP-HepB-IPV) on three dates counts for DTaP, polio and HepB; CVX 20 adds a fourth DTaP dose; CVX 03 is MMR.
        Assert.Equal(((int?)4, (int?)0), details["DTaP"]);
        Assert.Equal(((int?)3, (int?)0), details["polio"]);
        Assert.Equal(((int?)3, (int?)0), details["hepatitis B"]);
        Assert.Equal(((int?)1, (int?)0), details["MMR"]);
        Assert.Equal(((int?)0, (int?)3), details["Hib"]);
        Assert.Equal(((int?)0, (int?)1), details["varicella"]);
        Assert.Equal(((int?)0, (int?)4), details["pneumococcal conjugate"]);
    }

    private static T Part<T>(Extension complex, string url) where T : DataType => (T)complex.GetExtension(url)!.Value!;

    private static int? Count(MeasureReport.GroupComponent group, string code) => group.Population.Single(p => p.Code!.Coding[0].Code == code).Count;
}
