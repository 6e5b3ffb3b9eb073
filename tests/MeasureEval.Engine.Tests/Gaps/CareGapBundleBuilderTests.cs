using Hl7.Fhir.Model;
using MeasureEval.Engine.Gaps;
using MeasureEval.Engine.Reports;
using MeasureEval.Engine.Tests.Support;
using MeasureEval.Testing;

namespace MeasureEval.Engine.Tests.Gaps;

public sealed class CareGapBundleBuilderTests
{
    private static readonly CareGapBundleBuilder Builder = new(new MeasureReportBuilder(TimeProvider.System), TimeProvider.System);

    [Theory]
    [InlineData("colorectal-cancer-screening", "crc-no-screening")]
    [InlineData("colorectal-cancer-screening", "crc-colonoscopy-2019")]
    [InlineData("colorectal-cancer-screening", "crc-colonoscopy-2017")]
    [InlineData("colorectal-cancer-screening", "crc-cancer")]
    [InlineData("diabetes-a1c-above-9", "a1c-9-4")]
    [InlineData("hypertension-bp-below-140-90", "bp-148-92")]
    [InlineData("depression-screening", "phq9-15-no-follow-up")]
    [InlineData("immunizations-by-age-2", "imm-partial")]
    public void Build_ValidatesAgainstBaseR4(string measure, string input)
    {
        var gap = GapInputs.Analyze(measure, input);

        var bundle = Builder.Build(gap.PatientId, [(TestPanel.Measure(measure), gap)]);

        Assert.Empty(BaseR4Validator.Shared.Errors(bundle));
        Assert.All(bundle.Entry, e => Assert.Empty(BaseR4Validator.Shared.Errors(e.Resource!)));
    }

    [Fact]
    public void Build_DetectedIssueCarriesStatusActionsAndEvidence()
    {
        var gap = GapInputs.Analyze("diabetes-a1c-above-9", "a1c-9-4");

        var bundle = Builder.Build(gap.PatientId, [(TestPanel.Measure("diabetes-a1c-above-9"), gap)]);

        var report = Assert.Single(bundle.Entry, e => e.Resource is MeasureReport);
        var issue = (DetectedIssue)Assert.Single(bundle.Entry, e => e.Resource is DetectedIssue).Resource!;
        var status = (CodeableConcept)issue.GetExtensionValue<DataType>(GapExtensions.Status);
        Assert.Equal(("http://hl7.org/fhir/us/davinci-deqm/CodeSystem/gaps-status", "open-gap"), (status.Coding[0].System, status.Coding[0].Code));
        Assert.Equal("2026-12-31", ((Date)issue.GetExtensionValue<DataType>(GapExtensions.DueBy)).Value);
        var action = Assert.Single(issue.Extension, e => e.Url == GapExtensions.Action);
        Assert.Contains(action.Extension, e => e.Url == "code" && e.Value is Coding { System: "http://loinc.org", Code: "4548-4" }); // LOINC HbA1c (measure-specs.md)
        var evidence = issue.Evidence.Single().Detail.Select(d => d.Reference).ToList();
        Assert.Equal([report.FullUrl, "Observation/a1c-1"], evidence);
        Assert.Equal("Patient/patient", issue.Patient?.Reference);
    }
}
