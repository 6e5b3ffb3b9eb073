using MeasureEval.Engine.Tests.Support;

namespace MeasureEval.Engine.Tests.Measures;

/// <summary>
/// immunizations-by-age-2 cases: one child per fixture under Cases/immunizations-by-age-2;
/// expected populations (IP, DEN, DEX, DEXCEP, NUMER) come from the measure spec text, MP 2026 unless stated.
/// </summary>
public sealed class ImmunizationsByAge2Tests
{
    private const string MeasureId = "immunizations-by-age-2";

    [Theory]
    // Initial population: children whose 2nd birthday falls in MP (no encounter needed: none of these fixtures has one)
    [InlineData("born-2024-01-01", 1, 1, 0, 0, 0)] // 2nd birthday on periodStart
    [InlineData("born-2023-12-31", 0, 0, 0, 0, 0)] // 2nd birthday the day before MP
    [InlineData("born-2024-12-31", 1, 1, 0, 0, 0)] // 2nd birthday on periodEnd
    [InlineData("born-2025-01-01", 0, 0, 0, 0, 0)] // 2nd birthday the day after MP
    [InlineData("born-2024-02-29", 1, 1, 0, 0, 0)] // 2nd birthday 2026-03-01 by the age rule (our rule), in MP 2026
    [InlineData("born-2024-02-29-period-ends-feb-28", 0, 0, 0, 0, 0, "2025-03-01", "2026-02-28")] // 2nd birthday 2026-03-01 falls after periodEnd 2026-02-28 (our rule)
    [InlineData("born-2024-02-29-period-ends-mar-01", 1, 1, 0, 0, 0, "2025-03-02", "2026-03-01")] // 2nd birthday 2026-03-01 = periodEnd (our rule)
    [InlineData("birthdate-missing", 0, 0, 0, 0, 0)] // no birthDate: not in any initial population, flagged
    [InlineData("died-before-period", 0, 0, 0, 0, 0)] // died before periodStart
    // Numerator: all antigens (CDC child schedule, from memory: verify); doses on distinct stated dates from day 42 to the 2nd birthday (HepB from birth; MMR/varicella from the 1st birthday); combination vaccines count for each antigen (CDC Mapping CVX to Vaccine Groups)
    [InlineData("full-series", 1, 1, 0, 0, 1)] // DTaP 4, polio 3, MMR 1, Hib 3, HepB 4, varicella 1, PCV 4
    [InlineData("no-doses", 1, 1, 0, 0, 0)] // nothing given
    [InlineData("dtap-only-three", 1, 1, 0, 0, 0)] // DTaP 3 < 4
    [InlineData("dtap-fourth-same-date-as-third", 1, 1, 0, 0, 0)] // the 4th DTaP shares a date with the 3rd: counted once, DTaP 3
    [InlineData("hib-only-two", 1, 1, 0, 0, 0)] // Hib 2 < 3
    [InlineData("mmrv-combination", 1, 1, 0, 0, 1)] // MMRV (94) counts for MMR and varicella
    [InlineData("mmr-day-before-first-birthday", 1, 1, 0, 0, 0)] // MMR before the 1st birthday not counted
    [InlineData("varicella-day-before-first-birthday", 1, 1, 0, 0, 0)] // varicella before the 1st birthday not counted
    [InlineData("mmr-code-without-leading-zero", 1, 1, 0, 0, 0)] // CVX codes compare as strings with leading zeros: '3' is not '03'
    [InlineData("pcv-first-dose-day-41", 1, 1, 0, 0, 0)] // day 41 after birth: not counted, PCV 3
    [InlineData("pcv-first-dose-day-42", 1, 1, 0, 0, 1)] // day 42 after birth counts
    [InlineData("pcv-first-dose-day-42-stated-date", 1, 1, 0, 0, 1)] // stated date 2024-04-12 = day 42 (UTC 2024-04-11)
    [InlineData("dtap-fourth-on-second-birthday", 1, 1, 0, 0, 1)] // dose on the 2nd birthday counts (between day 42 and the 2nd birthday, inclusive)
    [InlineData("dtap-fourth-after-second-birthday", 1, 1, 0, 0, 0)] // the day after the 2nd birthday: not counted
    [InlineData("dtap-fourth-stated-date-on-birthday", 1, 1, 0, 0, 1)] // stated date 2026-03-01 (UTC 2026-03-02)
    [InlineData("dtap-same-stated-date-different-utc-date", 1, 1, 0, 0, 0)] // a DTaP at 2024-09-01T00:30+14:00 shares the stated date of the 2024-09-01 dose (UTC 2024-08-31): counted once, DTaP 3
    [InlineData("dtap-fourth-subpotent", 1, 1, 0, 0, 0)] // subpotent dose not counted
    [InlineData("dtap-fourth-not-done", 1, 1, 0, 0, 0)] // not-done dose not counted
    [InlineData("dtap-fourth-entered-in-error", 1, 1, 0, 0, 0)] // entered-in-error never counts
    [InlineData("dtap-fourth-occurrence-string", 1, 1, 0, 0, 0)] // occurrenceString is never the time, reported
    [InlineData("hepb-birth-dose-counts", 1, 1, 0, 0, 1)] // HepB 3 = birth + 2 and 6 months (HepB counts from birth); DTaP 4, polio 3, Hib 3 from 120
    [InlineData("hepb-without-birth-dose", 1, 1, 0, 0, 0)] // without the birth dose HepB is 2
    [InlineData("hepb-same-date-counted-once", 1, 1, 0, 0, 0)] // HepB 08 and 110 both on 2024-05-01 count once: HepB 2 dates (birth, 2024-05-01)
    [InlineData("vaxelis-series", 1, 1, 0, 0, 1)] // 146 (DTaP-IPV-Hib-HepB) x3 counts for four antigens
    // Exclusions: hospice/palliative; deceased during MP
    [InlineData("hospice-with-full-series", 1, 1, 1, 0, 0)] // excluded; numerator not evaluated
    [InlineData("died-during-period", 1, 1, 1, 0, 0)] // died during MP (after the 2nd birthday)
    // Antigen mapping: one dose of each listed CVX code on top of a distinguishing base (see Evaluate_GapCounts)
    [InlineData("mapping-cvx-03", 1, 1, 0, 0, 0)] // CVX 03: mmr
    [InlineData("mapping-cvx-08", 1, 1, 0, 0, 0)] // CVX 08: hepb
    [InlineData("mapping-cvx-10", 1, 1, 0, 0, 0)] // CVX 10: polio
    [InlineData("mapping-cvx-17", 1, 1, 0, 0, 0)] // CVX 17: hib
    [InlineData("mapping-cvx-20", 1, 1, 0, 0, 0)] // CVX 20: dtap
    [InlineData("mapping-cvx-21", 1, 1, 0, 0, 0)] // CVX 21: varicella
    [InlineData("mapping-cvx-42", 1, 1, 0, 0, 0)] // CVX 42: hepb
    [InlineData("mapping-cvx-44", 1, 1, 0, 0, 0)] // CVX 44: hepb
    [InlineData("mapping-cvx-45", 1, 1, 0, 0, 0)] // CVX 45: hepb
    [InlineData("mapping-cvx-46", 1, 1, 0, 0, 0)] // CVX 46: hib
    [InlineData("mapping-cvx-47", 1, 1, 0, 0, 0)] // CVX 47: hib
    [InlineData("mapping-cvx-48", 1, 1, 0, 0, 0)] // CVX 48: hib
    [InlineData("mapping-cvx-49", 1, 1, 0, 0, 0)] // CVX 49: hib
    [InlineData("mapping-cvx-50", 1, 1, 0, 0, 0)] // CVX 50: dtap, hib
    [InlineData("mapping-cvx-51", 1, 1, 0, 0, 0)] // CVX 51: hib, hepb
    [InlineData("mapping-cvx-89", 1, 1, 0, 0, 0)] // CVX 89: polio
    [InlineData("mapping-cvx-94", 1, 1, 0, 0, 0)] // CVX 94: mmr, varicella
    [InlineData("mapping-cvx-100", 1, 1, 0, 0, 0)] // CVX 100: pcv
    [InlineData("mapping-cvx-106", 1, 1, 0, 0, 0)] // CVX 106: dtap
    [InlineData("mapping-cvx-107", 1, 1, 0, 0, 0)] // CVX 107: dtap
    [InlineData("mapping-cvx-110", 1, 1, 0, 0, 0)] // CVX 110: dtap, polio, hepb
    [InlineData("mapping-cvx-120", 1, 1, 0, 0, 0)] // CVX 120: dtap, polio, hib
    [InlineData("mapping-cvx-130", 1, 1, 0, 0, 0)] // CVX 130: dtap, polio
    [InlineData("mapping-cvx-132", 1, 1, 0, 0, 0)] // CVX 132: dtap, polio, hib, hepb
    [InlineData("mapping-cvx-133", 1, 1, 0, 0, 0)] // CVX 133: pcv
    [InlineData("mapping-cvx-146", 1, 1, 0, 0, 0)] // CVX 146: dtap, polio, hib, hepb
    [InlineData("mapping-cvx-148", 1, 1, 0, 0, 0)] // CVX 148: hib
    [InlineData("mapping-cvx-152", 1, 1, 0, 0, 0)] // CVX 152: pcv
    [InlineData("mapping-cvx-177", 1, 1, 0, 0, 0)] // CVX 177: pcv
    [InlineData("mapping-cvx-215", 1, 1, 0, 0, 0)] // CVX 215: pcv
    [InlineData("mapping-cvx-216", 1, 1, 0, 0, 0)] // CVX 216: pcv
    public void Evaluate_Case(string caseFile, int ip, int den, int dex, int dexcep, int numer, string periodStart = MeasureHarness.DefaultPeriodStart, string periodEnd = MeasureHarness.DefaultPeriodEnd)
    {
        var result = MeasureHarness.Evaluate(MeasureId, caseFile, periodStart, periodEnd);

        Assert.Equal(new CaseCounts(ip, den, dex, dexcep, numer), result.Populations);
    }

    // Shared semantics: no usable time element, an unconvertible unit, a condition ended without a date, a missing or uncertain birthDate are each "reported as a data-quality finding".
    [Theory]
    [InlineData("birthdate-missing", FindingCodes.MissingBirthDate, null)]
    [InlineData("dtap-fourth-occurrence-string", FindingCodes.NoUsableTime, "Immunization/imm-14")]
    public void Evaluate_DataQualityCase(string caseFile, string code, string? resource, string periodStart = MeasureHarness.DefaultPeriodStart, string periodEnd = MeasureHarness.DefaultPeriodEnd)
    {
        var result = MeasureHarness.Evaluate(MeasureId, caseFile, periodStart, periodEnd);

        Assert.Contains(result.Findings, f => f.Code == code && f.Resource == resource);
    }

    // Stratifiers of every measure (shared semantics): age band at periodEnd, administrative gender, payer, primary-care panel;
    // band codes written as in the definition format ("a-b", "a+", "<a").
    [Theory]
    [InlineData("full-series", "age-band", null)] // age bands: none
    [InlineData("full-series", "gender", "female")] // other stratifiers apply
    [InlineData("full-series", "payer", "none")] // no Coverage
    [InlineData("full-series", "panel", "unattributed")] // no generalPractitioner
    public void Evaluate_Stratum(string caseFile, string stratifier, string? expected, string periodStart = MeasureHarness.DefaultPeriodStart, string periodEnd = MeasureHarness.DefaultPeriodEnd)
    {
        var result = MeasureHarness.Evaluate(MeasureId, caseFile, periodStart, periodEnd);

        Assert.Equal(expected, result.Strata.GetValueOrDefault(stratifier));
    }

    // "The gap report lists, per antigen, doses counted and doses missing": (counted, required) per antigen,
    // required = DTaP 4, polio 3, MMR 1, Hib 3, HepB 3, varicella 1, PCV 4 (CDC child schedule, from memory: verify). Sorted, so antigen labels do not matter.
    [Theory]
    [InlineData("no-doses", "0/1 0/1 0/3 0/3 0/3 0/4 0/4")] // nothing given: every antigen missing all doses
    [InlineData("hepb-birth-dose-counts", "1/1 1/1 3/3 3/3 3/3 4/4 4/4")] // every antigen exactly complete (MMRV counts for MMR and varicella)
    [InlineData("hepb-without-birth-dose", "1/1 1/1 2/3 3/3 3/3 4/4 4/4")] // HepB 2 of 3
    [InlineData("pcv-first-dose-day-41", "1/1 1/1 3/3 3/3 3/4 4/3 4/4")] // PCV 3 of 4: the day-41 dose is not counted; HepB 4 (birth + 3 x 110)
    [InlineData("mapping-cvx-03", "0/3 0/4 1/1 1/1 1/3 1/4 2/3")] // CVX 03 counts for mmr
    [InlineData("mapping-cvx-08", "0/1 0/3 0/4 1/1 1/3 1/4 3/3")] // CVX 08 counts for hepb
    [InlineData("mapping-cvx-10", "0/1 0/4 1/1 1/3 1/3 1/4 2/3")] // CVX 10 counts for polio
    [InlineData("mapping-cvx-17", "0/1 0/3 0/4 1/1 1/4 2/3 2/3")] // CVX 17 counts for hib
    [InlineData("mapping-cvx-20", "0/1 0/3 1/1 1/3 1/4 1/4 2/3")] // CVX 20 counts for dtap
    [InlineData("mapping-cvx-21", "0/1 0/3 0/4 1/3 1/4 2/1 2/3")] // CVX 21 counts for varicella
    [InlineData("mapping-cvx-42", "0/1 0/3 0/4 1/1 1/3 1/4 3/3")] // CVX 42 counts for hepb
    [InlineData("mapping-cvx-44", "0/1 0/3 0/4 1/1 1/3 1/4 3/3")] // CVX 44 counts for hepb
    [InlineData("mapping-cvx-45", "0/1 0/3 0/4 1/1 1/3 1/4 3/3")] // CVX 45 counts for hepb
    [InlineData("mapping-cvx-46", "0/1 0/3 0/4 1/1 1/4 2/3 2/3")] // CVX 46 counts for hib
    [InlineData("mapping-cvx-47", "0/1 0/3 0/4 1/1 1/4 2/3 2/3")] // CVX 47 counts for hib
    [InlineData("mapping-cvx-48", "0/1 0/3 0/4 1/1 1/4 2/3 2/3")] // CVX 48 counts for hib
    [InlineData("mapping-cvx-49", "0/1 0/3 0/4 1/1 1/4 2/3 2/3")] // CVX 49 counts for hib
    [InlineData("mapping-cvx-50", "0/1 0/3 1/1 1/4 1/4 2/3 2/3")] // CVX 50 counts for dtap, hib
    [InlineData("mapping-cvx-51", "0/1 0/3 0/4 1/1 1/4 2/3 3/3")] // CVX 51 counts for hib, hepb
    [InlineData("mapping-cvx-89", "0/1 0/4 1/1 1/3 1/3 1/4 2/3")] // CVX 89 counts for polio
    [InlineData("mapping-cvx-94", "0/3 0/4 1/1 1/3 1/4 2/1 2/3")] // CVX 94 counts for mmr, varicella
    [InlineData("mapping-cvx-100", "0/1 0/3 0/4 1/1 1/3 2/3 2/4")] // CVX 100 counts for pcv
    [InlineData("mapping-cvx-106", "0/1 0/3 1/1 1/3 1/4 1/4 2/3")] // CVX 106 counts for dtap
    [InlineData("mapping-cvx-107", "0/1 0/3 1/1 1/3 1/4 1/4 2/3")] // CVX 107 counts for dtap
    [InlineData("mapping-cvx-110", "0/1 1/1 1/3 1/3 1/4 1/4 3/3")] // CVX 110 counts for dtap, polio, hepb
    [InlineData("mapping-cvx-120", "0/1 1/1 1/3 1/4 1/4 2/3 2/3")] // CVX 120 counts for dtap, polio, hib
    [InlineData("mapping-cvx-130", "0/1 1/1 1/3 1/3 1/4 1/4 2/3")] // CVX 130 counts for dtap, polio
    [InlineData("mapping-cvx-132", "0/1 1/1 1/3 1/4 1/4 2/3 3/3")] // CVX 132 counts for dtap, polio, hib, hepb
    [InlineData("mapping-cvx-133", "0/1 0/3 0/4 1/1 1/3 2/3 2/4")] // CVX 133 counts for pcv
    [InlineData("mapping-cvx-146", "0/1 1/1 1/3 1/4 1/4 2/3 3/3")] // CVX 146 counts for dtap, polio, hib, hepb
    [InlineData("mapping-cvx-148", "0/1 0/3 0/4 1/1 1/4 2/3 2/3")] // CVX 148 counts for hib
    [InlineData("mapping-cvx-152", "0/1 0/3 0/4 1/1 1/3 2/3 2/4")] // CVX 152 counts for pcv
    [InlineData("mapping-cvx-177", "0/1 0/3 0/4 1/1 1/3 2/3 2/4")] // CVX 177 counts for pcv
    [InlineData("mapping-cvx-215", "0/1 0/3 0/4 1/1 1/3 2/3 2/4")] // CVX 215 counts for pcv
    [InlineData("mapping-cvx-216", "0/1 0/3 0/4 1/1 1/3 2/3 2/4")] // CVX 216 counts for pcv
    public void Evaluate_GapCounts(string caseFile, string expected)
    {
        var result = MeasureHarness.Evaluate(MeasureId, caseFile);

        Assert.Equal(expected, string.Join(' ', result.Counts.Select(c => $"{c.Counted}/{c.Required}").Order(StringComparer.Ordinal)));
    }
}
