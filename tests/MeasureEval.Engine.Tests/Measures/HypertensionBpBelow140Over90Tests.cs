using MeasureEval.Engine.Tests.Support;

namespace MeasureEval.Engine.Tests.Measures;

/// <summary>
/// hypertension-bp-below-140-90 cases: one patient per fixture under Cases/hypertension-bp-below-140-90;
/// expected populations (IP, DEN, DEX, DEXCEP, NUMER) come from the measure spec text, MP 2026 unless stated.
/// </summary>
public sealed class HypertensionBpBelow140Over90Tests
{
    private const string MeasureId = "hypertension-bp-below-140-90";

    [Theory]
    // Initial population: age 18-85 at periodEnd; essential hypertension (I10; SNOMED CT 59621000) with onset on or before periodStart + 6 months - 1 day (2026-06-30) and not abated before periodStart; qualifying encounter
    [InlineData("age-18-on-period-end", 1, 1, 0, 0, 0)] // turns 18 on periodEnd
    [InlineData("age-17-on-period-end", 0, 0, 0, 0, 0)] // turns 18 the day after periodEnd
    [InlineData("age-85-on-period-end", 1, 1, 0, 0, 0)] // 85 on periodEnd
    [InlineData("age-86-on-period-end", 0, 0, 0, 0, 0)] // turns 86 on periodEnd
    [InlineData("hypertension-onset-june-30", 1, 1, 0, 0, 0)] // last day of the first six months
    [InlineData("hypertension-onset-july-01", 0, 0, 0, 0, 0)] // onset after the first six months
    [InlineData("hypertension-onset-partial-june", 1, 1, 0, 0, 0)] // onset uses the first day, 2026-06-01
    [InlineData("hypertension-onset-partial-year", 1, 1, 0, 0, 0)] // onset 2026 uses its first day, 2026-01-01
    [InlineData("hypertension-onset-partial-july", 0, 0, 0, 0, 0)] // first day 2026-07-01 is after 2026-06-30
    [InlineData("hypertension-onset-rolled-month-end", 1, 1, 0, 0, 0, "2025-08-31", "2026-08-30")] // MP from 2025-08-31: + 6 months = 2026-02-31 -> 2026-03-01, - 1 day = 2026-02-28 (calendar arithmetic, missing day rolls to the next 1st)
    [InlineData("hypertension-onset-after-rolled-month-end", 0, 0, 0, 0, 0, "2025-08-31", "2026-08-30")] // MP from 2025-08-31: onset 2026-03-01 is after 2026-02-28
    [InlineData("hypertension-onset-stated-date-june-30", 1, 1, 0, 0, 0)] // stated date 2026-06-30 (UTC would be 07-01)
    [InlineData("hypertension-onset-stated-date-july-01", 0, 0, 0, 0, 0)] // stated date 2026-07-01 (UTC would be 06-30)
    [InlineData("hypertension-onset-period-start", 1, 1, 0, 0, 0)] // onsetPeriod.start 2026-06-30
    [InlineData("hypertension-abatement-partial-year", 0, 0, 0, 0, 0)] // abatement's last day 2025-12-31 is before periodStart
    [InlineData("hypertension-abatement-partial-month", 1, 1, 0, 0, 0)] // abatement's last day 2026-01-31 is not before periodStart
    [InlineData("hypertension-abated-before-period", 0, 0, 0, 0, 0)] // abated before periodStart
    [InlineData("hypertension-abated-on-period-start", 1, 1, 0, 0, 0)] // abated on periodStart: not before it
    [InlineData("hypertension-recorded-date-only", 1, 1, 0, 0, 0)] // recordedDate stands in for onset in an 'on or before' test
    [InlineData("hypertension-recorded-date-only-late", 0, 0, 0, 0, 0)] // recordedDate after 2026-06-30
    [InlineData("hypertension-snomed", 1, 1, 0, 0, 0)] // SNOMED CT 59621000
    [InlineData("hypertension-other-code", 0, 0, 0, 0, 0)] // I10 matches exactly; I11.9 is not listed
    [InlineData("hypertension-inactive-no-abatement", 0, 0, 0, 0, 0)] // inactive without abatement does not count, reported
    [InlineData("hypertension-refuted", 0, 0, 0, 0, 0)] // refuted does not count
    [InlineData("no-encounter", 0, 0, 0, 0, 0)] // qualifying encounter required
    // Numerator: representative reading - latest stated date in MP with both systolic and diastolic; lowest of each that date (may come from different readings); systolic < 140 and diastolic < 90 mm[Hg] (common practice)
    [InlineData("panel-130-80", 1, 1, 0, 0, 1)] // controlled
    [InlineData("panel-139-89", 1, 1, 0, 0, 1)] // just under both thresholds
    [InlineData("panel-140-80", 1, 1, 0, 0, 0)] // systolic 140 is not < 140
    [InlineData("panel-130-90", 1, 1, 0, 0, 0)] // diastolic 90 is not < 90
    [InlineData("panel-amended", 1, 1, 0, 0, 1)] // amended counts
    [InlineData("separate-observations-138-88", 1, 1, 0, 0, 1)] // separate 8480-6 / 8462-4 Observations on one date
    [InlineData("panel-in-kilopascal", 1, 1, 0, 0, 1)] // UCUM: 18 kPa = 135.0 mm[Hg], 11 kPa = 82.5 mm[Hg] (1 mm[Hg] = 133.322 Pa, UCUM table)
    [InlineData("panel-in-kilopascal-high", 1, 1, 0, 0, 0)] // UCUM: 19 kPa = 142.5 mm[Hg], not < 140
    [InlineData("two-readings-same-day-135-85", 1, 1, 0, 0, 1)] // 150/85 and 135/95 -> representative 135/85 -> controlled (spec check value)
    [InlineData("panel-and-separate-diastolic-same-day", 1, 1, 0, 0, 0)] // lowest of the day: 150/80, systolic not < 140
    [InlineData("panel-and-separate-systolic-same-day", 1, 1, 0, 0, 1)] // lowest of the day: 135/85, from different readings
    [InlineData("later-panel-diastolic-absent", 1, 1, 0, 0, 0)] // 2026-11-01 has no diastolic value: 2026-09-01 (150/95) is representative
    [InlineData("later-systolic-only-ignored-controlled", 1, 1, 0, 0, 1)] // 2026-11-01 has no diastolic: the 2026-09-01 reading is representative
    [InlineData("later-systolic-only-ignored-uncontrolled", 1, 1, 0, 0, 0)] // the later systolic-only date is ignored; 150/95
    [InlineData("most-recent-uncontrolled", 1, 1, 0, 0, 0)] // the most recent date decides
    [InlineData("most-recent-controlled", 1, 1, 0, 0, 1)] // the most recent date decides
    [InlineData("systolic-and-diastolic-on-different-dates", 1, 1, 0, 0, 0)] // no date has both values
    [InlineData("stated-dates-across-offsets", 1, 1, 0, 0, 1)] // stated dates: 10-02 is the latest date (its UTC instant is earlier)
    [InlineData("later-preliminary-ignored", 1, 1, 0, 0, 1)] // preliminary does not count
    [InlineData("later-entered-in-error-ignored", 1, 1, 0, 0, 1)] // entered-in-error never counts
    [InlineData("no-reading", 1, 1, 0, 0, 0)] // no reading: not in the numerator
    [InlineData("reading-after-period-ignored", 1, 1, 0, 0, 1)] // only dates in MP: the 2027-01-01 reading is outside
    [InlineData("reading-before-period", 1, 1, 0, 0, 0)] // reading must be in MP
    [InlineData("panel-issued-only", 1, 1, 0, 0, 0)] // issued is never the time: never qualifies, reported
    [InlineData("diastolic-unconvertible-unit", 1, 1, 0, 0, 0)] // a diastolic in % cannot be converted to mm[Hg]: never qualifies, reported
    // Exclusions: ESRD (N18.6; SNOMED CT 46177005), dialysis (Z99.2), kidney transplant (Z94.0) onset on or before periodEnd; pregnancy (Z33.1, Z34.*, Z3A.*, O00.*-O9A.*; SNOMED CT 77386006) overlapping MP, 42 weeks without abatement (our rule); hospice/palliative
    [InlineData("esrd-with-controlled-reading", 1, 1, 1, 0, 0)] // ESRD; numerator not evaluated
    [InlineData("esrd-snomed", 1, 1, 1, 0, 0)] // SNOMED CT 46177005
    [InlineData("dialysis-z99-2", 1, 1, 1, 0, 0)] // Z99.2
    [InlineData("kidney-transplant-z94-0", 1, 1, 1, 0, 0)] // Z94.0
    [InlineData("esrd-resolved-history", 1, 1, 1, 0, 0)] // onset on or before periodEnd needs only the onset (history rule)
    [InlineData("ckd-stage-5-not-listed", 1, 1, 0, 0, 0)] // N18.5 is not listed
    [InlineData("esrd-onset-after-period", 1, 1, 0, 0, 0)] // onset after periodEnd
    [InlineData("esrd-onset-on-period-end", 1, 1, 1, 0, 0)] // onset on periodEnd
    [InlineData("pregnancy-z34", 1, 1, 1, 0, 0)] // Z34.* overlapping MP
    [InlineData("pregnancy-z33-1", 1, 1, 1, 0, 0)] // Z33.1
    [InlineData("pregnancy-z33-2-not-listed", 1, 1, 0, 0, 0)] // Z33.2 is not listed
    [InlineData("pregnancy-z3a", 1, 1, 1, 0, 0)] // Z3A.*
    [InlineData("pregnancy-o00", 1, 1, 1, 0, 0)] // first block of O00.*-O9A.*
    [InlineData("pregnancy-o26", 1, 1, 1, 0, 0)] // inside O00.*-O9A.*
    [InlineData("pregnancy-o9a", 1, 1, 1, 0, 0)] // last block of O00.*-O9A.*
    [InlineData("pregnancy-snomed", 1, 1, 1, 0, 0)] // SNOMED CT 77386006
    [InlineData("pregnancy-42-weeks-reach-period-start", 1, 1, 1, 0, 0)] // no abatement: 2025-03-13 + 42 weeks = 2026-01-01, overlaps MP (our rule)
    [InlineData("pregnancy-42-weeks-end-before-period", 1, 1, 0, 0, 0)] // no abatement: 2025-03-12 + 42 weeks = 2025-12-31, before MP (our rule)
    [InlineData("pregnancy-abated-in-period", 1, 1, 1, 0, 0)] // abated in MP: overlaps
    [InlineData("pregnancy-abated-before-period", 1, 1, 0, 0, 0)] // abated before MP
    [InlineData("pregnancy-onset-after-period", 1, 1, 0, 0, 0)] // onset after periodEnd
    [InlineData("hospice-procedure-in-progress", 1, 1, 1, 0, 0)] // palliative care procedure in progress overlapping MP
    public void Evaluate_Case(string caseFile, int ip, int den, int dex, int dexcep, int numer, string periodStart = MeasureHarness.DefaultPeriodStart, string periodEnd = MeasureHarness.DefaultPeriodEnd)
    {
        var result = MeasureHarness.Evaluate(MeasureId, caseFile, periodStart, periodEnd);

        Assert.Equal(new CaseCounts(ip, den, dex, dexcep, numer), result.Populations);
    }

    // Shared semantics: no usable time element, an unconvertible unit, a condition ended without a date, a missing or uncertain birthDate are each "reported as a data-quality finding".
    [Theory]
    [InlineData("hypertension-inactive-no-abatement", FindingCodes.ConditionNoEndDate, "Condition/cond-1")]
    [InlineData("panel-issued-only", FindingCodes.NoUsableTime, "Observation/obs-1")]
    [InlineData("diastolic-unconvertible-unit", FindingCodes.UnconvertibleUnit, "Observation/obs-2")]
    public void Evaluate_DataQualityCase(string caseFile, string code, string? resource, string periodStart = MeasureHarness.DefaultPeriodStart, string periodEnd = MeasureHarness.DefaultPeriodEnd)
    {
        var result = MeasureHarness.Evaluate(MeasureId, caseFile, periodStart, periodEnd);

        Assert.Contains(result.Findings, f => f.Code == code && f.Resource == resource);
    }

    // Stratifiers of every measure (shared semantics): age band at periodEnd, administrative gender, payer, primary-care panel;
    // band codes written as in the definition format ("a-b", "a+", "<a").
    [Theory]
    [InlineData("age-18-on-period-end", "age-band", "18-44")] // 18
    [InlineData("age-85-on-period-end", "age-band", "65-85")] // 85
    [InlineData("panel-130-80", "age-band", "45-64")] // 56
    public void Evaluate_Stratum(string caseFile, string stratifier, string? expected, string periodStart = MeasureHarness.DefaultPeriodStart, string periodEnd = MeasureHarness.DefaultPeriodEnd)
    {
        var result = MeasureHarness.Evaluate(MeasureId, caseFile, periodStart, periodEnd);

        Assert.Equal(expected, result.Strata.GetValueOrDefault(stratifier));
    }
}
