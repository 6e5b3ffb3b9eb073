using System.Globalization;
using Hl7.Fhir.Model;

namespace MeasureEval.Bench;

/// <summary>
/// An invented population for timing: each patient has a Patient, a Coverage and clinical resources of every indexed kind
/// in rotation. Deterministic, so runs are comparable.
/// </summary>
internal static class SyntheticPopulation
{
    public static string PatientId(int index) => "p" + index.ToString("D7", CultureInfo.InvariantCulture);

    /// <summary>The patient's resources: one Patient plus <paramref name="perPatient"/> − 1 resources that point at it.</summary>
    public static IEnumerable<Resource> ResourcesOf(int index, int perPatient)
    {
        var patientId = PatientId(index);
        var subject = new ResourceReference("Patient/" + patientId);
        yield return new Patient
        {
            Id = patientId,
            Gender = index % 2 == 0 ? AdministrativeGender.Female : AdministrativeGender.Male,
            BirthDate = new DateTime(1940 + (index % 70), 1 + (index % 12), 1 + (index % 28), 0, 0, 0, DateTimeKind.Unspecified).ToString("yyyy-MM-dd", CultureInfo.InvariantCulture),
            Identifier = [new Identifier("https://riverbend.example.org/mrn", "RB-" + index.ToString(CultureInfo.InvariantCulture))],
            GeneralPractitioner = [new ResourceReference("Practitioner/prac-" + (index % 40).ToString(CultureInfo.InvariantCulture))],
        };
        for (var n = 1; n < perPatient; n++)
        {
            var id = patientId + "-" + n.ToString(CultureInfo.InvariantCulture);
            var day = new FhirDateTime(2025, 1 + (n % 12), 1 + ((index + n) % 28));
            yield return (n % 8) switch
            {
                0 => new Coverage
                {
                    Id = id,
                    Status = FinancialResourceStatusCodes.Active,
                    Beneficiary = subject,
                    Payor = [new ResourceReference("Organization/cedar-valley")],
                    Period = new Period(new FhirDateTime(2025, 1, 1), new FhirDateTime(2026, 12, 31)),
                },
                1 or 2 => new Observation
                {
                    Id = id,
                    Status = ObservationStatus.Final,
                    Code = new CodeableConcept("http://loinc.org", "4548-4"),
                    Subject = subject,
                    Effective = day,
                    Value = new Quantity(5.5m + (n % 30 / 10m), "%", "http://unitsofmeasure.org"),
                },
                3 => new Observation
                {
                    Id = id,
                    Status = ObservationStatus.Final,
                    Code = new CodeableConcept("http://loinc.org", "85354-9"),
                    Subject = subject,
                    Effective = day,
                    Component =
                    [
                        new Observation.ComponentComponent { Code = new CodeableConcept("http://loinc.org", "8480-6"), Value = new Quantity(128, "mm[Hg]", "http://unitsofmeasure.org") },
                        new Observation.ComponentComponent { Code = new CodeableConcept("http://loinc.org", "8462-4"), Value = new Quantity(82, "mm[Hg]", "http://unitsofmeasure.org") },
                    ],
                },
                4 => new Encounter
                {
                    Id = id,
                    Status = Encounter.EncounterStatus.Finished,
                    Class = new Coding("http://terminology.hl7.org/CodeSystem/v3-ActCode", "AMB"),
                    Subject = subject,
                    Period = new Period(day, day),
                },
                5 => new Condition
                {
                    Id = id,
                    Code = new CodeableConcept("http://hl7.org/fhir/sid/icd-10-cm", "E11.9"),
                    Subject = subject,
                    Onset = new FhirDateTime(2019, 1 + (n % 12), 1),
                    ClinicalStatus = new CodeableConcept("http://terminology.hl7.org/CodeSystem/condition-clinical", "active"),
                },
                6 => new Immunization
                {
                    Id = id,
                    Status = Immunization.ImmunizationStatusCodes.Completed,
                    VaccineCode = new CodeableConcept("http://hl7.org/fhir/sid/cvx", "150"),
                    Patient = subject,
                    Occurrence = day,
                },
                _ => new Procedure
                {
                    Id = id,
                    Status = EventStatus.Completed,
                    Code = new CodeableConcept("http://snomed.info/sct", "73761001"),
                    Subject = subject,
                    Performed = day,
                },
            };
        }
    }
}
