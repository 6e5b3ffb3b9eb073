using Hl7.Fhir.Model;
using MeasureEval.Synthetic.Random;
using static MeasureEval.Synthetic.Population.ClinicalCodes;

namespace MeasureEval.Synthetic.Population;

/// <summary>
/// Builds the FHIR resources of one patient and injects the data-quality faults real extracts carry, each at a
/// small rate (together roughly 1–2 % of clinical records, common practice from memory): entered-in-error
/// records, records without their time element, partial dates.
/// </summary>
internal sealed class ResourceFactory
{
    /// <summary>Share of records marked entered-in-error.</summary>
    private const double EnteredInErrorRate = 0.005;

    /// <summary>Share of observations and procedures that lost their time element.</summary>
    private const double MissingTimeRate = 0.004;

    /// <summary>Share of historical procedures and onsets stated only to the year or month.</summary>
    private const double PartialDateRate = 0.03;

    private readonly Pcg32 _rng;
    private readonly Pcg32 _ids;
    private readonly List<Resource> _resources = [];

    public ResourceFactory(Pcg32 rng, Pcg32 ids, string patientId)
    {
        _rng = rng;
        _ids = ids;
        PatientId = patientId;
        PatientReference = $"Patient/{patientId}";
    }

    public string PatientId { get; }

    public string PatientReference { get; }

    public IReadOnlyList<Resource> Resources => _resources;

    public void Add(Resource resource) => _resources.Add(resource);

    public string NewId() => _ids.NextUuid();

    private ResourceReference Subject() => new(PatientReference);

    private bool EnteredInError() => _rng.Chance(EnteredInErrorRate);

    /// <summary>Clinic-hours time on the day, with the invented region's offset (daylight time April–October).</summary>
    public string Stamp(DateOnly day, int hour, int minute) =>
        $"{day:yyyy-MM-dd}T{hour:D2}:{minute:D2}:00{(day.Month is >= 4 and <= 10 ? "-04:00" : "-05:00")}";

    public (int Hour, int Minute) ClinicTime() => (_rng.Between(8, 16), _rng.Between(0, 11) * 5);

    public string StampOrDate(DateOnly day, double dateOnlyShare)
    {
        if (_rng.Chance(dateOnlyShare))
        {
            return day.ToString("yyyy-MM-dd", System.Globalization.CultureInfo.InvariantCulture);
        }

        var (h, m) = ClinicTime();
        return Stamp(day, h, m);
    }

    /// <summary>A date as a history would state it: usually the day, sometimes only the month or year.</summary>
    public string HistoricalDate(DateOnly day)
    {
        if (_rng.Chance(PartialDateRate))
        {
            return _rng.Chance(0.5) ? day.ToString("yyyy", System.Globalization.CultureInfo.InvariantCulture) : day.ToString("yyyy-MM", System.Globalization.CultureInfo.InvariantCulture);
        }

        return day.ToString("yyyy-MM-dd", System.Globalization.CultureInfo.InvariantCulture);
    }

    public static string Date(DateOnly day) => day.ToString("yyyy-MM-dd", System.Globalization.CultureInfo.InvariantCulture);

    public Encounter Encounter(DateOnly day, string classCode, Coding type, string? practitionerId, string siteId, int lengthDays)
    {
        var (h, m) = ClinicTime();
        var start = Stamp(day, h, m);
        var end = lengthDays > 0
            ? Stamp(day.AddDays(lengthDays), _rng.Between(9, 15), _rng.Between(0, 11) * 5)
            : Stamp(day, Math.Min(h + (m >= 30 ? 1 : 0), 23), (m + 30) % 60);
        var status = _rng.NextDouble() switch
        {
            < EnteredInErrorRate => Hl7.Fhir.Model.Encounter.EncounterStatus.EnteredInError,
            < 0.02 => Hl7.Fhir.Model.Encounter.EncounterStatus.Cancelled,
            _ => Hl7.Fhir.Model.Encounter.EncounterStatus.Finished,
        };
        var encounter = new Encounter
        {
            Id = NewId(),
            Status = status,
            Class = new Coding(ActCode, classCode),
            Type = [Concept(type)],
            Subject = Subject(),
            Period = _rng.Chance(MissingTimeRate) ? null : new Period { Start = start, End = status == Hl7.Fhir.Model.Encounter.EncounterStatus.Cancelled ? null : end },
            ServiceProvider = new ResourceReference($"Organization/{siteId}"),
        };
        if (practitionerId is not null)
        {
            encounter.Participant = [new Encounter.ParticipantComponent { Individual = new ResourceReference($"Practitioner/{practitionerId}") }];
        }

        Add(encounter);
        return encounter;
    }

    public static bool IsFinished(Encounter e) => e.Status == Hl7.Fhir.Model.Encounter.EncounterStatus.Finished && e.Period?.Start is not null;

    /// <summary>The status of a new observation: mostly final, a few amended/corrected, preliminary or in error.</summary>
    private ObservationStatus ObservationStatusDraw() => _rng.NextDouble() switch
    {
        < EnteredInErrorRate => ObservationStatus.EnteredInError,
        < 0.01 => ObservationStatus.Preliminary,
        < 0.03 => ObservationStatus.Amended,
        < 0.04 => ObservationStatus.Corrected,
        _ => ObservationStatus.Final,
    };

    public Observation Observation(Coding code, string category, string? time, Encounter? encounter, DataType? value)
    {
        var observation = new Observation
        {
            Id = NewId(),
            Status = ObservationStatusDraw(),
            Category = [Concept(new Coding(ObservationCategory, category))],
            Code = Concept(code),
            Subject = Subject(),
            Encounter = encounter is null ? null : new ResourceReference($"Encounter/{encounter.Id}"),
            Effective = time is null || _rng.Chance(MissingTimeRate) ? null : new FhirDateTime(time),
            Value = value,
        };
        Add(observation);
        return observation;
    }

    public static Quantity Ucum(decimal value, string code, string? unit = null) =>
        new() { Value = value, Unit = unit ?? code, System = ClinicalCodes.Ucum, Code = code };

    public static Quantity Score(int value) => new() { Value = value, Unit = "{score}", System = ClinicalCodes.Ucum, Code = "{score}" };

    /// <summary>One blood-pressure reading: the panel with components, or (less often) two separate observations.</summary>
    public void BloodPressure(string time, Encounter? encounter, int systolic, int diastolic, bool separate)
    {
        if (separate)
        {
            Observation(SystolicLoinc, "vital-signs", time, encounter, Ucum(systolic, "mm[Hg]", "mmHg"));
            Observation(DiastolicLoinc, "vital-signs", time, encounter, Ucum(diastolic, "mm[Hg]", "mmHg"));
            return;
        }

        var panel = Observation(BloodPressurePanelLoinc, "vital-signs", time, encounter, null);
        panel.Component =
        [
            new Observation.ComponentComponent { Code = Concept(SystolicLoinc), Value = Ucum(systolic, "mm[Hg]", "mmHg") },
            new Observation.ComponentComponent { Code = Concept(DiastolicLoinc), Value = Ucum(diastolic, "mm[Hg]", "mmHg") },
        ];
    }

    public Procedure Procedure(Coding code, string? performed, EventStatus status = EventStatus.Completed)
    {
        var procedure = new Procedure
        {
            Id = NewId(),
            Status = EnteredInError() ? EventStatus.EnteredInError : status,
            Code = Concept(code),
            Subject = Subject(),
            Performed = performed is null || _rng.Chance(MissingTimeRate) ? null : new FhirDateTime(performed),
        };
        Add(procedure);
        return procedure;
    }

    public DiagnosticReport DiagnosticReport(Coding code, string categoryCode, string? time, string conclusion)
    {
        var report = new DiagnosticReport
        {
            Id = NewId(),
            Status = EnteredInError() ? Hl7.Fhir.Model.DiagnosticReport.DiagnosticReportStatus.EnteredInError : Hl7.Fhir.Model.DiagnosticReport.DiagnosticReportStatus.Final,
            Category = [Concept(new Coding(DiagnosticServiceSection, categoryCode))],
            Code = Concept(code),
            Subject = Subject(),
            Effective = time is null || _rng.Chance(MissingTimeRate) ? null : new FhirDateTime(time),
            Conclusion = conclusion,
        };
        Add(report);
        return report;
    }

    public ServiceRequest ServiceRequest(Coding code, string authoredOn, RequestStatus status)
    {
        var request = new ServiceRequest
        {
            Id = NewId(),
            Status = EnteredInError() ? RequestStatus.EnteredInError : status,
            Intent = RequestIntent.Order,
            Code = Concept(code),
            Subject = Subject(),
            AuthoredOn = authoredOn,
        };
        Add(request);
        return request;
    }

    public Immunization Immunization(string cvx, string occurrence)
    {
        var immunization = new Immunization
        {
            Id = NewId(),
            Status = EnteredInError() ? Hl7.Fhir.Model.Immunization.ImmunizationStatusCodes.EnteredInError : Hl7.Fhir.Model.Immunization.ImmunizationStatusCodes.Completed,
            VaccineCode = Concept(CvxCode(cvx)),
            Patient = Subject(),
            Occurrence = new FhirDateTime(occurrence),
            PrimarySource = true,
        };
        Add(immunization);
        return immunization;
    }

    /// <summary>
    /// A problem-list condition. With an abatement the clinical status is resolved (con-4); an entered-in-error
    /// record carries no clinical status (con-5). Verification is usually confirmed, sometimes left out
    /// (both count), rarely provisional (does not count).
    /// </summary>
    public Condition Condition(IReadOnlyList<Coding> codes, string? onset, string? abatement, string clinicalStatus = "active")
    {
        var enteredInError = EnteredInError();
        var verification = enteredInError ? "entered-in-error" : _rng.NextDouble() switch
        {
            < 0.08 => null,
            < 0.09 => "provisional",
            _ => "confirmed",
        };
        var condition = new Condition
        {
            Id = NewId(),
            ClinicalStatus = enteredInError ? null : Concept(new Coding(ConditionClinical, abatement is null ? clinicalStatus : "resolved")),
            VerificationStatus = verification is null ? null : Concept(new Coding(ConditionVerification, verification)),
            Category = [Concept(new Coding(ConditionCategory, "problem-list-item"))],
            Code = Concept([.. codes]),
            Subject = Subject(),
            Onset = onset is null ? null : new FhirDateTime(onset),
            Abatement = abatement is null ? null : new FhirDateTime(abatement),
            RecordedDate = onset is { Length: >= 10 } ? onset[..10] : null,
        };
        Add(condition);
        return condition;
    }
}
