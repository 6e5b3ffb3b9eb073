using MeasureEval.Engine.Tests.Support;

namespace MeasureEval.Engine.Tests.Measures;

/// <summary>
/// cervical-cancer-screening cases: one patient per fixture under Cases/cervical-cancer-screening;
/// expected populations (IP, DEN, DEX, DEXCEP, NUMER) come from the measure spec text, MP 2026 unless stated.
/// The cytology age rule (>= 21 on the test date) cannot bite with a one-year MP and the IP lower bound of 24, so only its edge is shown.
/// </summary>
public sealed class CervicalCancerScreeningTests
{
    private const string MeasureId = "cervical-cancer-screening";

    [Theory]
    // Initial population: gender female, age 24-64 at periodEnd (USPSTF 2018: 21-65; bounds ours), qualifying encounter
    [InlineData("age-24-on-period-end", 1, 1, 0, 0, 0)] // turns 24 on periodEnd
    [InlineData("age-23-on-period-end", 0, 0, 0, 0, 0)] // turns 24 the day after periodEnd
    [InlineData("age-64-on-period-end", 1, 1, 0, 0, 0)] // 64 on periodEnd
    [InlineData("age-65-on-period-end", 0, 0, 0, 0, 0)] // turns 65 on periodEnd
    [InlineData("gender-male", 0, 0, 0, 0, 0)] // female-only measure
    [InlineData("gender-absent", 0, 0, 0, 0, 0)] // absent gender is not in the initial population
    [InlineData("no-encounter", 0, 0, 0, 0, 0)] // qualifying encounter required
    // Numerator: cervical cytology (LOINC 10524-7, 18500-9, 33717-0) during MP or the 2 years before (from 2024-01-01), patient >= 21 on the test date (USPSTF 2018: every 3 years)
    [InlineData("cytology-in-period", 1, 1, 0, 0, 1)] // in MP
    [InlineData("cytology-first-day-of-window", 1, 1, 0, 0, 1)] // periodStart - 2 years, inclusive
    [InlineData("cytology-day-before-window", 1, 1, 0, 0, 0)] // one day before the window
    [InlineData("cytology-age-21-on-test-date", 1, 1, 0, 0, 1)] // turned 21 on 2023-12-31: >= 21 on the test date
    [InlineData("cytology-after-period", 1, 1, 0, 0, 0)] // after periodEnd
    [InlineData("cytology-alternate-code", 1, 1, 0, 0, 1)] // 18500-9 listed
    [InlineData("cytology-report", 1, 1, 0, 0, 1)] // 33717-0 arriving as a DiagnosticReport
    [InlineData("cytology-preliminary", 1, 1, 0, 0, 0)] // preliminary does not count
    [InlineData("cytology-amended", 1, 1, 0, 0, 1)] // amended counts
    [InlineData("cytology-effective-timing", 1, 1, 0, 0, 0)] // effectiveTiming is never the time, reported
    // Numerator: high-risk HPV test (LOINC 21440-3, 30167-1, 59420-0, 71431-1, 77379-6, 82675-0) during MP or the 4 years before (from 2022-01-01), patient >= 30 on the test date (USPSTF 2018: every 5 years from 30)
    [InlineData("hpv-first-day-of-window", 1, 1, 0, 0, 1)] // periodStart - 4 years, inclusive
    [InlineData("hpv-day-before-window", 1, 1, 0, 0, 0)] // one day before the window
    [InlineData("hpv-alternate-code", 1, 1, 0, 0, 1)] // 82675-0 listed
    [InlineData("hpv-on-30th-birthday", 1, 1, 0, 0, 1)] // 30 on the test date
    [InlineData("hpv-day-before-30th-birthday", 1, 1, 0, 0, 0)] // 29 on the test date: does not count
    [InlineData("hpv-on-30th-birthday-stated-date", 1, 1, 0, 0, 1)] // stated date 2023-06-15: 30 on the test date (UTC 2023-06-14)
    [InlineData("hpv-under-30-in-period", 1, 1, 0, 0, 0)] // 26 on the test date
    [InlineData("hpv-feb29-birthday-feb28", 1, 1, 0, 0, 0)] // born 1996-02-29: still 29 on 2026-02-28 (birthday reached on 1 March in common years: our rule)
    [InlineData("hpv-feb29-birthday-mar01", 1, 1, 0, 0, 1)] // born 1996-02-29: 30 on 2026-03-01 (our rule)
    [InlineData("hpv-under-30-with-cytology", 1, 1, 0, 0, 1)] // any of: the cytology counts though the HPV test does not
    [InlineData("hpv-entered-in-error", 1, 1, 0, 0, 0)] // entered-in-error never counts
    // Exclusions: hysterectomy with no residual cervix (ICD-10-CM Z90.710, Z90.712; SNOMED CT 116140006) on or before periodEnd; hospice/palliative
    [InlineData("hysterectomy-z90-710", 1, 1, 1, 0, 0)] // Z90.710; numerator not evaluated
    [InlineData("hysterectomy-z90-712", 1, 1, 1, 0, 0)] // Z90.712
    [InlineData("hysterectomy-with-cervix-z90-711", 1, 1, 0, 0, 0)] // Z90.711 (residual cervix) is not listed
    [InlineData("hysterectomy-procedure", 1, 1, 1, 0, 0)] // SNOMED CT 116140006
    [InlineData("hysterectomy-procedure-not-done", 1, 1, 0, 0, 0)] // not performed
    [InlineData("hysterectomy-procedure-after-period", 1, 1, 0, 0, 0)] // after periodEnd
    [InlineData("hysterectomy-unconfirmed", 1, 1, 0, 0, 0)] // verificationStatus must be confirmed or absent
    [InlineData("hysterectomy-recorded-date-only", 1, 1, 1, 0, 0)] // recordedDate stands in for onset in an 'on or before' test
    [InlineData("palliative-service-request", 1, 1, 1, 0, 0)] // hospice/palliative ServiceRequest, active order
    // Every listed HPV code, one case each
    [InlineData("hpv-code-30167-1", 1, 1, 0, 0, 1)] // HPV LOINC 30167-1 listed
    [InlineData("hpv-code-59420-0", 1, 1, 0, 0, 1)] // HPV LOINC 59420-0 listed
    [InlineData("hpv-code-71431-1", 1, 1, 0, 0, 1)] // HPV LOINC 71431-1 listed
    [InlineData("hpv-code-77379-6", 1, 1, 0, 0, 1)] // HPV LOINC 77379-6 listed
    public void Evaluate_Case(string caseFile, int ip, int den, int dex, int dexcep, int numer, string periodStart = MeasureHarness.DefaultPeriodStart, string periodEnd = MeasureHarness.DefaultPeriodEnd)
    {
        var result = MeasureHarness.Evaluate(MeasureId, caseFile, periodStart, periodEnd);

        Assert.Equal(new CaseCounts(ip, den, dex, dexcep, numer), result.Populations);
    }

    // Shared semantics: no usable time element, an unconvertible unit, a condition ended without a date, a missing or uncertain birthDate are each "reported as a data-quality finding".
    [Theory]
    [InlineData("cytology-effective-timing", FindingCodes.NoUsableTime, "Observation/obs-1")]
    public void Evaluate_DataQualityCase(string caseFile, string code, string? resource, string periodStart = MeasureHarness.DefaultPeriodStart, string periodEnd = MeasureHarness.DefaultPeriodEnd)
    {
        var result = MeasureHarness.Evaluate(MeasureId, caseFile, periodStart, periodEnd);

        Assert.Contains(result.Findings, f => f.Code == code && f.Resource == resource);
    }

    // Stratifiers of every measure (shared semantics): age band at periodEnd, administrative gender, payer, primary-care panel;
    // band codes written as in the definition format ("a-b", "a+", "<a").
    [Theory]
    [InlineData("age-24-on-period-end", "age-band", "24-29")] // 24
    [InlineData("age-64-on-period-end", "age-band", "50-64")] // 64
    [InlineData("cytology-in-period", "age-band", "30-49")] // 46
    public void Evaluate_Stratum(string caseFile, string stratifier, string? expected, string periodStart = MeasureHarness.DefaultPeriodStart, string periodEnd = MeasureHarness.DefaultPeriodEnd)
    {
        var result = MeasureHarness.Evaluate(MeasureId, caseFile, periodStart, periodEnd);

        Assert.Equal(expected, result.Strata.GetValueOrDefault(stratifier));
    }
}
