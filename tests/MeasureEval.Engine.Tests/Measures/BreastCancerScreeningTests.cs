using MeasureEval.Engine.Tests.Support;

namespace MeasureEval.Engine.Tests.Measures;

/// <summary>
/// breast-cancer-screening cases: one patient per fixture under Cases/breast-cancer-screening;
/// expected populations (IP, DEN, DEX, DEXCEP, NUMER) come from the measure spec text, MP 2026 unless stated.
/// </summary>
public sealed class BreastCancerScreeningTests
{
    private const string MeasureId = "breast-cancer-screening";

    [Theory]
    // Initial population: gender female, age 42-74 at periodEnd (USPSTF 2024: biennial, 40-74; lower bound 42 is ours), qualifying encounter
    [InlineData("age-42-on-period-end", 1, 1, 0, 0, 0)] // turns 42 on periodEnd
    [InlineData("age-41-on-period-end", 0, 0, 0, 0, 0)] // turns 42 the day after periodEnd
    [InlineData("age-74-on-period-end", 1, 1, 0, 0, 0)] // 74 on periodEnd
    [InlineData("age-75-on-period-end", 0, 0, 0, 0, 0)] // turns 75 on periodEnd
    [InlineData("age-40-within-uspstf-range", 0, 0, 0, 0, 0)] // 40-41 are in the USPSTF range but below our bound of 42
    [InlineData("gender-male", 0, 0, 0, 0, 0)] // female-only measure
    [InlineData("gender-other", 0, 0, 0, 0, 0)] // other is not in the initial population
    [InlineData("gender-unknown", 0, 0, 0, 0, 0)] // unknown is not in the initial population
    [InlineData("gender-absent", 0, 0, 0, 0, 0)] // absent gender is not in the initial population
    [InlineData("no-encounter", 0, 0, 0, 0, 0)] // qualifying encounter required
    [InlineData("encounter-inpatient-only", 0, 0, 0, 0, 0)] // IMP is not a qualifying class
    // Numerator: mammography (SNOMED CT 71651007, 24623002; LOINC 24606-6, 26175-0) during MP or the 15 months before, from 2024-10-01 (biennial + 3 months' grace: our rule)
    [InlineData("mammogram-in-period", 1, 1, 0, 0, 1)] // in MP
    [InlineData("mammogram-first-day-of-window", 1, 1, 0, 0, 1)] // periodStart - 15 months = 2024-10-01, inclusive
    [InlineData("mammogram-day-before-window", 1, 1, 0, 0, 0)] // one day before the window
    [InlineData("mammogram-offset-plus14", 1, 1, 0, 0, 1)] // stated date 2024-10-01 (UTC would be 2024-09-30)
    [InlineData("mammogram-offset-minus05", 1, 1, 0, 0, 0)] // stated date 2024-09-30 (UTC would be 2024-10-01)
    [InlineData("mammogram-partial-month-inside", 1, 1, 0, 0, 1)] // 2024-10 lies wholly inside the window
    [InlineData("mammogram-partial-month-before", 1, 1, 0, 0, 0)] // 2024-09 lies before the window
    [InlineData("mammogram-partial-year-straddles", 1, 1, 0, 0, 0)] // 2024 straddles the window start 2024-10-01: not in
    [InlineData("mammogram-partial-year-inside", 1, 1, 0, 0, 1)] // 2025 lies wholly inside
    [InlineData("mammogram-after-period", 1, 1, 0, 0, 0)] // after periodEnd
    [InlineData("one-side-refuted", 1, 1, 0, 0, 0)] // Z90.12 refuted: only one side counts
    [InlineData("mammogram-window-start-rolls-over", 1, 1, 0, 0, 1, "2026-05-31", "2027-05-30")] // MP from 2026-05-31: - 15 months = 2025-02-31 -> rolls to 2025-03-01 (calendar arithmetic), inclusive
    [InlineData("mammogram-before-rolled-window-start", 1, 1, 0, 0, 0, "2026-05-31", "2027-05-30")] // MP from 2026-05-31: the window starts 2025-03-01, so 2025-02-28 is outside
    [InlineData("mammogram-alternate-snomed", 1, 1, 0, 0, 1)] // 24623002 listed
    [InlineData("mammogram-observation-loinc", 1, 1, 0, 0, 1)] // LOINC 24606-6 as an Observation
    [InlineData("mammogram-report-loinc", 1, 1, 0, 0, 1)] // LOINC 26175-0 as a DiagnosticReport
    [InlineData("mammogram-report-preliminary", 1, 1, 0, 0, 0)] // preliminary report does not count
    [InlineData("mammogram-not-done", 1, 1, 0, 0, 0)] // not-done never meets a numerator
    [InlineData("mammogram-entered-in-error", 1, 1, 0, 0, 0)] // entered-in-error never counts
    [InlineData("mammogram-period-end-in-window", 1, 1, 0, 0, 1)] // performedPeriod judged by its end
    [InlineData("mammogram-performed-string", 1, 1, 0, 0, 0)] // performedString is never a usable time, reported
    // Exclusions: bilateral mastectomy (ICD-10-CM Z90.13; SNOMED CT 27865001), or both Z90.11 and Z90.12, on or before periodEnd; hospice/palliative
    [InlineData("bilateral-mastectomy-z90-13", 1, 1, 1, 0, 0)] // Z90.13; numerator not evaluated
    [InlineData("bilateral-mastectomy-procedure", 1, 1, 1, 0, 0)] // SNOMED CT 27865001
    [InlineData("right-mastectomy-only", 1, 1, 0, 0, 0)] // one side only
    [InlineData("left-mastectomy-only", 1, 1, 0, 0, 0)] // one side only
    [InlineData("both-unilateral-mastectomies", 1, 1, 1, 0, 0)] // both Z90.11 and Z90.12
    [InlineData("second-mastectomy-after-period", 1, 1, 0, 0, 0)] // Z90.12 onset after periodEnd: only one side on or before periodEnd
    [InlineData("mastectomy-parent-code", 1, 1, 0, 0, 0)] // codes other than X.* match exactly: Z90.1 is not Z90.13
    [InlineData("bilateral-mastectomy-on-period-end", 1, 1, 1, 0, 0)] // on or before periodEnd, inclusive
    [InlineData("bilateral-mastectomy-refuted", 1, 1, 0, 0, 0)] // refuted does not count
    [InlineData("hospice-condition", 1, 1, 1, 0, 0)] // hospice/palliative: Z51.5 overlapping MP
    [InlineData("hospice-discharge", 1, 1, 1, 0, 0)] // discharged to hospice in MP
    [InlineData("died-during-period", 1, 1, 1, 0, 0)] // died during MP: exclusion (our rule)
    public void Evaluate_Case(string caseFile, int ip, int den, int dex, int dexcep, int numer, string periodStart = MeasureHarness.DefaultPeriodStart, string periodEnd = MeasureHarness.DefaultPeriodEnd)
    {
        var result = MeasureHarness.Evaluate(MeasureId, caseFile, periodStart, periodEnd);

        Assert.Equal(new CaseCounts(ip, den, dex, dexcep, numer), result.Populations);
    }

    // Shared semantics: no usable time element, an unconvertible unit, a condition ended without a date, a missing or uncertain birthDate are each "reported as a data-quality finding".
    [Theory]
    [InlineData("mammogram-performed-string", FindingCodes.NoUsableTime, "Procedure/proc-1")]
    public void Evaluate_DataQualityCase(string caseFile, string code, string? resource, string periodStart = MeasureHarness.DefaultPeriodStart, string periodEnd = MeasureHarness.DefaultPeriodEnd)
    {
        var result = MeasureHarness.Evaluate(MeasureId, caseFile, periodStart, periodEnd);

        Assert.Contains(result.Findings, f => f.Code == code && f.Resource == resource);
    }

    // Stratifiers of every measure (shared semantics): age band at periodEnd, administrative gender, payer, primary-care panel;
    // band codes written as in the definition format ("a-b", "a+", "<a").
    [Theory]
    [InlineData("age-42-on-period-end", "age-band", "42-49")] // 42
    [InlineData("age-74-on-period-end", "age-band", "65-74")] // 74
    [InlineData("mammogram-in-period", "age-band", "50-64")] // 56
    public void Evaluate_Stratum(string caseFile, string stratifier, string? expected, string periodStart = MeasureHarness.DefaultPeriodStart, string periodEnd = MeasureHarness.DefaultPeriodEnd)
    {
        var result = MeasureHarness.Evaluate(MeasureId, caseFile, periodStart, periodEnd);

        Assert.Equal(expected, result.Strata.GetValueOrDefault(stratifier));
    }
}
