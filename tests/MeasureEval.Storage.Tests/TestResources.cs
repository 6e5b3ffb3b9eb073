using Hl7.Fhir.Model;
using MeasureEval.Core.Fhir;

namespace MeasureEval.Storage.Tests;

/// <summary>Loads the FHIR resources under Resources/ (a fresh object each time: the store stamps id and meta on what it writes).</summary>
internal static class TestResources
{
    public static T Load<T>(string fileName) where T : Resource =>
        FhirJson.Parse<T>(File.ReadAllText(Path.Combine(AppContext.BaseDirectory, "Resources", fileName)));

    public static Patient Ana() => Load<Patient>("patient-ana.json");

    public static Observation HbA1c() => Load<Observation>("observation-hba1c.json");

    public static Coverage AnaCoverage() => Load<Coverage>("coverage-ana.json");

    public static Immunization Flu() => Load<Immunization>("immunization-flu.json");

    public static Organization CedarValley() => Load<Organization>("organization-cedar-valley.json");

    /// <summary>A minimal valid Observation of the given patient (status and code are required in R4).</summary>
    public static Observation ObservationOf(string id, string patientId) => new()
    {
        Id = id,
        Status = ObservationStatus.Final,
        Code = new CodeableConcept("http://loinc.org", "4548-4"),
        Subject = new ResourceReference($"Patient/{patientId}"),
        Effective = new FhirDateTime("2026-03-02"),
    };
}
