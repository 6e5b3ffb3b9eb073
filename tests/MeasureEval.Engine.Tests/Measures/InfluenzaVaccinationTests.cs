using MeasureEval.Engine.Tests.Support;

namespace MeasureEval.Engine.Tests.Measures;

/// <summary>
/// influenza-vaccination cases: one patient per fixture under Cases/influenza-vaccination;
/// expected populations (IP, DEN, DEX, DEXCEP, NUMER) come from the measure spec text, MP 2026 unless stated.
/// </summary>
public sealed class InfluenzaVaccinationTests
{
    private const string MeasureId = "influenza-vaccination";

    [Theory]
    // Initial population: age >= 6 months at periodStart (birthDate + 6 calendar months <= periodStart; missing day rolls to the next 1st: our rule), qualifying encounter
    [InlineData("age-6-months-on-period-start", 1, 1, 0, 0, 0)] // 2025-07-01 + 6 months = 2026-01-01
    [InlineData("age-6-months-day-after-period-start", 0, 0, 0, 0, 0)] // 2025-07-02 + 6 months = 2026-01-02 > periodStart
    [InlineData("age-6-months-rolls-over-before", 0, 0, 0, 0, 0, "2026-02-28", "2027-02-27")] // 2025-08-31 + 6 months = 2026-02-31 -> 2026-03-01 > periodStart 2026-02-28
    [InlineData("age-6-months-rolls-over-on", 1, 1, 0, 0, 0, "2026-03-01", "2027-02-28")] // 2025-08-31 + 6 months -> 2026-03-01 = periodStart
    [InlineData("birthdate-partial-month-uncertain", 1, 1, 0, 0, 0)] // taken at 2025-07-01: 6 months on periodStart; a later July birth would not be, so flagged
    [InlineData("no-encounter", 0, 0, 0, 0, 0)] // qualifying encounter required
    // Numerator: Immunization that counts, CVX influenza group (CDC CVX table), during MP or the 5 months before (from 2025-08-01: our rule), given at age >= 6 months
    [InlineData("vaccine-first-day-of-window", 1, 1, 0, 0, 1)] // periodStart - 5 months = 2025-08-01, inclusive
    [InlineData("vaccine-day-before-window", 1, 1, 0, 0, 0)] // one day before the window
    [InlineData("vaccine-on-period-end", 1, 1, 0, 0, 1)] // periodEnd inclusive
    [InlineData("vaccine-after-period", 1, 1, 0, 0, 0)] // after periodEnd
    [InlineData("vaccine-offset-plus14", 1, 1, 0, 0, 1)] // stated date 2025-08-01 (UTC would be 2025-07-31)
    [InlineData("vaccine-offset-minus05", 1, 1, 0, 0, 0)] // stated date 2025-07-31 (UTC would be 2025-08-01)
    [InlineData("vaccine-partial-month-inside", 1, 1, 0, 0, 1)] // 2025-08 lies wholly inside the window
    [InlineData("vaccine-partial-year-straddles", 1, 1, 0, 0, 0)] // 2025 straddles the window start 2025-08-01
    [InlineData("vaccine-cvx-88", 1, 1, 0, 0, 1)] // CVX 88 (unspecified formulation) in the group
    [InlineData("vaccine-cvx-141", 1, 1, 0, 0, 1)] // CVX 141 in the group
    [InlineData("vaccine-cvx-333", 1, 1, 0, 0, 1)] // CVX 333 in the group
    [InlineData("vaccine-not-influenza", 1, 1, 0, 0, 0)] // CVX 03 (MMR) is not an influenza vaccine
    [InlineData("vaccine-subpotent", 1, 1, 0, 0, 0)] // isSubpotent = true does not count
    [InlineData("vaccine-not-subpotent-explicit", 1, 1, 0, 0, 1)] // isSubpotent = false counts
    [InlineData("vaccine-entered-in-error", 1, 1, 0, 0, 0)] // entered-in-error never counts
    [InlineData("vaccine-occurrence-string", 1, 1, 0, 0, 0)] // occurrenceString is never the time, reported
    [InlineData("infant-dose-before-6-months", 1, 1, 0, 0, 0)] // given at 5 months (6 months reached 2026-01-01): not counted
    [InlineData("infant-dose-at-6-months", 1, 1, 0, 0, 1)] // given on the day the infant turns 6 months
    // Exception: Immunization not-done, influenza CVX, same window, statusReason (v3 ActReason) PATOBJ, MEDPREC or OSTOCK; only when not in the numerator
    [InlineData("not-done-patient-objection", 1, 1, 0, 1, 0)] // PATOBJ
    [InlineData("not-done-medical-precaution", 1, 1, 0, 1, 0)] // MEDPREC
    [InlineData("not-done-out-of-stock", 1, 1, 0, 1, 0)] // OSTOCK
    [InlineData("not-done-at-window-start", 1, 1, 0, 1, 0)] // same window as the numerator, from 2025-08-01
    [InlineData("not-done-before-window", 1, 1, 0, 0, 0)] // outside the window
    [InlineData("not-done-other-reason", 1, 1, 0, 0, 0)] // IMMUNE is not one of the three reasons
    [InlineData("not-done-without-reason", 1, 1, 0, 0, 0)] // no statusReason
    [InlineData("not-done-other-vaccine", 1, 1, 0, 0, 0)] // vaccine must be of the influenza group
    [InlineData("not-done-and-vaccinated", 1, 1, 0, 0, 1)] // in the numerator: exception not considered
    [InlineData("not-done-but-excluded", 1, 1, 1, 0, 0)] // excluded: exception not evaluated
    // Exclusions: hospice/palliative; deceased during MP (our rule)
    [InlineData("hospice-discharge-with-vaccine", 1, 1, 1, 0, 0)] // excluded; numerator not evaluated
    [InlineData("died-during-period", 1, 1, 1, 0, 0)] // died during MP
    [InlineData("age-17-on-period-end", 1, 1, 0, 0, 0)] // 17 on periodEnd
    [InlineData("age-18-on-period-end", 1, 1, 0, 0, 0)] // 18 on periodEnd
    [InlineData("age-64-on-period-end", 1, 1, 0, 0, 0)] // 64 on periodEnd
    [InlineData("age-65-on-period-end", 1, 1, 0, 0, 0)] // 65 on periodEnd
    // Every CVX code of the influenza group, one case each (CDC CVX table)
    [InlineData("vaccine-cvx-15", 1, 1, 0, 0, 1)] // CVX 15 in the group
    [InlineData("vaccine-cvx-16", 1, 1, 0, 0, 1)] // CVX 16 in the group
    [InlineData("vaccine-cvx-111", 1, 1, 0, 0, 1)] // CVX 111 in the group
    [InlineData("vaccine-cvx-135", 1, 1, 0, 0, 1)] // CVX 135 in the group
    [InlineData("vaccine-cvx-140", 1, 1, 0, 0, 1)] // CVX 140 in the group
    [InlineData("vaccine-cvx-144", 1, 1, 0, 0, 1)] // CVX 144 in the group
    [InlineData("vaccine-cvx-149", 1, 1, 0, 0, 1)] // CVX 149 in the group
    [InlineData("vaccine-cvx-150", 1, 1, 0, 0, 1)] // CVX 150 in the group
    [InlineData("vaccine-cvx-151", 1, 1, 0, 0, 1)] // CVX 151 in the group
    [InlineData("vaccine-cvx-153", 1, 1, 0, 0, 1)] // CVX 153 in the group
    [InlineData("vaccine-cvx-155", 1, 1, 0, 0, 1)] // CVX 155 in the group
    [InlineData("vaccine-cvx-158", 1, 1, 0, 0, 1)] // CVX 158 in the group
    [InlineData("vaccine-cvx-161", 1, 1, 0, 0, 1)] // CVX 161 in the group
    [InlineData("vaccine-cvx-166", 1, 1, 0, 0, 1)] // CVX 166 in the group
    [InlineData("vaccine-cvx-168", 1, 1, 0, 0, 1)] // CVX 168 in the group
    [InlineData("vaccine-cvx-171", 1, 1, 0, 0, 1)] // CVX 171 in the group
    [InlineData("vaccine-cvx-185", 1, 1, 0, 0, 1)] // CVX 185 in the group
    [InlineData("vaccine-cvx-186", 1, 1, 0, 0, 1)] // CVX 186 in the group
    [InlineData("vaccine-cvx-194", 1, 1, 0, 0, 1)] // CVX 194 in the group
    [InlineData("vaccine-cvx-197", 1, 1, 0, 0, 1)] // CVX 197 in the group
    [InlineData("vaccine-cvx-200", 1, 1, 0, 0, 1)] // CVX 200 in the group
    [InlineData("vaccine-cvx-201", 1, 1, 0, 0, 1)] // CVX 201 in the group
    [InlineData("vaccine-cvx-202", 1, 1, 0, 0, 1)] // CVX 202 in the group
    [InlineData("vaccine-cvx-205", 1, 1, 0, 0, 1)] // CVX 205 in the group
    [InlineData("vaccine-cvx-231", 1, 1, 0, 0, 1)] // CVX 231 in the group
    [InlineData("vaccine-cvx-320", 1, 1, 0, 0, 1)] // CVX 320 in the group
    [InlineData("vaccine-cvx-331", 1, 1, 0, 0, 1)] // CVX 331 in the group
    public void Evaluate_Case(string caseFile, int ip, int den, int dex, int dexcep, int numer, string periodStart = MeasureHarness.DefaultPeriodStart, string periodEnd = MeasureHarness.DefaultPeriodEnd)
    {
        var result = MeasureHarness.Evaluate(MeasureId, caseFile, periodStart, periodEnd);

        Assert.Equal(new CaseCounts(ip, den, dex, dexcep, numer), result.Populations);
    }

    // Shared semantics: no usable time element, an unconvertible unit, a condition ended without a date, a missing or uncertain birthDate are each "reported as a data-quality finding".
    [Theory]
    [InlineData("birthdate-partial-month-uncertain", FindingCodes.PartialBirthDate, null)]
    [InlineData("vaccine-occurrence-string", FindingCodes.NoUsableTime, "Immunization/imm-1")]
    public void Evaluate_DataQualityCase(string caseFile, string code, string? resource, string periodStart = MeasureHarness.DefaultPeriodStart, string periodEnd = MeasureHarness.DefaultPeriodEnd)
    {
        var result = MeasureHarness.Evaluate(MeasureId, caseFile, periodStart, periodEnd);

        Assert.Contains(result.Findings, f => f.Code == code && f.Resource == resource);
    }

    // Stratifiers of every measure (shared semantics): age band at periodEnd, administrative gender, payer, primary-care panel;
    // band codes written as in the definition format ("a-b", "a+", "<a").
    [Theory]
    [InlineData("age-6-months-on-period-start", "age-band", "<18")] // infant: under 18
    [InlineData("age-17-on-period-end", "age-band", "<18")] // 17
    [InlineData("age-18-on-period-end", "age-band", "18-64")] // 18
    [InlineData("age-64-on-period-end", "age-band", "18-64")] // 64
    [InlineData("age-65-on-period-end", "age-band", "65+")] // 65
    public void Evaluate_Stratum(string caseFile, string stratifier, string? expected, string periodStart = MeasureHarness.DefaultPeriodStart, string periodEnd = MeasureHarness.DefaultPeriodEnd)
    {
        var result = MeasureHarness.Evaluate(MeasureId, caseFile, periodStart, periodEnd);

        Assert.Equal(expected, result.Strata.GetValueOrDefault(stratifier));
    }
}
