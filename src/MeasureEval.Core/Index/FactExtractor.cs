using Hl7.Fhir.Model;

namespace MeasureEval.Core.Index;

/// <summary>What one resource contributes to its patient's index entry.</summary>
public abstract record IndexContribution(string PatientId);

public sealed record DemographicsContribution(string PatientId, Demographics Demographics) : IndexContribution(PatientId);

public sealed record ClinicalContribution(string PatientId, ClinicalFact Fact) : IndexContribution(PatientId);

public sealed record CoverageContribution(string PatientId, CoverageFact Coverage) : IndexContribution(PatientId);

/// <summary>
/// Reduces a stored resource to the facts that measure evaluation reads. Pure and thread-safe:
/// storage calls it at write time, and tests and the batch command call it on bundles in memory.
/// </summary>
public static class FactExtractor
{
    /// <summary>The resource types that live in a patient's index entry.</summary>
    public static readonly IReadOnlySet<string> IndexedTypes = new HashSet<string>(StringComparer.Ordinal)
    {
        "Patient", "Coverage", "Observation", "DiagnosticReport", "Procedure", "Immunization",
        "Encounter", "Condition", "ServiceRequest", "MedicationRequest",
    };

    /// <summary>
    /// Returns false when the resource is of a type that is not indexed or names no patient
    /// (a subject that is a Group or a Device, say).
    /// </summary>
    public static bool TryExtract(Resource resource, out IndexContribution? contribution)
    {
        ArgumentNullException.ThrowIfNull(resource);
        contribution = resource switch
        {
            Patient p when p.Id is { } patientId => new DemographicsContribution(patientId, FromPatient(p)),
            Coverage c => PatientIdOf(c.Beneficiary) is { } pid && c.Id is { } coverageId ? new CoverageContribution(pid, FromCoverage(c, coverageId)) : null,
            _ => PatientIdOf(SubjectOf(resource)) is { } pid && resource.Id is { } rid && FromClinical(resource, rid) is { } fact
                ? new ClinicalContribution(pid, fact)
                : null,
        };
        return contribution is not null;
    }

    /// <summary>The patient id a reference points at ("Patient/123", an absolute URL ending so, or null).</summary>
    public static string? PatientIdOf(ResourceReference? reference) => IdOf(reference, "Patient");

    /// <summary>
    /// The id a reference to <paramref name="resourceType"/> points at: "Type/123", an absolute URL ending so, or a
    /// versioned form of either; null for other types, contained (#) and logical-only references.
    /// </summary>
    public static string? IdOf(ResourceReference? reference, string resourceType)
    {
        ArgumentException.ThrowIfNullOrEmpty(resourceType);
        var text = reference?.Reference;
        if (string.IsNullOrEmpty(text))
        {
            return null;
        }

        var historyAt = text.IndexOf("/_history/", StringComparison.Ordinal);
        if (historyAt >= 0)
        {
            text = text[..historyAt];
        }

        var prefix = resourceType + "/";
        var marker = text.LastIndexOf(prefix, StringComparison.Ordinal);
        if (marker < 0 || (marker > 0 && text[marker - 1] != '/'))
        {
            return null;
        }

        var id = text[(marker + prefix.Length)..];
        return id.Length == 0 || id.Contains('/', StringComparison.Ordinal) ? null : id;
    }

    private static ResourceReference? SubjectOf(Resource resource) => resource switch
    {
        Observation o => o.Subject,
        DiagnosticReport d => d.Subject,
        Procedure p => p.Subject,
        Immunization i => i.Patient,
        Encounter e => e.Subject,
        Condition c => c.Subject,
        ServiceRequest s => s.Subject,
        MedicationRequest m => m.Subject,
        _ => null,
    };

    private static Demographics FromPatient(Patient p) => new()
    {
        BirthDate = p.BirthDate,
        Gender = p.GenderElement?.JsonValue as string ?? p.Gender?.ToString().ToLowerInvariant(),
        DeceasedBoolean = (p.Deceased as FhirBoolean)?.Value,
        DeceasedDateTime = (p.Deceased as FhirDateTime)?.Value,
        GeneralPractitioner = p.GeneralPractitioner.FirstOrDefault()?.Reference,
        Active = p.Active,
    };

    private static CoverageFact FromCoverage(Coverage c, string id) => new()
    {
        Id = id,
        Status = LiteralOf(c.StatusElement),
        Payors = [.. c.Payor.Select(r => r.Reference).OfType<string>()],
        PeriodStart = c.Period?.Start,
        PeriodEnd = c.Period?.End,
        Order = c.Order,
    };

    private static ClinicalFact? FromClinical(Resource resource, string id) => resource switch
    {
        Observation o => new ClinicalFact
        {
            ResourceType = "Observation",
            Id = id,
            VersionId = o.Meta?.VersionId,
            Status = LiteralOf(o.StatusElement),
            Codes = Codings(o.Code),
            Time = TimeOf(o.Effective),
            DataAbsentReason = Codings(o.DataAbsentReason),
            HasValue = o.Value is not null,
            Quantity = QuantityOf(o.Value as Quantity) ?? IntegerQuantity(o.Value as Integer),
            ValueCodes = Codings(o.Value as CodeableConcept),
            Components = [.. o.Component.Select(c => new FactComponent
            {
                Codes = Codings(c.Code),
                Quantity = QuantityOf(c.Value as Quantity),
                DataAbsentReason = Codings(c.DataAbsentReason),
            })],
        },
        DiagnosticReport d => new ClinicalFact
        {
            ResourceType = "DiagnosticReport",
            Id = id,
            VersionId = d.Meta?.VersionId,
            Status = LiteralOf(d.StatusElement),
            Codes = Codings(d.Code),
            Time = TimeOf(d.Effective),
            HasValue = !string.IsNullOrWhiteSpace(d.Conclusion) || d.ConclusionCode.Count > 0 || d.Result.Count > 0 || d.PresentedForm.Count > 0,
            ValueCodes = [.. d.ConclusionCode.SelectMany(Codings)],
        },
        Procedure p => new ClinicalFact
        {
            ResourceType = "Procedure",
            Id = id,
            VersionId = p.Meta?.VersionId,
            Status = LiteralOf(p.StatusElement),
            Codes = Codings(p.Code),
            Time = TimeOf(p.Performed),
            StatusReason = Codings(p.StatusReason),
        },
        Immunization i => new ClinicalFact
        {
            ResourceType = "Immunization",
            Id = id,
            VersionId = i.Meta?.VersionId,
            Status = LiteralOf(i.StatusElement),
            Codes = Codings(i.VaccineCode),
            Time = TimeOf(i.Occurrence),
            IsSubpotent = i.IsSubpotent,
            StatusReason = Codings(i.StatusReason),
        },
        Encounter e => new ClinicalFact
        {
            ResourceType = "Encounter",
            Id = id,
            VersionId = e.Meta?.VersionId,
            Status = LiteralOf(e.StatusElement),
            Codes = [.. e.Type.SelectMany(Codings)],
            Time = e.Period is null ? null : new FactTime(TimeKind.Period, e.Period.Start, e.Period.End),
            EncounterClass = e.Class is null ? null : new FactCoding(e.Class.System, e.Class.Code),
            DischargeDisposition = Codings(e.Hospitalization?.DischargeDisposition),
        },
        Condition c => new ClinicalFact
        {
            ResourceType = "Condition",
            Id = id,
            VersionId = c.Meta?.VersionId,
            Codes = Codings(c.Code),
            Time = TimeOf(c.Onset),
            Abatement = TimeOf(c.Abatement),
            RecordedDate = c.RecordedDate,
            ClinicalStatus = Codings(c.ClinicalStatus),
            VerificationStatus = Codings(c.VerificationStatus),
        },
        ServiceRequest s => new ClinicalFact
        {
            ResourceType = "ServiceRequest",
            Id = id,
            VersionId = s.Meta?.VersionId,
            Status = LiteralOf(s.StatusElement),
            Codes = Codings(s.Code),
            Time = s.AuthoredOn is null ? null : new FactTime(TimeKind.DateTime, s.AuthoredOn),
            Intent = LiteralOf(s.IntentElement),
        },
        MedicationRequest m => new ClinicalFact
        {
            ResourceType = "MedicationRequest",
            Id = id,
            VersionId = m.Meta?.VersionId,
            Status = LiteralOf(m.StatusElement),
            Codes = Codings(m.Medication as CodeableConcept),
            Time = m.AuthoredOn is null ? null : new FactTime(TimeKind.DateTime, m.AuthoredOn),
            Intent = LiteralOf(m.IntentElement),
        },
        _ => null,
    };

    /// <summary>The code as it appears in the JSON ("entered-in-error"), not the C# enum name.</summary>
    private static string? LiteralOf(PrimitiveType? element) => element?.JsonValue switch
    {
        null => null,
        string s => s,
        Enum e => Hl7.Fhir.Utility.EnumUtility.GetLiteral(e),
        var other => other.ToString(),
    };

    private static FactCoding[] Codings(CodeableConcept? concept) =>
        concept is null ? [] : [.. concept.Coding.Select(c => new FactCoding(c.System, c.Code))];

    private static FactQuantity? QuantityOf(Quantity? q) =>
        q is null ? null : new FactQuantity(q.Value, LiteralOf(q.ComparatorElement), q.Unit, q.System, q.Code);

    /// <summary>valueInteger (questionnaire scores such as a PHQ-9 total) as a unitless quantity.</summary>
    private static FactQuantity? IntegerQuantity(Integer? i) =>
        i?.Value is { } value ? new FactQuantity(value, null, null, null, null) : null;

    private static FactTime? TimeOf(DataType? value) => value switch
    {
        null => null,
        FhirDateTime dt => new FactTime(TimeKind.DateTime, dt.Value),
        Instant inst => new FactTime(TimeKind.Instant, inst.ToString()),
        Period p => new FactTime(TimeKind.Period, p.Start, p.End),
        Age age => new FactTime(TimeKind.Age, Low: QuantityOf(age)),
        Hl7.Fhir.Model.Range r => new FactTime(TimeKind.Range, Low: QuantityOf(r.Low), High: QuantityOf(r.High)),
        _ => new FactTime(TimeKind.Unusable),
    };
}
