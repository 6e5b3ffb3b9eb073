using MeasureEval.Engine.Tests.Support;

namespace MeasureEval.Engine.Tests.Measures;

/// <summary>
/// colorectal-cancer-screening cases: one patient per fixture under Cases/colorectal-cancer-screening;
/// expected populations (IP, DEN, DEX, DEXCEP, NUMER) come from the measure spec text, MP 2026 unless stated.
/// </summary>
public sealed class ColorectalCancerScreeningTests
{
    private const string MeasureId = "colorectal-cancer-screening";

    [Theory]
    // Initial population: age 45-75 at periodEnd (USPSTF 2021: 45-49 grade B, 50-75 grade A); age = whole years comparing (month, day)
    [InlineData("age-45-on-period-end", 1, 1, 0, 0, 0)] // turns 45 on periodEnd 2026-12-31
    [InlineData("age-44-on-period-end", 0, 0, 0, 0, 0)] // turns 45 on 2027-01-01, one day after periodEnd
    [InlineData("age-75-on-period-end", 1, 1, 0, 0, 0)] // 75 on periodEnd; turns 76 the next day
    [InlineData("age-76-on-period-end", 0, 0, 0, 0, 0)] // turns 76 on periodEnd
    [InlineData("birthdate-partial-year", 1, 1, 0, 0, 0)] // partial birthDate taken at its first day (1981-01-01): 45; every day of 1981 gives 45, so no uncertainty
    [InlineData("birthdate-missing", 0, 0, 0, 0, 0)] // no birthDate: not in any initial population, flagged (our rule)
    [InlineData("gender-unknown", 1, 1, 0, 0, 0)] // gender restricts only the female-only measures
    [InlineData("gender-female", 1, 1, 0, 0, 0)] // any gender
    // Qualifying encounter: finished, class AMB/VR/HH (v3-ActCode), period.start in MP (shared definition)
    [InlineData("encounter-virtual", 1, 1, 0, 0, 0)] // class VR
    [InlineData("encounter-home-health", 1, 1, 0, 0, 0)] // class HH
    [InlineData("encounter-inpatient-only", 0, 0, 0, 0, 0)] // class IMP is not a qualifying class
    [InlineData("encounter-in-progress", 0, 0, 0, 0, 0)] // status must be finished
    [InlineData("encounter-cancelled", 0, 0, 0, 0, 0)] // status must be finished
    [InlineData("encounter-class-other-system", 0, 0, 0, 0, 0)] // AMB counts only in system v3-ActCode
    [InlineData("encounter-starts-on-period-end", 1, 1, 0, 0, 0)] // starts on the last day of MP
    [InlineData("encounter-starts-next-year", 0, 0, 0, 0, 0)] // starts one day after MP
    [InlineData("encounter-starts-before-period", 0, 0, 0, 0, 0)] // "starts during" uses period.start (2025-12-31), even though the visit overlaps MP
    [InlineData("encounter-start-offset-plus14", 1, 1, 0, 0, 0)] // stated date 2026-01-01 in its own offset (in UTC it would be 2025-12-31)
    [InlineData("encounter-start-offset-minus05", 0, 0, 0, 0, 0)] // stated date 2025-12-31 (in UTC it would be 2026-01-01)
    [InlineData("no-encounter", 0, 0, 0, 0, 0)] // no qualifying encounter
    [InlineData("encounter-without-start", 0, 0, 0, 0, 0)] // period without a start: no usable time for 'starts during', reported
    [InlineData("encounter-start-partial-month", 1, 1, 0, 0, 0)] // partial start 2026-03 lies wholly inside MP
    // Deceased (our rule): before periodStart -> not in IP; during MP -> denominator exclusion
    [InlineData("died-before-period", 0, 0, 0, 0, 0)] // died the day before periodStart
    [InlineData("died-on-period-start", 1, 1, 1, 0, 0)] // died during MP: excluded; numerator not evaluated although a colonoscopy is present
    [InlineData("died-stated-date-on-period-start", 1, 1, 1, 0, 0)] // died on stated date 2026-01-01, during MP (UTC 2025-12-31)
    [InlineData("died-stated-date-before-period", 0, 0, 0, 0, 0)] // died on stated date 2025-12-31, before MP (UTC 2026-01-01)
    [InlineData("deceased-boolean", 0, 0, 0, 0, 0)] // deceasedBoolean true without a date counts as before periodStart
    [InlineData("died-partial-year-before-period", 0, 0, 0, 0, 0)] // died in 2025: wholly before periodStart
    [InlineData("died-partial-month-during-period", 1, 1, 1, 0, 0)] // died in 2026-05: during MP
    // Numerator: colonoscopy (SNOMED CT 73761001, 444783004) during MP or the 9 years before, i.e. from 2017-01-01 (USPSTF 2021, Table 1: every 10 years)
    [InlineData("colonoscopy-first-day-of-window", 1, 1, 0, 0, 1)] // periodStart - 9 years = 2017-01-01, inclusive
    [InlineData("colonoscopy-day-before-window", 1, 1, 0, 0, 0)] // one day before the window
    [InlineData("colonoscopy-window-start-rolls-over", 1, 1, 0, 0, 1, "2028-02-29", "2029-02-28")] // MP from 2028-02-29: - 9 years = 2019-02-29 -> rolls to 2019-03-01, inclusive
    [InlineData("colonoscopy-before-rolled-window-start", 1, 1, 0, 0, 0, "2028-02-29", "2029-02-28")] // MP from 2028-02-29: the window starts 2019-03-01
    [InlineData("colonoscopy-alternate-code", 1, 1, 0, 0, 1)] // 444783004 is listed
    [InlineData("colonoscopy-partial-year-inside", 1, 1, 0, 0, 1)] // partial date 2017 stands for the whole year, which lies inside the window
    [InlineData("colonoscopy-partial-year-outside", 1, 1, 0, 0, 0)] // 2016 lies before the window
    [InlineData("colonoscopy-period-ends-in-window", 1, 1, 0, 0, 1)] // performedPeriod is judged by its end (2017-01-01)
    [InlineData("colonoscopy-not-done", 1, 1, 0, 0, 0)] // not-done never meets a numerator
    [InlineData("colonoscopy-in-progress", 1, 1, 0, 0, 0)] // only completed procedures count
    [InlineData("colonoscopy-entered-in-error", 1, 1, 0, 0, 0)] // entered-in-error never counts
    [InlineData("colonoscopy-performed-string", 1, 1, 0, 0, 0)] // performedString is not a usable time: never qualifies, reported
    [InlineData("colonoscopy-performed-age", 1, 1, 0, 0, 0)] // performedAge is not a usable time for a Procedure, reported
    [InlineData("colonoscopy-performed-range", 1, 1, 0, 0, 0)] // performedRange is not a usable time for a Procedure, reported
    [InlineData("colonoscopy-as-diagnostic-report", 1, 1, 0, 0, 1)] // a screening may arrive as a DiagnosticReport
    [InlineData("colonoscopy-as-observation", 1, 1, 0, 0, 1)] // a screening may arrive as an Observation
    // Numerator: FIT / FOBT (LOINC 29771-3, 57905-2, 56490-6, 56491-4, 58453-2, 2335-8, 14563-1, 14564-9, 14565-6) during MP (USPSTF 2021: yearly; any FOBT counts: common practice)
    [InlineData("fit-first-day-of-period", 1, 1, 0, 0, 1)] // periodStart, inclusive
    [InlineData("fit-last-day-of-period", 1, 1, 0, 0, 1)] // periodEnd, inclusive
    [InlineData("fit-day-before-period", 1, 1, 0, 0, 0)] // one day before MP
    [InlineData("fit-offset-plus14", 1, 1, 0, 0, 1)] // counts on its stated date 2026-01-01, no conversion to UTC
    [InlineData("fit-offset-minus05", 1, 1, 0, 0, 0)] // counts on its stated date 2025-12-31 (UTC would be 2026-01-01)
    [InlineData("fit-effective-instant", 1, 1, 0, 0, 1)] // effectiveInstant is a usable time
    [InlineData("fit-effective-instant-offset-plus14", 1, 1, 0, 0, 1)] // an instant also counts on its stated date, 2026-01-01
    [InlineData("fit-effective-instant-offset-minus05", 1, 1, 0, 0, 0)] // an instant's stated date 2025-12-31 (UTC 2026-01-01)
    [InlineData("fit-effective-period-end-in-period", 1, 1, 0, 0, 1)] // effectivePeriod is judged by its end
    [InlineData("fit-effective-period-start-only", 1, 1, 0, 0, 0)] // without an end, by its start (2025-12-30: outside)
    [InlineData("fit-partial-month-inside", 1, 1, 0, 0, 1)] // 2026-05 lies wholly inside MP
    [InlineData("fit-partial-month-before", 1, 1, 0, 0, 0)] // 2025-12 lies before MP
    [InlineData("fit-partial-year-straddles", 1, 1, 0, 0, 0, "2026-07-01", "2027-06-30")] // MP 2026-07-01..2027-06-30: 2026 straddles periodStart, so it is not in the window
    [InlineData("fit-partial-month-shifted-period", 1, 1, 0, 0, 1, "2026-07-01", "2027-06-30")] // MP 2026-07-01..2027-06-30: 2026-07 lies wholly inside
    [InlineData("fobt-guaiac", 1, 1, 0, 0, 1)] // any FOBT counts (common practice)
    [InlineData("fit-alternate-code", 1, 1, 0, 0, 1)] // 58453-2 is listed
    [InlineData("fit-preliminary", 1, 1, 0, 0, 0)] // only final, amended, corrected Observations count
    [InlineData("fit-amended", 1, 1, 0, 0, 1)] // amended counts
    [InlineData("fit-corrected", 1, 1, 0, 0, 1)] // corrected counts
    [InlineData("fit-entered-in-error", 1, 1, 0, 0, 0)] // entered-in-error never counts
    [InlineData("fit-without-value", 1, 1, 0, 0, 0)] // an Observation counts only with a value[x]
    [InlineData("fit-issued-only", 1, 1, 0, 0, 0)] // issued is never the time: never qualifies, reported
    [InlineData("fit-effective-timing", 1, 1, 0, 0, 0)] // effectiveTiming is never the time: never qualifies, reported
    [InlineData("fit-as-diagnostic-report", 1, 1, 0, 0, 1)] // a screening may arrive as a DiagnosticReport
    [InlineData("fit-report-appended", 1, 1, 0, 0, 1)] // DiagnosticReport appended counts
    [InlineData("fit-report-conclusion-code-only", 1, 1, 0, 0, 1)] // conclusionCode is content
    [InlineData("fit-report-presented-form-only", 1, 1, 0, 0, 1)] // presentedForm is content
    [InlineData("fit-report-without-content", 1, 1, 0, 0, 0)] // a DiagnosticReport counts only with conclusion, conclusionCode, result or presentedForm
    [InlineData("fit-report-preliminary", 1, 1, 0, 0, 0)] // preliminary report does not count
    // Numerator: stool DNA-FIT (LOINC 77353-1, 77354-9) during MP or the 2 years before, from 2024-01-01 (USPSTF 2021: every 1-3 years)
    [InlineData("sdna-first-day-of-window", 1, 1, 0, 0, 1)] // periodStart - 2 years, inclusive
    [InlineData("sdna-day-before-window", 1, 1, 0, 0, 0)] // one day before the window
    [InlineData("sdna-alternate-code", 1, 1, 0, 0, 1)] // 77354-9 is listed
    [InlineData("fit-in-prior-year", 1, 1, 0, 0, 0)] // a FIT from 2025 is outside the FIT window (MP only) even though sDNA would reach back 2 years
    // Numerator: CT colonography (SNOMED CT 418714002) and flexible sigmoidoscopy (44441009) during MP or the 4 years before, from 2022-01-01 (USPSTF 2021: every 5 years)
    [InlineData("ct-colonography-first-day", 1, 1, 0, 0, 1)] // periodStart - 4 years, inclusive
    [InlineData("ct-colonography-day-before", 1, 1, 0, 0, 0)] // one day before the window
    [InlineData("sigmoidoscopy-first-day", 1, 1, 0, 0, 1)] // periodStart - 4 years, inclusive
    [InlineData("sigmoidoscopy-day-before", 1, 1, 0, 0, 0)] // one day before the window
    [InlineData("sigmoidoscopy-as-report", 1, 1, 0, 0, 1)] // arrives as a DiagnosticReport
    // Exclusions: colorectal cancer (ICD-10-CM C18.*, C19, C20; SNOMED CT 363406005, 363414004, 363351006) or total colectomy (26390003), onset/performed on or before periodEnd; an excluded patient is IP, DEN, DEX only
    [InlineData("cancer-c18-with-screening", 1, 1, 1, 0, 0)] // excluded; numerator not evaluated although a colonoscopy is in MP
    [InlineData("cancer-c18-parent-code", 1, 1, 1, 0, 0)] // C18.* includes C18 itself
    [InlineData("cancer-c19", 1, 1, 1, 0, 0)] // C19 listed
    [InlineData("cancer-c20", 1, 1, 1, 0, 0)] // C20 listed
    [InlineData("cancer-c21-not-listed", 1, 1, 0, 0, 0)] // anal cancer C21 is not listed
    [InlineData("history-z90-49-never-counts", 1, 1, 0, 0, 0)] // Z90.49 never counts
    [InlineData("cancer-snomed-colon", 1, 1, 1, 0, 0)] // SNOMED CT 363406005
    [InlineData("cancer-snomed-rectum", 1, 1, 1, 0, 0)] // SNOMED CT 363351006
    [InlineData("cancer-onset-on-period-end", 1, 1, 1, 0, 0)] // onset on or before periodEnd, inclusive
    [InlineData("cancer-onset-after-period", 1, 1, 0, 0, 0)] // onset after periodEnd
    [InlineData("cancer-recorded-date-only", 1, 1, 1, 0, 0)] // recordedDate stands in for a missing onset in an 'on or before' test
    [InlineData("cancer-resolved-history", 1, 1, 1, 0, 0)] // history rules (on or before periodEnd) need only the onset
    [InlineData("cancer-refuted", 1, 1, 0, 0, 0)] // verificationStatus refuted does not count
    [InlineData("cancer-unconfirmed", 1, 1, 0, 0, 0)] // verificationStatus must be confirmed or absent
    [InlineData("cancer-verification-absent", 1, 1, 1, 0, 0)] // absent verificationStatus counts
    [InlineData("colectomy", 1, 1, 1, 0, 0)] // total colectomy performed before periodEnd
    [InlineData("colectomy-not-done", 1, 1, 0, 0, 0)] // a not-done colectomy was not performed
    // Hospice or palliative care during MP (shared definition; exclusion of every measure)
    [InlineData("hospice-discharge", 1, 1, 1, 0, 0)] // discharged to hospice, period ends in MP; numerator not evaluated
    [InlineData("hospice-discharge-ended-before-period", 1, 1, 0, 0, 0)] // period ended before MP
    [InlineData("hospice-discharge-ends-after-period", 1, 1, 0, 0, 0)] // period must end in MP
    [InlineData("hospice-discharge-ends-stated-date-in-period", 1, 1, 1, 0, 0)] // period end's stated date 2026-12-31 is in MP (UTC would be 2027-01-01)
    [InlineData("hospice-discharge-ends-stated-date-after-period", 1, 1, 0, 0, 0)] // period end's stated date 2027-01-01 is after MP (UTC would be 2026-12-31)
    [InlineData("hospice-discharge-cancelled", 1, 1, 0, 0, 0)] // a cancelled encounter does not count
    [InlineData("hospice-discharge-planned", 1, 1, 0, 0, 0)] // a planned encounter does not count
    [InlineData("hospice-discharge-in-progress", 1, 1, 1, 0, 0)] // any status but planned, cancelled, entered-in-error: in-progress counts
    [InlineData("hospice-discharge-other-disposition", 1, 1, 0, 0, 0)] // only disposition hosp
    [InlineData("hospice-encounter-type", 1, 1, 1, 0, 0)] // Encounter type 385763009 (hospice care) overlapping MP
    [InlineData("palliative-procedure-in-progress", 1, 1, 1, 0, 0)] // Procedure 103735009 in-progress, overlapping MP
    [InlineData("hospice-procedure-before-period", 1, 1, 0, 0, 0)] // must overlap MP
    [InlineData("hospice-service-request", 1, 1, 1, 0, 0)] // ServiceRequest active, intent order
    [InlineData("hospice-service-request-before-period", 1, 1, 0, 0, 0)] // authoredOn 2025-12-31: not during MP
    [InlineData("hospice-service-request-draft", 1, 1, 0, 0, 0)] // ServiceRequest must be active or completed
    [InlineData("hospice-service-request-proposal", 1, 1, 0, 0, 0)] // intent proposal is neither order (or a child) nor plan
    [InlineData("hospice-service-request-original-order", 1, 1, 1, 0, 0)] // original-order is a child intent of order
    [InlineData("hospice-service-request-plan", 1, 1, 1, 0, 0)] // completed, intent plan
    [InlineData("palliative-condition-z51-5", 1, 1, 1, 0, 0)] // Condition Z51.5 overlapping MP
    [InlineData("palliative-condition-ongoing-from-before", 1, 1, 1, 0, 0)] // onset before MP, no abatement, active: overlaps
    [InlineData("hospice-procedure-period-ends-in-period", 1, 1, 1, 0, 0)] // completed hospice care ending in MP
    [InlineData("palliative-condition-abated-before-period", 1, 1, 0, 0, 0)] // abated the day before MP: no overlap
    [InlineData("palliative-condition-abated-on-period-start", 1, 1, 1, 0, 0)] // abatement >= window start: overlaps
    [InlineData("palliative-condition-inactive-no-abatement", 1, 1, 0, 0, 0)] // inactive without abatement does not count, reported (no end date)
    // Every listed code, one case each (value sets as the spec lists them)
    [InlineData("fobt-code-57905-2", 1, 1, 0, 0, 1)] // FOBT LOINC 57905-2 listed
    [InlineData("fobt-code-56490-6", 1, 1, 0, 0, 1)] // FOBT LOINC 56490-6 listed
    [InlineData("fobt-code-56491-4", 1, 1, 0, 0, 1)] // FOBT LOINC 56491-4 listed
    [InlineData("fobt-code-14563-1", 1, 1, 0, 0, 1)] // FOBT LOINC 14563-1 listed
    [InlineData("fobt-code-14564-9", 1, 1, 0, 0, 1)] // FOBT LOINC 14564-9 listed
    [InlineData("fobt-code-14565-6", 1, 1, 0, 0, 1)] // FOBT LOINC 14565-6 listed
    [InlineData("cancer-snomed-rectosigmoid", 1, 1, 1, 0, 0)] // SNOMED CT 363414004
    // Stratifier cases: payer (a Coverage counts if active, beneficiary the patient, period overlapping MP - none: all of MP; several: active on periodEnd, then lowest order, then lowest id: our rule; Patient/RelatedPerson payor = self-pay; none = none) and primary-care panel (first generalPractitioner; none = unattributed)
    [InlineData("age-49-band-edge", 1, 1, 0, 0, 0)] // 49 on periodEnd
    [InlineData("age-50-band-edge", 1, 1, 0, 0, 0)] // 50 on periodEnd
    [InlineData("age-64-band-edge", 1, 1, 0, 0, 0)] // 64 on periodEnd
    [InlineData("age-65-band-edge", 1, 1, 0, 0, 0)] // 65 on periodEnd
    [InlineData("payer-organization", 1, 1, 0, 0, 0)] // one active Coverage
    [InlineData("payer-without-period", 1, 1, 0, 0, 0)] // no period: all of MP
    [InlineData("payer-self-pay-patient", 1, 1, 0, 0, 0)] // payor is the Patient
    [InlineData("payer-self-pay-related-person", 1, 1, 0, 0, 0)] // payor is a RelatedPerson
    [InlineData("payer-cancelled", 1, 1, 0, 0, 0)] // status must be active
    [InlineData("payer-period-before-period", 1, 1, 0, 0, 0)] // period does not overlap MP
    [InlineData("payer-ended-mid-period", 1, 1, 0, 0, 0)] // overlaps MP though not active on periodEnd
    [InlineData("payer-lowest-order", 1, 1, 0, 0, 0)] // both active on periodEnd: lowest order
    [InlineData("payer-active-on-period-end-first", 1, 1, 0, 0, 0)] // the Coverage active on periodEnd wins over a lower order
    [InlineData("payer-lowest-id", 1, 1, 0, 0, 0)] // same order: lowest id (cov-a)
    [InlineData("panel-first-practitioner", 1, 1, 0, 0, 0)] // first generalPractitioner reference
    public void Evaluate_Case(string caseFile, int ip, int den, int dex, int dexcep, int numer, string periodStart = MeasureHarness.DefaultPeriodStart, string periodEnd = MeasureHarness.DefaultPeriodEnd)
    {
        var result = MeasureHarness.Evaluate(MeasureId, caseFile, periodStart, periodEnd);

        Assert.Equal(new CaseCounts(ip, den, dex, dexcep, numer), result.Populations);
    }

    // Shared semantics: no usable time element, an unconvertible unit, a condition ended without a date, a missing or uncertain birthDate are each "reported as a data-quality finding".
    [Theory]
    [InlineData("birthdate-missing", FindingCodes.MissingBirthDate, null)]
    [InlineData("encounter-without-start", FindingCodes.NoUsableTime, "Encounter/enc-1")]
    [InlineData("colonoscopy-performed-string", FindingCodes.NoUsableTime, "Procedure/proc-1")]
    [InlineData("colonoscopy-performed-age", FindingCodes.NoUsableTime, "Procedure/proc-1")]
    [InlineData("colonoscopy-performed-range", FindingCodes.NoUsableTime, "Procedure/proc-1")]
    [InlineData("fit-issued-only", FindingCodes.NoUsableTime, "Observation/obs-1")]
    [InlineData("fit-effective-timing", FindingCodes.NoUsableTime, "Observation/obs-1")]
    [InlineData("palliative-condition-inactive-no-abatement", FindingCodes.ConditionNoEndDate, "Condition/cond-1")]
    public void Evaluate_DataQualityCase(string caseFile, string code, string? resource, string periodStart = MeasureHarness.DefaultPeriodStart, string periodEnd = MeasureHarness.DefaultPeriodEnd)
    {
        var result = MeasureHarness.Evaluate(MeasureId, caseFile, periodStart, periodEnd);

        Assert.Contains(result.Findings, f => f.Code == code && f.Resource == resource);
    }

    // Stratifiers of every measure (shared semantics): age band at periodEnd, administrative gender, payer, primary-care panel;
    // band codes written as in the definition format ("a-b", "a+", "<a").
    [Theory]
    [InlineData("age-45-on-period-end", "age-band", "45-49")] // 45 on periodEnd
    [InlineData("age-75-on-period-end", "age-band", "65-75")] // 75
    [InlineData("gender-unknown", "gender", "unknown")] // administrative gender as stated
    [InlineData("gender-female", "gender", "female")] // administrative gender as stated
    [InlineData("fit-first-day-of-period", "payer", "none")] // no Coverage at all
    [InlineData("fit-first-day-of-period", "panel", "unattributed")] // no generalPractitioner
    [InlineData("fit-first-day-of-period", "gender", "male")] // as stated
    [InlineData("age-49-band-edge", "age-band", "45-49")] // 49
    [InlineData("age-50-band-edge", "age-band", "50-64")] // 50
    [InlineData("age-64-band-edge", "age-band", "50-64")] // 64
    [InlineData("age-65-band-edge", "age-band", "65-75")] // 65
    [InlineData("payer-organization", "payer", "Organization/cedar-valley-health-plan")] // the payor reference
    [InlineData("payer-without-period", "payer", "Organization/cedar-valley-health-plan")] // no period: all of MP
    [InlineData("payer-self-pay-patient", "payer", "self-pay")] // payor is a Patient
    [InlineData("payer-self-pay-related-person", "payer", "self-pay")] // payor is a RelatedPerson
    [InlineData("payer-cancelled", "payer", "none")] // no Coverage counts
    [InlineData("payer-period-before-period", "payer", "none")] // no Coverage counts
    [InlineData("payer-ended-mid-period", "payer", "Organization/cedar-valley-health-plan")] // the only Coverage that counts
    [InlineData("payer-lowest-order", "payer", "Organization/pinecrest-mutual")] // order 1
    [InlineData("payer-active-on-period-end-first", "payer", "Organization/pinecrest-mutual")] // active on periodEnd
    [InlineData("payer-lowest-id", "payer", "Organization/cedar-valley-health-plan")] // cov-a < cov-b
    [InlineData("panel-first-practitioner", "panel", "Practitioner/dr-amara-osei")] // the first reference
    public void Evaluate_Stratum(string caseFile, string stratifier, string? expected, string periodStart = MeasureHarness.DefaultPeriodStart, string periodEnd = MeasureHarness.DefaultPeriodEnd)
    {
        var result = MeasureHarness.Evaluate(MeasureId, caseFile, periodStart, periodEnd);

        Assert.Equal(expected, result.Strata.GetValueOrDefault(stratifier));
    }
}
