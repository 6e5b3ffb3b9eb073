using Hl7.Fhir.Model;

namespace MeasureEval.Synthetic.Population;

/// <summary>
/// The codes the synthetic records carry: those the measures look for, plus near misses that must not count
/// (O24.*, Z90.49, Z90.711, unilateral mastectomy). Displays are given only where the code's own table was
/// recalled with confidence; SNOMED CT and some LOINC codes are from memory, as in the measure value sets.
/// </summary>
internal static class ClinicalCodes
{
    public const string Snomed = "http://snomed.info/sct";
    public const string Loinc = "http://loinc.org";
    public const string Icd10Cm = "http://hl7.org/fhir/sid/icd-10-cm";
    public const string Cvx = "http://hl7.org/fhir/sid/cvx";
    public const string Ucum = "http://unitsofmeasure.org";
    public const string ActCode = "http://terminology.hl7.org/CodeSystem/v3-ActCode";
    public const string ActReason = "http://terminology.hl7.org/CodeSystem/v3-ActReason";
    public const string ConditionClinical = "http://terminology.hl7.org/CodeSystem/condition-clinical";
    public const string ConditionVerification = "http://terminology.hl7.org/CodeSystem/condition-ver-status";
    public const string ConditionCategory = "http://terminology.hl7.org/CodeSystem/condition-category";
    public const string ObservationCategory = "http://terminology.hl7.org/CodeSystem/observation-category";
    public const string DischargeDisposition = "http://terminology.hl7.org/CodeSystem/discharge-disposition";
    public const string DataAbsentReason = "http://terminology.hl7.org/CodeSystem/data-absent-reason";
    public const string OrganizationType = "http://terminology.hl7.org/CodeSystem/organization-type";
    public const string SubscriberRelationship = "http://terminology.hl7.org/CodeSystem/subscriber-relationship";
    public const string CoverageSelfPay = "http://terminology.hl7.org/CodeSystem/coverage-selfpay";
    public const string DiagnosticServiceSection = "http://terminology.hl7.org/CodeSystem/v2-0074";

    public static CodeableConcept Concept(params Coding[] codings) => new() { Coding = [.. codings] };

    public static Coding Sct(string code, string? display = null) => new(Snomed, code, display);

    public static Coding Lnc(string code, string? display = null) => new(Loinc, code, display);

    public static Coding Icd(string code, string? display = null) => new(Icd10Cm, code, display);

    public static Coding CvxCode(string code) => new(Cvx, code);

    // Conditions (ICD-10-CM displays from the code set's tabular list, from memory).
    public static readonly Coding[] DiabetesType2Icd =
    [
        Icd("E11.9", "Type 2 diabetes mellitus without complications"),
        Icd("E11.65", "Type 2 diabetes mellitus with hyperglycemia"),
        Icd("E11.22", "Type 2 diabetes mellitus with diabetic chronic kidney disease"),
    ];

    public static readonly Coding DiabetesType1Icd = Icd("E10.9", "Type 1 diabetes mellitus without complications");
    public static readonly Coding DiabetesOtherIcd = Icd("E13.9", "Other specified diabetes mellitus without complications");
    public static readonly Coding DiabetesType2Sct = Sct("44054006", "Diabetes mellitus type 2");
    public static readonly Coding DiabetesType1Sct = Sct("46635009", "Diabetes mellitus type 1");
    public static readonly Coding DiabetesSct = Sct("73211009", "Diabetes mellitus");
    public static readonly Coding GestationalDiabetesIcd = Icd("O24.410", "Gestational diabetes mellitus in pregnancy, diet controlled");
    public static readonly Coding HypertensionIcd = Icd("I10", "Essential (primary) hypertension");
    public static readonly Coding HypertensionSct = Sct("59621000", "Essential hypertension");
    public static readonly Coding EsrdIcd = Icd("N18.6", "End stage renal disease");
    public static readonly Coding EsrdSct = Sct("46177005", "End-stage renal disease");
    public static readonly Coding DialysisIcd = Icd("Z99.2", "Dependence on renal dialysis");
    public static readonly Coding KidneyTransplantIcd = Icd("Z94.0", "Kidney transplant status");
    public static readonly Coding Ckd3Icd = Icd("N18.30", "Chronic kidney disease, stage 3 unspecified");

    public static readonly Coding[] PregnancyIcd =
    [
        Icd("Z34.00", "Encounter for supervision of normal first pregnancy, unspecified trimester"),
        Icd("Z34.80", "Encounter for supervision of other normal pregnancy, unspecified trimester"),
        Icd("Z33.1", "Pregnant state, incidental"),
        Icd("Z3A.20", "20 weeks gestation of pregnancy"),
        Icd("O09.90", "Supervision of high risk pregnancy, unspecified, unspecified trimester"),
    ];

    public static readonly Coding PregnancySct = Sct("77386006", "Pregnancy");

    public static readonly Coding[] DepressionIcd =
    [
        Icd("F32.9", "Major depressive disorder, single episode, unspecified"),
        Icd("F32.A", "Depression, unspecified"),
        Icd("F33.1", "Major depressive disorder, recurrent, moderate"),
    ];

    public static readonly Coding BipolarIcd = Icd("F31.9", "Bipolar disorder, unspecified");

    public static readonly Coding[] ColorectalCancerIcd =
    [
        Icd("C18.9", "Malignant neoplasm of colon, unspecified"),
        Icd("C19", "Malignant neoplasm of rectosigmoid junction"),
        Icd("C20", "Malignant neoplasm of rectum"),
    ];

    public static readonly Coding ColonCancerSct = Sct("363406005");
    public static readonly Coding AbsentDigestivePartIcd = Icd("Z90.49", "Acquired absence of other specified parts of digestive tract");
    public static readonly Coding TotalColectomySct = Sct("26390003", "Total colectomy");
    public static readonly Coding BilateralBreastAbsenceIcd = Icd("Z90.13", "Acquired absence of bilateral breasts and nipples");
    public static readonly Coding RightBreastAbsenceIcd = Icd("Z90.11", "Acquired absence of right breast and nipple");
    public static readonly Coding LeftBreastAbsenceIcd = Icd("Z90.12", "Acquired absence of left breast and nipple");
    public static readonly Coding BilateralMastectomySct = Sct("27865001");
    public static readonly Coding CervixUterusAbsenceIcd = Icd("Z90.710", "Acquired absence of both cervix and uterus");
    public static readonly Coding UterusAbsenceWithCervixIcd = Icd("Z90.711", "Acquired absence of uterus with remaining cervical stump");
    public static readonly Coding CervixAbsenceIcd = Icd("Z90.712", "Acquired absence of cervix with remaining uterus");
    public static readonly Coding TotalHysterectomySct = Sct("116140006", "Total hysterectomy");
    public static readonly Coding PalliativeEncounterIcd = Icd("Z51.5", "Encounter for palliative care");
    public static readonly Coding HospiceCareSct = Sct("385763009", "Hospice care");
    public static readonly Coding PalliativeCareSct = Sct("103735009", "Palliative care");

    // Encounter types (SNOMED CT, from memory).
    public static readonly Coding CheckUpSct = Sct("185349003");
    public static readonly Coding FollowUpSct = Sct("390906007");
    public static readonly Coding SymptomVisitSct = Sct("185345009");

    // Screenings.
    public static readonly Coding[] ColonoscopySct = [Sct("73761001", "Colonoscopy"), Sct("444783004")];
    public static readonly Coding[] FecalOccultBloodLoinc = [Lnc("29771-3"), Lnc("57905-2"), Lnc("56490-6"), Lnc("58453-2"), Lnc("2335-8")];
    public static readonly Coding[] StoolDnaLoinc = [Lnc("77353-1"), Lnc("77354-9")];
    public static readonly Coding CtColonographySct = Sct("418714002");
    public static readonly Coding FlexibleSigmoidoscopySct = Sct("44441009");
    public static readonly Coding[] MammographySct = [Sct("71651007", "Mammography"), Sct("24623002", "Screening mammography")];
    public static readonly Coding[] MammographyLoinc = [Lnc("24606-6"), Lnc("26175-0")];
    public static readonly Coding[] CervicalCytologyLoinc = [Lnc("10524-7"), Lnc("18500-9"), Lnc("33717-0")];
    public static readonly Coding[] HpvLoinc = [Lnc("21440-3"), Lnc("30167-1"), Lnc("59420-0"), Lnc("71431-1"), Lnc("77379-6"), Lnc("82675-0")];
    public static readonly Coding Phq9Loinc = Lnc("44261-6");
    public static readonly Coding Phq9AdolescentLoinc = Lnc("89204-2");
    public static readonly Coding Phq2Loinc = Lnc("55758-7");

    public static readonly Coding[] DepressionFollowUpSct =
    [
        Sct("183524004"), // referral to psychiatry service
        Sct("308477009"), // referral to psychologist
        Sct("385724002"), // coping support management
        Sct("410223002"), // mental health care management
    ];

    public static readonly Coding NegativeSct = Sct("260385009", "Negative");
    public static readonly Coding PositiveSct = Sct("10828004", "Positive");

    // Labs and vitals.
    public static readonly Coding[] HbA1cPercentLoinc = [Lnc("4548-4"), Lnc("17856-6"), Lnc("4549-2"), Lnc("17855-8")];
    public static readonly Coding HbA1cIfccLoinc = Lnc("59261-8");
    public static readonly Coding BloodPressurePanelLoinc = Lnc("85354-9");
    public static readonly Coding SystolicLoinc = Lnc("8480-6");
    public static readonly Coding DiastolicLoinc = Lnc("8462-4");

    // Influenza vaccines (CVX, CDC table): those current in recent seasons, and 88 (unspecified formulation).
    public static readonly string[] InfluenzaAdultCvx = ["150", "158", "171", "185", "197", "205", "88", "320", "333"];
    public static readonly string[] InfluenzaPediatricCvx = ["150", "158", "171", "161", "88"];
}
