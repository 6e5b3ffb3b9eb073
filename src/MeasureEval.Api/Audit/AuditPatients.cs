using System.Text.Json;
using Hl7.Fhir.Model;
using MeasureEval.Core.Index;

namespace MeasureEval.Api.Audit;

/// <summary>
/// The patients an answer concerns: every Patient resource in it and every reference to a Patient (subject, patient,
/// beneficiary, List items of a subject list, DetectedIssue.patient, transaction-response locations).
/// </summary>
public static class AuditPatients
{
    public static void Collect(Base? element, AuditTrail trail)
    {
        ArgumentNullException.ThrowIfNull(trail);
        switch (element)
        {
            case null:
                return;
            case Patient patient:
                trail.AddPatient(patient.Id);
                break;
            case ResourceReference reference:
                trail.AddPatient(FactExtractor.PatientIdOf(reference));
                return;
            case Bundle.ResponseComponent response when response.Location is { } location:
                trail.AddPatient(FactExtractor.PatientIdOf(new ResourceReference(location)));
                break;
        }

        foreach (var (_, value) in element.EnumerateElements())
        {
            switch (value)
            {
                case Base child:
                    Collect(child, trail);
                    break;
                case IEnumerable<Base> children:
                    foreach (var child in children)
                    {
                        Collect(child, trail);
                    }

                    break;
            }
        }
    }

    /// <summary>The same over stored JSON (reads answer with the stored text, never parsed into objects).</summary>
    public static void Collect(string? json, AuditTrail trail)
    {
        ArgumentNullException.ThrowIfNull(trail);
        if (string.IsNullOrEmpty(json))
        {
            return;
        }

        using var document = JsonDocument.Parse(json);
        Walk(document.RootElement, trail);
    }

    private static void Walk(JsonElement element, AuditTrail trail)
    {
        switch (element.ValueKind)
        {
            case JsonValueKind.Object:
                if (element.TryGetProperty("resourceType", out var type) && type.ValueKind == JsonValueKind.String && type.ValueEquals("Patient")
                    && element.TryGetProperty("id", out var id) && id.ValueKind == JsonValueKind.String)
                {
                    trail.AddPatient(id.GetString());
                }

                foreach (var property in element.EnumerateObject())
                {
                    if (property.NameEquals("reference") && property.Value.ValueKind == JsonValueKind.String)
                    {
                        trail.AddPatient(FactExtractor.PatientIdOf(new ResourceReference(property.Value.GetString())));
                    }
                    else
                    {
                        Walk(property.Value, trail);
                    }
                }

                break;
            case JsonValueKind.Array:
                foreach (var item in element.EnumerateArray())
                {
                    Walk(item, trail);
                }

                break;
        }
    }
}
