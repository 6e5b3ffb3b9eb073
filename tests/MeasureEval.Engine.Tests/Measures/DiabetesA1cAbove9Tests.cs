using MeasureEval.Engine.Tests.Support;

namespace MeasureEval.Engine.Tests.Measures;

/// <summary>
/// diabetes-a1c-above-9 cases (inverse measure: open gap = in the numerator): one patient per fixture under Cases/diabetes-a1c-above-9;
/// expected populations (IP, DEN, DEX, DEXCEP, NUMER) come from the measure spec text, MP 2026 unless stated.
/// </summary>
public sealed class DiabetesA1cAbove9Tests
{
    private const string MeasureId = "diabetes-a1c-above-9";

    [Theory]
    // Initial population: age 18-75 at periodEnd; diabetes (E10.*, E11.*, E13.*; SNOMED CT 44054006, 46635009, 73211009; no O24.*) overlapping MP; qualifying encounter
    [InlineData("age-18-on-period-end", 1, 1, 0, 0, 1)] // turns 18 on periodEnd
    [InlineData("age-17-on-period-end", 0, 0, 0, 0, 0)] // turns 18 the day after periodEnd
    [InlineData("age-75-on-period-end", 1, 1, 0, 0, 1)] // 75 on periodEnd
    [InlineData("age-76-on-period-end", 0, 0, 0, 0, 0)] // turns 76 on periodEnd
    [InlineData("feb29-birthday-17-on-feb-28", 0, 0, 0, 0, 0, "2025-03-01", "2026-02-28")] // born 2008-02-29: 17 on 2026-02-28 (spec check value; our rule)
    [InlineData("feb29-birthday-18-on-mar-01", 1, 1, 0, 0, 1, "2025-03-02", "2026-03-01")] // born 2008-02-29: 18 on 2026-03-01 (spec check value; our rule)
    [InlineData("diabetes-e10", 1, 1, 0, 0, 1)] // E10.*
    [InlineData("diabetes-e13", 1, 1, 0, 0, 1)] // E13.*
    [InlineData("diabetes-e11-parent-code", 1, 1, 0, 0, 1)] // E11.* includes E11
    [InlineData("diabetes-e11-65", 1, 1, 0, 0, 1)] // E11.* includes E11.65
    [InlineData("diabetes-snomed", 1, 1, 0, 0, 1)] // SNOMED CT 44054006
    [InlineData("diabetes-snomed-type-1", 1, 1, 0, 0, 1)] // SNOMED CT 46635009
    [InlineData("diabetes-snomed-type-2", 1, 1, 0, 0, 1)] // SNOMED CT 73211009
    [InlineData("diabetes-gestational-o24", 0, 0, 0, 0, 0)] // no O24.* code qualifies
    [InlineData("no-diabetes", 0, 0, 0, 0, 0)] // no diabetes
    [InlineData("diabetes-abated-before-period", 0, 0, 0, 0, 0)] // abatement before periodStart: no overlap
    [InlineData("diabetes-abated-on-period-start", 1, 1, 0, 0, 1)] // abatement >= periodStart: overlaps (abatement decides, clinicalStatus ignored)
    [InlineData("diabetes-abatement-partial-year", 0, 0, 0, 0, 0)] // abatement uses its last day, 2025-12-31
    [InlineData("diabetes-abatement-partial-month", 1, 1, 0, 0, 1)] // abatement's last day 2026-01-31 is in MP
    [InlineData("diabetes-abatement-age", 1, 1, 0, 0, 1)] // abatementAge 56 a + birthDate = 2026-05-05, in MP
    [InlineData("diabetes-onset-age", 1, 1, 0, 0, 1)] // onsetAge 40 a + birthDate = 2010-05-05
    [InlineData("diabetes-onset-range", 1, 1, 0, 0, 1)] // onsetRange.low 40 a + birthDate = 2010-05-05
    [InlineData("diabetes-abatement-period-end", 0, 0, 0, 0, 0)] // abatementPeriod.end 2025-12-31 is before MP
    [InlineData("diabetes-abatement-range-high", 1, 1, 0, 0, 1)] // abatementRange.high 56 a + birthDate = 2026-05-05, in MP
    [InlineData("diabetes-onset-on-period-end", 1, 1, 0, 0, 1)] // onset on periodEnd overlaps
    [InlineData("diabetes-onset-after-period", 0, 0, 0, 0, 0)] // onset after periodEnd
    [InlineData("diabetes-onset-partial-month", 1, 1, 0, 0, 1)] // onset uses the first day, 2026-12-01
    [InlineData("diabetes-without-onset", 0, 0, 0, 0, 0)] // no onset (and no recordedDate): no usable time, never qualifies, reported
    [InlineData("diabetes-clinical-status-absent", 1, 1, 0, 0, 1)] // absent clinicalStatus without abatement counts as ongoing
    [InlineData("diabetes-recurrence", 1, 1, 0, 0, 1)] // recurrence without abatement counts as ongoing
    [InlineData("diabetes-relapse", 1, 1, 0, 0, 1)] // relapse without abatement counts as ongoing
    [InlineData("diabetes-remission-no-abatement", 0, 0, 0, 0, 0)] // remission without abatement does not count, reported
    [InlineData("diabetes-onset-string", 0, 0, 0, 0, 0)] // onsetString is not a usable onset, reported
    [InlineData("diabetes-icd10-who-system", 0, 0, 0, 0, 0)] // the code must be ICD-10-CM (system http://hl7.org/fhir/sid/icd-10-cm), not WHO ICD-10
    [InlineData("diabetes-inactive-no-abatement", 0, 0, 0, 0, 0)] // inactive without abatement does not count, reported (no end date)
    [InlineData("diabetes-resolved-no-abatement", 0, 0, 0, 0, 0)] // resolved without abatement does not count, reported
    [InlineData("diabetes-refuted", 0, 0, 0, 0, 0)] // refuted does not count
    [InlineData("diabetes-provisional", 0, 0, 0, 0, 0)] // only confirmed or absent verificationStatus counts
    [InlineData("diabetes-entered-in-error", 0, 0, 0, 0, 0)] // entered-in-error never counts
    [InlineData("encounter-inpatient-only", 0, 0, 0, 0, 0)] // IMP is not a qualifying class
    // Numerator (inverse): most recent HbA1c in MP > 9.0 %, or none (common practice); 9.0 itself is not > 9.0
    [InlineData("a1c-none", 1, 1, 0, 0, 1)] // no result: in the numerator
    [InlineData("a1c-9-0", 1, 1, 0, 0, 0)] // 9.0 is not > 9.0
    [InlineData("a1c-9-1", 1, 1, 0, 0, 1)] // 9.1 > 9
    [InlineData("a1c-8-9", 1, 1, 0, 0, 0)] // 8.9 is not > 9
    [InlineData("a1c-ifcc-75", 1, 1, 0, 0, 1)] // 75 mmol/mol -> 9.013 % > 9 (spec check value)
    [InlineData("a1c-ifcc-74", 1, 1, 0, 0, 0)] // 74 mmol/mol -> 8.922 %
    [InlineData("a1c-comparator-above-14", 1, 1, 0, 0, 1)] // >14 % is > 9 (spec example)
    [InlineData("a1c-comparator-below-10", 1, 1, 0, 0, 0)] // <10 % is not > 9 (spec example)
    [InlineData("a1c-comparator-above-9", 1, 1, 0, 0, 1)] // >9.0 %: every allowed value is > 9
    [InlineData("a1c-comparator-at-least-9", 1, 1, 0, 0, 0)] // >=9.0 % allows 9.0
    [InlineData("a1c-most-recent-controlled", 1, 1, 0, 0, 0)] // most recent (8.0) decides
    [InlineData("a1c-most-recent-poor", 1, 1, 0, 0, 1)] // most recent (10.0) decides
    [InlineData("a1c-same-date-tie-lowest", 1, 1, 0, 0, 0)] // tie on the same date: the lowest value (8.0, our rule)
    [InlineData("a1c-stated-date-beats-instant", 1, 1, 0, 0, 1)] // stated date 09-02 (9.5) is the most recent
    [InlineData("a1c-only-entered-in-error", 1, 1, 0, 0, 1)] // no counting result: in the numerator
    [InlineData("a1c-only-preliminary", 1, 1, 0, 0, 1)] // no counting result: in the numerator
    [InlineData("a1c-only-before-period", 1, 1, 0, 0, 1)] // no result in MP: in the numerator
    [InlineData("a1c-unconvertible-unit", 1, 1, 0, 0, 1)] // the only result is in mg/dL: never qualifies, unusable, never the most recent - so there is none (open gap), reported
    [InlineData("a1c-most-recent-unconvertible", 1, 1, 0, 0, 0)] // the later mg/dL result is unusable, never the most recent: the 8.0 of 03-01 decides (not > 9)
    // Exclusions: hospice/palliative; deceased during MP - an excluded patient is never in the numerator, even with no result
    [InlineData("hospice-without-result", 1, 1, 1, 0, 0)] // excluded; no-result numerator not evaluated
    [InlineData("died-during-period-without-result", 1, 1, 1, 0, 0)] // died during MP
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
    public void Evaluate_DataQualityCase(string caseFile, string code, string? resource, string periodStart = MeasureHarness.DefaultPeriodStart, string periodEnd = MeasureHarness.DefaultPeriodEnd)
    {
        var result = MeasureHarness.Evaluate(MeasureId, caseFile, periodStart, periodEnd);

        Assert.Contains(result.Findings, f => f.Code == code && f.Resource == resource);
    }
}
