using MeasureEval.Engine.Tests.Support;

namespace MeasureEval.Engine.Tests.Measures;

/// <summary>
/// diabetes-a1c-below-8 cases: one patient per fixture under Cases/diabetes-a1c-below-8;
/// expected populations (IP, DEN, DEX, DEXCEP, NUMER) come from the measure spec text, MP 2026 unless stated.
/// </summary>
public sealed class DiabetesA1cBelow8Tests
{
    private const string MeasureId = "diabetes-a1c-below-8";

    [Theory]
    // Initial population: age 18-75 at periodEnd; diabetes (E10.*, E11.*, E13.*; SNOMED CT 44054006, 46635009, 73211009; no O24.*) overlapping MP; qualifying encounter
    [InlineData("age-18-on-period-end", 1, 1, 0, 0, 0)] // turns 18 on periodEnd
    [InlineData("age-17-on-period-end", 0, 0, 0, 0, 0)] // turns 18 the day after periodEnd
    [InlineData("age-75-on-period-end", 1, 1, 0, 0, 0)] // 75 on periodEnd
    [InlineData("age-76-on-period-end", 0, 0, 0, 0, 0)] // turns 76 on periodEnd
    [InlineData("feb29-birthday-17-on-feb-28", 0, 0, 0, 0, 0, "2025-03-01", "2026-02-28")] // born 2008-02-29: 17 on 2026-02-28 (spec check value; our rule)
    [InlineData("feb29-birthday-18-on-mar-01", 1, 1, 0, 0, 0, "2025-03-02", "2026-03-01")] // born 2008-02-29: 18 on 2026-03-01 (spec check value; our rule)
    [InlineData("diabetes-e10", 1, 1, 0, 0, 0)] // E10.*
    [InlineData("diabetes-e13", 1, 1, 0, 0, 0)] // E13.*
    [InlineData("diabetes-e11-parent-code", 1, 1, 0, 0, 0)] // E11.* includes E11
    [InlineData("diabetes-e11-65", 1, 1, 0, 0, 0)] // E11.* includes E11.65
    [InlineData("diabetes-snomed", 1, 1, 0, 0, 0)] // SNOMED CT 44054006
    [InlineData("diabetes-snomed-type-1", 1, 1, 0, 0, 0)] // SNOMED CT 46635009
    [InlineData("diabetes-snomed-type-2", 1, 1, 0, 0, 0)] // SNOMED CT 73211009
    [InlineData("diabetes-gestational-o24", 0, 0, 0, 0, 0)] // no O24.* code qualifies
    [InlineData("no-diabetes", 0, 0, 0, 0, 0)] // no diabetes
    [InlineData("diabetes-abated-before-period", 0, 0, 0, 0, 0)] // abatement before periodStart: no overlap
    [InlineData("diabetes-abated-on-period-start", 1, 1, 0, 0, 0)] // abatement >= periodStart: overlaps (abatement decides, clinicalStatus ignored)
    [InlineData("diabetes-abatement-partial-year", 0, 0, 0, 0, 0)] // abatement uses its last day, 2025-12-31
    [InlineData("diabetes-abatement-partial-month", 1, 1, 0, 0, 0)] // abatement's last day 2026-01-31 is in MP
    [InlineData("diabetes-abatement-age", 1, 1, 0, 0, 0)] // abatementAge 56 a + birthDate = 2026-05-05, in MP
    [InlineData("diabetes-onset-age", 1, 1, 0, 0, 0)] // onsetAge 40 a + birthDate = 2010-05-05
    [InlineData("diabetes-onset-range", 1, 1, 0, 0, 0)] // onsetRange.low 40 a + birthDate = 2010-05-05
    [InlineData("diabetes-abatement-period-end", 0, 0, 0, 0, 0)] // abatementPeriod.end 2025-12-31 is before MP
    [InlineData("diabetes-abatement-range-high", 1, 1, 0, 0, 0)] // abatementRange.high 56 a + birthDate = 2026-05-05, in MP
    [InlineData("diabetes-onset-on-period-end", 1, 1, 0, 0, 0)] // onset on periodEnd overlaps
    [InlineData("diabetes-onset-after-period", 0, 0, 0, 0, 0)] // onset after periodEnd
    [InlineData("diabetes-onset-partial-month", 1, 1, 0, 0, 0)] // onset uses the first day, 2026-12-01
    [InlineData("diabetes-without-onset", 0, 0, 0, 0, 0)] // no onset (and no recordedDate): no usable time, never qualifies, reported
    [InlineData("diabetes-clinical-status-absent", 1, 1, 0, 0, 0)] // absent clinicalStatus without abatement counts as ongoing
    [InlineData("diabetes-recurrence", 1, 1, 0, 0, 0)] // recurrence without abatement counts as ongoing
    [InlineData("diabetes-relapse", 1, 1, 0, 0, 0)] // relapse without abatement counts as ongoing
    [InlineData("diabetes-remission-no-abatement", 0, 0, 0, 0, 0)] // remission without abatement does not count, reported
    [InlineData("diabetes-onset-string", 0, 0, 0, 0, 0)] // onsetString is not a usable onset, reported
    [InlineData("diabetes-icd10-who-system", 0, 0, 0, 0, 0)] // the code must be ICD-10-CM (system http://hl7.org/fhir/sid/icd-10-cm), not WHO ICD-10
    [InlineData("diabetes-inactive-no-abatement", 0, 0, 0, 0, 0)] // inactive without abatement does not count, reported (no end date)
    [InlineData("diabetes-resolved-no-abatement", 0, 0, 0, 0, 0)] // resolved without abatement does not count, reported
    [InlineData("diabetes-refuted", 0, 0, 0, 0, 0)] // refuted does not count
    [InlineData("diabetes-provisional", 0, 0, 0, 0, 0)] // only confirmed or absent verificationStatus counts
    [InlineData("diabetes-entered-in-error", 0, 0, 0, 0, 0)] // entered-in-error never counts
    [InlineData("encounter-inpatient-only", 0, 0, 0, 0, 0)] // IMP is not a qualifying class
    // Numerator: most recent HbA1c in MP (LOINC 4548-4, 17856-6, 4549-2, 17855-8 in %; 59261-8 in mmol/mol by NGSP % = 0.09148 x IFCC + 2.152, NGSP / Hoelzel 2004) < 8.0 % (ADA 2025; control threshold: common practice)
    [InlineData("a1c-7-9", 1, 1, 0, 0, 1)] // 7.9 < 8
    [InlineData("a1c-8-0", 1, 1, 0, 0, 0)] // 8.0 is not < 8
    [InlineData("a1c-7-99", 1, 1, 0, 0, 1)] // 7.99 < 8
    [InlineData("a1c-alternate-code", 1, 1, 0, 0, 1)] // 17856-6 listed
    [InlineData("a1c-code-4549-2", 1, 1, 0, 0, 1)] // 4549-2 listed
    [InlineData("a1c-code-17855-8", 1, 1, 0, 0, 1)] // 17855-8 listed
    [InlineData("a1c-unit-text-not-used", 1, 1, 0, 0, 1)] // converted by Quantity.code (%), not the display unit
    [InlineData("a1c-partial-month-ranks-first-day", 1, 1, 0, 0, 1)] // ranking uses a partial date's first day: 2026-09 ranks as 09-01, so 09-15 (7.0) is most recent
    [InlineData("a1c-ifcc-63", 1, 1, 0, 0, 1)] // 63 mmol/mol -> 7.915 % (spec check value, master equation)
    [InlineData("a1c-ifcc-64", 1, 1, 0, 0, 0)] // 64 mmol/mol -> 8.007 %, not < 8 (spec check value; never rounded)
    [InlineData("a1c-unconvertible-unit", 1, 1, 0, 0, 0)] // mg/dL cannot be converted to %: never qualifies, reported
    [InlineData("a1c-most-recent-unconvertible", 1, 1, 0, 0, 1)] // the mg/dL result never qualifies - like a record without a usable time - so it is unusable and never the most recent: the 7.0 of 03-01 decides
    [InlineData("a1c-ifcc-comparator-below-63", 1, 1, 0, 0, 1)] // <63 mmol/mol: every allowed value converts below 7.915 %
    [InlineData("a1c-ifcc-comparator-below-64", 1, 1, 0, 0, 0)] // <64 mmol/mol allows 63.99 -> 8.0058 %: not every value < 8
    [InlineData("a1c-tie-lowest-after-conversion", 1, 1, 0, 0, 1)] // same date: lowest after conversion is 63 mmol/mol = 7.915 % (not the raw 8.2 < 63)
    [InlineData("a1c-comparator-below-6", 1, 1, 0, 0, 1)] // <6.0 % is < 8 (spec example)
    [InlineData("a1c-comparator-below-8-5", 1, 1, 0, 0, 0)] // <8.5 % allows 8.2: not every value < 8
    [InlineData("a1c-comparator-at-most-8", 1, 1, 0, 0, 0)] // <=8.0 % allows 8.0
    [InlineData("a1c-comparator-above-7", 1, 1, 0, 0, 0)] // >7.0 % allows 9
    [InlineData("a1c-none", 1, 1, 0, 0, 0)] // no result: not in the numerator
    [InlineData("a1c-partial-month-in-period", 1, 1, 0, 0, 1)] // 2026-12 lies wholly inside MP
    [InlineData("a1c-amended", 1, 1, 0, 0, 1)] // amended counts
    [InlineData("a1c-before-period", 1, 1, 0, 0, 0)] // the result must be in MP
    [InlineData("a1c-most-recent-high", 1, 1, 0, 0, 0)] // most recent (8.5) decides
    [InlineData("a1c-most-recent-low", 1, 1, 0, 0, 1)] // most recent (7.0) decides
    [InlineData("a1c-same-date-tie-lowest", 1, 1, 0, 0, 1)] // same rank in time: the lowest value (our rule)
    [InlineData("a1c-same-date-later-instant-low", 1, 1, 0, 0, 1)] // both timed: the later instant ranks higher (7.5)
    [InlineData("a1c-same-date-later-instant-high", 1, 1, 0, 0, 0)] // both timed: the later instant (8.5) - not a tie
    [InlineData("a1c-same-date-untimed-before-timed", 1, 1, 0, 0, 0)] // a date-only value ranks before a timed one of the same date: 8.5 is most recent
    [InlineData("a1c-stated-date-beats-instant", 1, 1, 0, 0, 1)] // ranking by stated date first: 09-02 (7.5) is later, though its instant is earlier
    [InlineData("a1c-later-preliminary", 1, 1, 0, 0, 1)] // a preliminary result is never the most recent
    [InlineData("a1c-later-entered-in-error", 1, 1, 0, 0, 1)] // entered-in-error is never the most recent
    [InlineData("a1c-later-without-value", 1, 1, 0, 0, 1)] // an Observation without a value does not count
    [InlineData("a1c-issued-only", 1, 1, 0, 0, 0)] // issued is never the time: never qualifies, reported
    // Exclusions: hospice/palliative; deceased during MP
    [InlineData("hospice-with-controlled-a1c", 1, 1, 1, 0, 0)] // excluded; numerator not evaluated
    [InlineData("died-during-period", 1, 1, 1, 0, 0)] // died during MP
    public void Evaluate_Case(string caseFile, int ip, int den, int dex, int dexcep, int numer, string periodStart = MeasureHarness.DefaultPeriodStart, string periodEnd = MeasureHarness.DefaultPeriodEnd)
    {
        var result = MeasureHarness.Evaluate(MeasureId, caseFile, periodStart, periodEnd);

        Assert.Equal(new CaseCounts(ip, den, dex, dexcep, numer), result.Populations);
    }

    // Shared semantics: no usable time element, an unconvertible unit, a condition ended without a date, a missing or uncertain birthDate are each "reported as a data-quality finding".
    [Theory]
    [InlineData("diabetes-without-onset", FindingCodes.NoUsableTime, "Condition/cond-1")]
    [InlineData("diabetes-remission-no-abatement", FindingCodes.ConditionNoEndDate, "Condition/cond-1")]
    [InlineData("diabetes-onset-string", FindingCodes.NoUsableTime, "Condition/cond-1")]
    [InlineData("diabetes-inactive-no-abatement", FindingCodes.ConditionNoEndDate, "Condition/cond-1")]
    [InlineData("diabetes-resolved-no-abatement", FindingCodes.ConditionNoEndDate, "Condition/cond-1")]
    [InlineData("a1c-unconvertible-unit", FindingCodes.UnconvertibleUnit, "Observation/obs-1")]
    [InlineData("a1c-issued-only", FindingCodes.NoUsableTime, "Observation/obs-1")]
    public void Evaluate_DataQualityCase(string caseFile, string code, string? resource, string periodStart = MeasureHarness.DefaultPeriodStart, string periodEnd = MeasureHarness.DefaultPeriodEnd)
    {
        var result = MeasureHarness.Evaluate(MeasureId, caseFile, periodStart, periodEnd);

        Assert.Contains(result.Findings, f => f.Code == code && f.Resource == resource);
    }

    // Stratifiers of every measure (shared semantics): age band at periodEnd, administrative gender, payer, primary-care panel;
    // band codes written as in the definition format ("a-b", "a+", "<a").
    [Theory]
    [InlineData("age-18-on-period-end", "age-band", "18-44")] // 18
    [InlineData("age-75-on-period-end", "age-band", "65-75")] // 75
    [InlineData("a1c-7-9", "age-band", "45-64")] // 56
    public void Evaluate_Stratum(string caseFile, string stratifier, string? expected, string periodStart = MeasureHarness.DefaultPeriodStart, string periodEnd = MeasureHarness.DefaultPeriodEnd)
    {
        var result = MeasureHarness.Evaluate(MeasureId, caseFile, periodStart, periodEnd);

        Assert.Equal(expected, result.Strata.GetValueOrDefault(stratifier));
    }
}
