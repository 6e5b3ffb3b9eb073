namespace MeasureEval.Core.Index;

/// <summary>
/// Everything measure evaluation needs about one patient, extracted at write time so that
/// evaluation never re-parses stored JSON. Values are kept as the resource states them
/// (raw FHIR date strings, unconverted quantities): the engine owns the clinical semantics.
/// </summary>
public sealed record PatientFacts
{
    public required string PatientId { get; init; }

    /// <summary>Null when only resources that point at the patient are stored, not the Patient itself.</summary>
    public Demographics? Demographics { get; init; }

    public IReadOnlyList<ClinicalFact> Facts { get; init; } = [];

    public IReadOnlyList<CoverageFact> Coverages { get; init; } = [];
}

public sealed record Demographics
{
    /// <summary>Patient.birthDate as stated (may be partial: "2008" or "2008-02").</summary>
    public string? BirthDate { get; init; }

    public string? Gender { get; init; }

    public bool? DeceasedBoolean { get; init; }

    /// <summary>Patient.deceasedDateTime as stated.</summary>
    public string? DeceasedDateTime { get; init; }

    /// <summary>The first Patient.generalPractitioner reference ("Practitioner/x", "Organization/y"), as written.</summary>
    public string? GeneralPractitioner { get; init; }

    public bool? Active { get; init; }
}

public sealed record CoverageFact
{
    public required string Id { get; init; }

    public string? Status { get; init; }

    /// <summary>Coverage.payor references as written ("Organization/x", "Patient/y", "RelatedPerson/z").</summary>
    public IReadOnlyList<string> Payors { get; init; } = [];

    public string? PeriodStart { get; init; }

    public string? PeriodEnd { get; init; }

    public int? Order { get; init; }
}

/// <summary>One clinical resource of a patient, reduced to the elements measures read.</summary>
public sealed record ClinicalFact
{
    public required string ResourceType { get; init; }

    public required string Id { get; init; }

    public string? VersionId { get; init; }

    /// <summary>The resource's status element (Condition has none: see <see cref="ClinicalStatus"/>).</summary>
    public string? Status { get; init; }

    /// <summary>
    /// The resource's main code: Observation/DiagnosticReport/Procedure/ServiceRequest/Condition.code,
    /// Immunization.vaccineCode, MedicationRequest.medicationCodeableConcept, Encounter.type (all of them).
    /// </summary>
    public IReadOnlyList<FactCoding> Codes { get; init; } = [];

    /// <summary>
    /// The time element the type is judged by: Observation/DiagnosticReport effective[x],
    /// Procedure performed[x], Immunization occurrence[x], Encounter.period,
    /// ServiceRequest/MedicationRequest authoredOn, Condition onset[x].
    /// </summary>
    public FactTime? Time { get; init; }

    /// <summary>Condition.abatement[x].</summary>
    public FactTime? Abatement { get; init; }

    /// <summary>Condition.recordedDate as stated.</summary>
    public string? RecordedDate { get; init; }

    /// <summary>Condition.clinicalStatus codes.</summary>
    public IReadOnlyList<FactCoding> ClinicalStatus { get; init; } = [];

    /// <summary>Condition.verificationStatus codes.</summary>
    public IReadOnlyList<FactCoding> VerificationStatus { get; init; } = [];

    /// <summary>ServiceRequest/MedicationRequest.intent.</summary>
    public string? Intent { get; init; }

    /// <summary>Encounter.class.</summary>
    public FactCoding? EncounterClass { get; init; }

    /// <summary>Encounter.hospitalization.dischargeDisposition codes.</summary>
    public IReadOnlyList<FactCoding> DischargeDisposition { get; init; } = [];

    /// <summary>Immunization.isSubpotent.</summary>
    public bool? IsSubpotent { get; init; }

    /// <summary>Immunization/Procedure.statusReason codes.</summary>
    public IReadOnlyList<FactCoding> StatusReason { get; init; } = [];

    /// <summary>Observation.dataAbsentReason codes.</summary>
    public IReadOnlyList<FactCoding> DataAbsentReason { get; init; } = [];

    /// <summary>True when the resource carries any value[x] (Observation) or any content (DiagnosticReport conclusion, conclusionCode, result, presentedForm).</summary>
    public bool HasValue { get; init; }

    /// <summary>Observation.valueQuantity.</summary>
    public FactQuantity? Quantity { get; init; }

    /// <summary>Observation.valueCodeableConcept codes, or DiagnosticReport.conclusionCode codes.</summary>
    public IReadOnlyList<FactCoding> ValueCodes { get; init; } = [];

    /// <summary>Observation.component entries.</summary>
    public IReadOnlyList<FactComponent> Components { get; init; } = [];
}

public sealed record FactCoding(string? System, string? Code);

public sealed record FactQuantity(decimal? Value, string? Comparator, string? Unit, string? System, string? Code);

public sealed record FactComponent
{
    public IReadOnlyList<FactCoding> Codes { get; init; } = [];

    public FactQuantity? Quantity { get; init; }

    public IReadOnlyList<FactCoding> DataAbsentReason { get; init; } = [];
}

/// <summary>Which choice of a [x] time element the resource used.</summary>
public enum TimeKind
{
    DateTime,
    Instant,
    Period,
    Age,
    Range,
    /// <summary>A choice the measures never use for time (Timing, string): kept so the engine can report it.</summary>
    Unusable,
}

/// <summary>
/// A time element as stated. DateTime/Instant: <see cref="Start"/>. Period: <see cref="Start"/> and/or <see cref="End"/>.
/// Age: <see cref="Low"/>. Range: <see cref="Low"/> and/or <see cref="High"/>.
/// </summary>
public sealed record FactTime(TimeKind Kind, string? Start = null, string? End = null, FactQuantity? Low = null, FactQuantity? High = null);
