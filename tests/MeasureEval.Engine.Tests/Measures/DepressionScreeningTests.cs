using MeasureEval.Engine.Tests.Support;

namespace MeasureEval.Engine.Tests.Measures;

/// <summary>
/// depression-screening cases: one patient per fixture under Cases/depression-screening;
/// expected populations (IP, DEN, DEX, DEXCEP, NUMER) come from the measure spec text, MP 2026 unless stated.
/// </summary>
public sealed class DepressionScreeningTests
{
    private const string MeasureId = "depression-screening";

    [Theory]
    // Initial population: age >= 12 at periodStart (USPSTF 2022 adolescents 12-18, 2023 adults), qualifying encounter
    [InlineData("age-12-on-period-start", 1, 1, 0, 0, 0)] // turns 12 on periodStart
    [InlineData("age-11-on-period-start", 0, 0, 0, 0, 0)] // turns 12 one day after periodStart (12 by periodEnd does not matter)
    [InlineData("birthdate-partial-year-uncertain", 1, 1, 0, 0, 0)] // taken at 2014-01-01: 12 on periodStart; uncertain (a later 2014 birth would be 11), so flagged
    [InlineData("no-encounter", 0, 0, 0, 0, 0)] // qualifying encounter required
    // Numerator: screening during MP - PHQ-9 44261-6, adolescent PHQ-9 89204-2 (from memory: verify), PHQ-2 55758-7; positive: PHQ-9 >= 10 (Kroenke 2001), PHQ-2 >= 3 (Kroenke 2003)
    [InlineData("phq9-negative", 1, 1, 0, 0, 1)] // negative screen needs no follow-up
    [InlineData("phq9-score-9", 1, 1, 0, 0, 1)] // 9 < 10: negative (Kroenke 2001)
    [InlineData("phq9-score-10-no-follow-up", 1, 1, 0, 0, 0)] // 10 is positive (Kroenke 2001) and there is no follow-up
    [InlineData("phq9-integer-negative", 1, 1, 0, 0, 1)] // a score as valueInteger: 4, negative
    [InlineData("phq9-integer-positive-no-follow-up", 1, 1, 0, 0, 0)] // a score as valueInteger: 12, positive, no follow-up
    [InlineData("phq2-score-2", 1, 1, 0, 0, 1)] // 2 < 3: negative (Kroenke 2003)
    [InlineData("phq2-score-3-no-follow-up", 1, 1, 0, 0, 0)] // 3 is positive (Kroenke 2003), no follow-up
    [InlineData("phq9-adolescent-negative", 1, 1, 0, 0, 1)] // adolescent PHQ-9 negative
    [InlineData("phq9-adolescent-positive-no-follow-up", 1, 1, 0, 0, 0)] // adolescent PHQ-9 11 >= 10, no follow-up
    [InlineData("screening-before-period", 1, 1, 0, 0, 0)] // screening must be during MP
    [InlineData("screening-preliminary", 1, 1, 0, 0, 0)] // preliminary does not count
    [InlineData("screening-issued-only", 1, 1, 0, 0, 0)] // issued is never the time, reported
    // Follow-up for a positive most recent screen on D, D+1 or D+2 (stated dates, may fall after periodEnd: our rule): ServiceRequest or completed Procedure 183524004, 308477009, 385724002, 410223002 (SNOMED CT, from memory: verify)
    [InlineData("follow-up-same-day-referral", 1, 1, 0, 0, 1)] // ServiceRequest on D
    [InlineData("follow-up-next-day-procedure", 1, 1, 0, 0, 1)] // completed Procedure on D+1
    [InlineData("follow-up-earlier-same-day", 1, 1, 0, 0, 1)] // a follow-up on D counts by stated date, even before the screen's time
    [InlineData("follow-up-day-2", 1, 1, 0, 0, 1)] // D+2 counts
    [InlineData("follow-up-day-3", 1, 1, 0, 0, 0)] // D+3 does not count
    [InlineData("follow-up-day-before", 1, 1, 0, 0, 0)] // D-1 does not count
    [InlineData("follow-up-plan-intent", 1, 1, 0, 0, 1)] // ServiceRequest completed, intent plan counts
    [InlineData("follow-up-reflex-order-intent", 1, 1, 0, 0, 1)] // reflex-order is a child intent of order
    [InlineData("follow-up-directive-intent", 1, 1, 0, 0, 0)] // intent directive does not count
    [InlineData("follow-up-without-authored-on", 1, 1, 0, 0, 0)] // a ServiceRequest without authoredOn has no usable time, reported
    [InlineData("follow-up-proposal-intent", 1, 1, 0, 0, 0)] // intent proposal does not count
    [InlineData("follow-up-draft", 1, 1, 0, 0, 0)] // status draft does not count
    [InlineData("follow-up-procedure-not-done", 1, 1, 0, 0, 0)] // a Procedure must be completed
    [InlineData("follow-up-other-code", 1, 1, 0, 0, 0)] // 306206005 (referral to service) is not one of the four codes; no descendants
    [InlineData("follow-up-after-period-end", 1, 1, 0, 0, 1)] // screen on periodEnd, follow-up on D+2 after periodEnd (our rule)
    [InlineData("follow-up-after-period-end-day-3", 1, 1, 0, 0, 0)] // D+3 after periodEnd does not count
    [InlineData("follow-up-stated-date-day-2", 1, 1, 0, 0, 1)] // stated dates D=06-10, follow-up 06-12 = D+2 (UTC would make it 06-13)
    [InlineData("follow-up-stated-date-day-3", 1, 1, 0, 0, 0)] // stated date 06-13 = D+3 (UTC 06-12T11:00 would be D+2)
    // Most recent screening date: PHQ-9 decides over PHQ-2; same instrument twice: the later, then the higher score; earlier positives are not judged (our rule)
    [InlineData("same-date-phq9-positive-over-phq2-negative", 1, 1, 0, 0, 0)] // PHQ-9 (12, positive) decides over PHQ-2 (0); no follow-up
    [InlineData("same-date-phq9-negative-over-phq2-positive", 1, 1, 0, 0, 1)] // PHQ-9 (5, negative) decides over PHQ-2 (4)
    [InlineData("same-date-later-phq9-negative", 1, 1, 0, 0, 1)] // the later PHQ-9 (5) decides
    [InlineData("same-date-later-phq9-positive", 1, 1, 0, 0, 0)] // the later PHQ-9 (12) decides, no follow-up
    [InlineData("same-date-untimed-higher-score", 1, 1, 0, 0, 0)] // no times: the higher score (12) decides - not the general lowest-value tie rule
    [InlineData("same-date-untimed-before-timed", 1, 1, 0, 0, 1)] // a date-only value ranks before timed values of the same date: the timed 5 is the later
    [InlineData("earlier-positive-later-negative", 1, 1, 0, 0, 1)] // only the most recent date is judged; the earlier positive does not count against (our rule)
    [InlineData("earlier-negative-later-positive", 1, 1, 0, 0, 0)] // most recent is positive without follow-up
    [InlineData("earlier-phq9-positive-later-phq2-negative", 1, 1, 0, 0, 1)] // most recent date holds a negative PHQ-2 only
    [InlineData("most-recent-entered-in-error", 1, 1, 0, 0, 1)] // an unusable record is never the most recent
    [InlineData("most-recent-preliminary", 1, 1, 0, 0, 1)] // a preliminary record does not count and is never the most recent
    // Exclusions: depression (F32.*, F33.*) or bipolar disorder (F31.*) with onset before periodStart, whatever its clinicalStatus; hospice/palliative
    [InlineData("depression-f32-before-period", 1, 1, 1, 0, 0)] // onset before periodStart; numerator not evaluated
    [InlineData("depression-f32-a", 1, 1, 1, 0, 0)] // F32.* covers F32.A
    [InlineData("bipolar-f31", 1, 1, 1, 0, 0)] // F31.*
    [InlineData("depression-f33-onset-on-period-start", 1, 1, 0, 0, 0)] // onset must be before periodStart, not on it
    [InlineData("depression-resolved", 1, 1, 1, 0, 0)] // whatever its clinicalStatus (resolved and abated)
    [InlineData("depression-inactive-no-abatement", 1, 1, 1, 0, 0)] // whatever its clinicalStatus (inactive)
    [InlineData("depression-refuted", 1, 1, 0, 0, 0)] // a refuted Condition does not count
    [InlineData("dysthymia-f34-not-listed", 1, 1, 0, 0, 0)] // F34.1 is not listed
    [InlineData("depression-partial-onset-year", 1, 1, 1, 0, 0)] // onset tests use the interval's first day (2025-01-01)
    [InlineData("depression-partial-onset-month-of-start", 1, 1, 0, 0, 0)] // first day 2026-01-01 is not before periodStart
    [InlineData("depression-recorded-date-only", 1, 1, 0, 0, 0)] // recordedDate stands in only in 'on or before' tests; 'onset before periodStart' has no onset
    [InlineData("hospice-service-request", 1, 1, 1, 0, 0)] // hospice/palliative
    // Exception: no screening counts in MP, and an Observation of a screening code in MP has status final and dataAbsentReason asked-declined
    [InlineData("declined-no-screening", 1, 1, 0, 1, 0)] // declined, no screening
    [InlineData("declined-phq2", 1, 1, 0, 1, 0)] // PHQ-2 code declined
    [InlineData("declined-adolescent-code", 1, 1, 0, 1, 0)] // adolescent PHQ-9 code declined
    [InlineData("declined-on-period-end", 1, 1, 0, 1, 0)] // periodEnd inclusive
    [InlineData("declined-before-period", 1, 1, 0, 0, 0)] // must be in MP
    [InlineData("declined-preliminary", 1, 1, 0, 0, 0)] // must be final
    [InlineData("declined-other-reason", 1, 1, 0, 0, 0)] // only asked-declined
    [InlineData("declined-with-negative-screening", 1, 1, 0, 0, 1)] // numerator met: exception not considered
    [InlineData("declined-with-positive-screening", 1, 1, 0, 0, 0)] // a screening counts in MP (positive, no follow-up): no exception
    [InlineData("declined-but-excluded", 1, 1, 1, 0, 0)] // excluded: exception not evaluated
    [InlineData("age-17-at-start-18-at-end", 1, 1, 0, 0, 0)] // 17 on periodStart: in IP (>= 12)
    [InlineData("age-65-on-period-end", 1, 1, 0, 0, 0)] // 65 on periodEnd
    public void Evaluate_Case(string caseFile, int ip, int den, int dex, int dexcep, int numer, string periodStart = MeasureHarness.DefaultPeriodStart, string periodEnd = MeasureHarness.DefaultPeriodEnd)
    {
        var result = MeasureHarness.Evaluate(MeasureId, caseFile, periodStart, periodEnd);

        Assert.Equal(new CaseCounts(ip, den, dex, dexcep, numer), result.Populations);
    }

    // Shared semantics: no usable time element, an unconvertible unit, a condition ended without a date, a missing or uncertain birthDate are each "reported as a data-quality finding".
    [Theory]
    [InlineData("birthdate-partial-year-uncertain", FindingCodes.PartialBirthDate, null)]
    [InlineData("screening-issued-only", FindingCodes.NoUsableTime, "Observation/obs-1")]
    [InlineData("follow-up-without-authored-on", FindingCodes.NoUsableTime, "ServiceRequest/sr-1")]
    public void Evaluate_DataQualityCase(string caseFile, string code, string? resource, string periodStart = MeasureHarness.DefaultPeriodStart, string periodEnd = MeasureHarness.DefaultPeriodEnd)
    {
        var result = MeasureHarness.Evaluate(MeasureId, caseFile, periodStart, periodEnd);

        Assert.Contains(result.Findings, f => f.Code == code && f.Resource == resource);
    }

    // Stratifiers of every measure (shared semantics): age band at periodEnd, administrative gender, payer, primary-care panel;
    // band codes written as in the definition format ("a-b", "a+", "<a").
    [Theory]
    [InlineData("age-12-on-period-start", "age-band", "12-17")] // 12 on periodEnd
    [InlineData("phq9-negative", "age-band", "18-64")] // 56
    [InlineData("age-17-at-start-18-at-end", "age-band", "18-64")] // age band at periodEnd (18), not periodStart (17)
    [InlineData("age-65-on-period-end", "age-band", "65+")] // 65
    public void Evaluate_Stratum(string caseFile, string stratifier, string? expected, string periodStart = MeasureHarness.DefaultPeriodStart, string periodEnd = MeasureHarness.DefaultPeriodEnd)
    {
        var result = MeasureHarness.Evaluate(MeasureId, caseFile, periodStart, periodEnd);

        Assert.Equal(expected, result.Strata.GetValueOrDefault(stratifier));
    }
}
