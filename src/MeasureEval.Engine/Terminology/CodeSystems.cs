namespace MeasureEval.Engine;

/// <summary>The code systems value sets may draw from. Anything else is an error in the value set file.</summary>
public static class CodeSystems
{
    public const string Icd10Cm = "http://hl7.org/fhir/sid/icd-10-cm";
    public const string Snomed = "http://snomed.info/sct";
    public const string Loinc = "http://loinc.org";
    public const string Cvx = "http://hl7.org/fhir/sid/cvx";
    public const string Ucum = "http://unitsofmeasure.org";
    public const string ActCode = "http://terminology.hl7.org/CodeSystem/v3-ActCode";
    public const string ActReason = "http://terminology.hl7.org/CodeSystem/v3-ActReason";
    public const string DischargeDisposition = "http://terminology.hl7.org/CodeSystem/discharge-disposition";
    public const string DataAbsentReason = "http://terminology.hl7.org/CodeSystem/data-absent-reason";
    public const string ConditionClinical = "http://terminology.hl7.org/CodeSystem/condition-clinical";
    public const string ConditionVerification = "http://terminology.hl7.org/CodeSystem/condition-ver-status";
    public const string Cpt = "http://www.ama-assn.org/go/cpt";
    public const string Rxnorm = "http://www.nlm.nih.gov/research/umls/rxnorm";

    public static IReadOnlySet<string> Known { get; } = new HashSet<string>(StringComparer.Ordinal)
    {
        Icd10Cm, Snomed, Loinc, Cvx, ActCode, ActReason, DischargeDisposition, DataAbsentReason, Cpt, Rxnorm,
    };
}
