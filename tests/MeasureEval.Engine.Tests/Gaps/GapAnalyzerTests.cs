using MeasureEval.Engine.Gaps;

namespace MeasureEval.Engine.Tests.Gaps;

/// <summary>Measurement period 2026 throughout; the default horizon is then 2027-12-31 (end of the next period).</summary>
public sealed class GapAnalyzerTests
{
    [Theory]
    // Windows from measure-specs.md (USPSTF 2021 colorectal, USPSTF 2024 breast + our 3 months' grace, USPSTF 2018 cervical).
    [InlineData("colorectal-cancer-screening", "crc-no-screening", "open-gap")]
    [InlineData("colorectal-cancer-screening", "crc-colonoscopy-2015", "open-gap")] // 2015 < 2017-01-01, window start for 2026
    [InlineData("colorectal-cancer-screening", "crc-colonoscopy-2019", "closed-gap")] // counts through MP 2028
    [InlineData("colorectal-cancer-screening", "crc-colonoscopy-2017", "prospective-gap")] // MP 2027 window starts 2018-01-01
    [InlineData("colorectal-cancer-screening", "crc-fit-2026", "prospective-gap")] // FIT counts in its own MP only
    [InlineData("colorectal-cancer-screening", "crc-cancer", "not-applicable")] // C18.9: denominator exclusion
    [InlineData("colorectal-cancer-screening", "crc-age-30", "not-applicable")] // below 45: not in the denominator
    [InlineData("diabetes-a1c-above-9", "a1c-9-4", "open-gap")] // inverse: 9.4 % > 9.0 % is in the numerator
    [InlineData("diabetes-a1c-above-9", "a1c-none", "open-gap")] // no HbA1c counts as poor control (common practice)
    [InlineData("diabetes-a1c-above-9", "a1c-7-1", "prospective-gap")] // no HbA1c yet in 2027 would reopen it
    [InlineData("diabetes-a1c-below-8", "a1c-9-4", "open-gap")]
    [InlineData("diabetes-a1c-below-8", "a1c-7-1", "prospective-gap")] // most recent 7.1 % decides, not the earlier 9.9 %
    [InlineData("hypertension-bp-below-140-90", "bp-148-92", "open-gap")]
    [InlineData("hypertension-bp-below-140-90", "bp-128-78", "prospective-gap")]
    [InlineData("depression-screening", "phq9-15-no-follow-up", "open-gap")] // PHQ-9 >= 10 positive (Kroenke 2001)
    [InlineData("depression-screening", "phq9-4", "prospective-gap")]
    [InlineData("immunizations-by-age-2", "imm-partial", "open-gap")]
    [InlineData("immunizations-by-age-2", "imm-complete", "closed-gap")] // birthDate windows: never falls due again
    [InlineData("influenza-vaccination", "flu-none", "open-gap")]
    [InlineData("influenza-vaccination", "flu-2026-10", "closed-gap")] // MP 2027 reaches back to 2026-08-01 (our rule)
    [InlineData("influenza-vaccination", "flu-2026-02", "prospective-gap")]
    [InlineData("breast-cancer-screening", "mammo-2025-03", "prospective-gap")] // MP 2027 reaches back to 2025-10-01 only
    [InlineData("cervical-cancer-screening", "pap-2024-06", "prospective-gap")] // cytology: MP or 2 years before
    public void Analyze_StatusPerMeasure(string measure, string input, string expected)
    {
        var gap = GapInputs.Analyze(measure, input);

        Assert.Equal(expected, gap.Status.Code());
    }

    [Fact]
    public void Analyze_ClosedColonoscopyNextDueDate()
    {
        var gap = GapInputs.Analyze("colorectal-cancer-screening", "crc-colonoscopy-2019");

        // Colonoscopy during MP or the 9 years before (USPSTF 2021): MP 2028 starts its window on 2019-01-01, MP 2029 on 2020-01-01.
        Assert.Equal(GapInputs.Date("2028-12-31"), gap.CountsThrough);
        Assert.Equal(GapInputs.Date("2029-01-01"), gap.DueAgainFrom);
        var evidence = Assert.Single(gap.Evidence);
        Assert.Equal(["Procedure/colo-1"], evidence.References);
        Assert.Equal(GapInputs.Date("2019-05-02"), evidence.Date);
        Assert.True(evidence.Counts);
        Assert.Empty(gap.Actions);
    }

    [Fact]
    public void Analyze_ProspectiveWithinHorizonIsClosed()
    {
        // A horizon inside the period: the FIT of 2026-02-11 counts through 2026-12-31, so nothing opens before it.
        var gap = GapInputs.Analyze("colorectal-cancer-screening", "crc-fit-2026", horizon: "2026-12-31");

        Assert.Equal(GapStatus.Closed, gap.Status);
        Assert.Equal(GapInputs.Date("2026-12-31"), gap.CountsThrough);
    }

    [Fact]
    public void Analyze_ProspectiveListsActionsOfTheNextPeriod()
    {
        var gap = GapInputs.Analyze("colorectal-cancer-screening", "crc-colonoscopy-2017");

        Assert.Equal(GapInputs.Date("2026-12-31"), gap.CountsThrough);
        Assert.Equal(5, gap.Actions.Count); // the five screening alternatives of the numerator
        Assert.All(gap.Actions, a => Assert.Equal(GapInputs.Date("2027-12-31"), a.DueBy));
        Assert.False(gap.ActionsAllNeeded);
    }

    [Fact]
    public void Analyze_OpenColorectalListsEveryAlternativeWithCodes()
    {
        var gap = GapInputs.Analyze("colorectal-cancer-screening", "crc-no-screening");

        Assert.Equal(5, gap.Actions.Count);
        Assert.All(gap.Actions, a => Assert.Equal(GapInputs.Date("2026-12-31"), a.DueBy));
        var colonoscopy = Assert.Single(gap.Actions, a => a.ValueSetUrl == "https://measureeval.example.org/fhir/ValueSet/colonoscopy");
        Assert.Contains(new GapCode("http://snomed.info/sct", "73761001"), colonoscopy.Codes); // SNOMED CT colonoscopy (measure-specs.md)
        Assert.Equal(["Procedure", "Observation", "DiagnosticReport"], colonoscopy.ResourceTypes);
        var fit = Assert.Single(gap.Actions, a => a.ValueSetUrl == "https://measureeval.example.org/fhir/ValueSet/fecal-occult-blood-test");
        Assert.Contains(new GapCode("http://loinc.org", "29771-3"), fit.Codes); // LOINC FIT (measure-specs.md)
        Assert.Equal("Practitioner/dr-okafor", gap.Panel);
        Assert.Equal("Organization/cedar-valley", gap.Payer);
        Assert.Empty(gap.Evidence);
    }

    [Fact]
    public void Analyze_OpenWithTooOldRecordShowsItAsNotCounting()
    {
        var gap = GapInputs.Analyze("colorectal-cancer-screening", "crc-colonoscopy-2015");

        var evidence = Assert.Single(gap.Evidence);
        Assert.False(evidence.Counts);
        Assert.Equal(GapInputs.Date("2015-06-20"), evidence.Date);
    }

    [Fact]
    public void Analyze_InverseMeasureOpenWithLatestValue()
    {
        var gap = GapInputs.Analyze("diabetes-a1c-above-9", "a1c-9-4");

        Assert.Equal(GapStatus.Open, gap.Status);
        var evidence = Assert.Single(gap.Evidence);
        Assert.Equal(["Observation/a1c-1"], evidence.References);
        Assert.Contains("9.4 %", evidence.Text, StringComparison.Ordinal);
        // Closing needs a result that is not > 9.0 % (9.0 itself is not above 9.0: measure-specs.md).
        var action = Assert.Single(gap.Actions);
        Assert.Contains("at most 9 %", action.Text, StringComparison.Ordinal);
        Assert.Equal(GapInputs.Date("2026-12-31"), action.DueBy);
        Assert.Equal("https://measureeval.example.org/fhir/ValueSet/hba1c", action.ValueSetUrl);
    }

    [Fact]
    public void Analyze_InverseMeasureClosedWithinPeriodHorizon()
    {
        var gap = GapInputs.Analyze("diabetes-a1c-above-9", "a1c-7-1", horizon: "2026-12-31");

        Assert.Equal(GapStatus.Closed, gap.Status);
        Assert.Equal(["Observation/a1c-1"], Assert.Single(gap.Evidence).References);
        Assert.Equal(GapInputs.Date("2027-01-01"), gap.DueAgainFrom);
    }

    [Fact]
    public void Analyze_BloodPressureEvidenceIsTheRepresentativeReading()
    {
        var gap = GapInputs.Analyze("hypertension-bp-below-140-90", "bp-148-92");

        var evidence = Assert.Single(gap.Evidence);
        Assert.Equal(GapInputs.Date("2026-10-11"), evidence.Date);
        Assert.Contains("148/92", evidence.Text, StringComparison.Ordinal);
        Assert.Contains(GapCode("http://loinc.org", "85354-9"), Assert.Single(gap.Actions).Codes); // LOINC BP panel
    }

    [Fact]
    public void Analyze_PositiveScreenOffersFollowUpByTheSecondDay()
    {
        var gap = GapInputs.Analyze("depression-screening", "phq9-15-no-follow-up");

        Assert.Contains("15", Assert.Single(gap.Evidence).Text, StringComparison.Ordinal);
        // Follow-up on D, D+1 or D+2 after the screen of 2026-04-01 (measure-specs.md, our rule).
        var followUp = Assert.Single(gap.Actions, a => a.ValueSetUrl == "https://measureeval.example.org/fhir/ValueSet/depression-follow-up");
        Assert.Equal(GapInputs.Date("2026-04-03"), followUp.DueBy);
        Assert.Contains(GapCode("http://snomed.info/sct", "183524004"), followUp.Codes);
        // Or a new screening that is negative or followed up, by periodEnd.
        Assert.Equal(GapInputs.Date("2026-12-31"), gap.DueBy);
    }

    [Fact]
    public void Analyze_PartialChildhoodSeriesCountsDosesPerAntigen()
    {
        var gap = GapInputs.Analyze("immunizations-by-age-2", "imm-partial");

        Assert.True(gap.ActionsAllNeeded);
        // Doses from the CDC child schedule as the spec lists them (from memory: verify): DTaP 4, polio 3, MMR 1, Hib 3, HepB 3, varicella 1, PCV 4.
        var counts = gap.Counts.ToDictionary(c => c.Label, c => (c.Counted, c.Missing));
        Assert.Equal((2, 2), counts["DTaP"]);
        Assert.Equal((0, 3), counts["polio"]);
        Assert.Equal((1, 0), counts["MMR"]);
        Assert.Equal((3, 0), counts["hepatitis B"]);
        Assert.Equal((0, 4), counts["pneumococcal conjugate"]);
        var missing = gap.Actions.ToDictionary(a => a.What, a => a.Missing);
        Assert.Equal(2, missing["DTaP"]);
        Assert.DoesNotContain("MMR", missing.Keys);
        Assert.Equal(5, gap.Actions.Count);
        // Doses count up to the 2nd birthday: born 2024-05-14.
        Assert.All(gap.Actions, a => Assert.Equal(GapInputs.Date("2026-05-14"), a.DueBy));
    }

    [Fact]
    public void Analyze_CompleteChildhoodSeriesNeverFallsDueAgain()
    {
        var gap = GapInputs.Analyze("immunizations-by-age-2", "imm-complete");

        Assert.Equal(GapStatus.Closed, gap.Status);
        Assert.Null(gap.CountsThrough);
        Assert.All(gap.Counts, c => Assert.Equal(0, c.Missing));
    }

    [Fact]
    public void Analyze_NotApplicableCarriesNoActions()
    {
        var gap = GapInputs.Analyze("colorectal-cancer-screening", "crc-cancer");

        Assert.Equal(GapStatus.NotApplicable, gap.Status);
        Assert.Empty(gap.Actions);
        Assert.Null(gap.DueBy);
    }

    private static GapCode GapCode(string system, string code) => new(system, code);
}
