using Hl7.Fhir.Model;

namespace MeasureEval.Api.Fhir;

/// <summary>The concrete FHIR R4 resource types; any of them can be stored, read, updated and deleted.</summary>
public static class FhirResourceTypes
{
    public static IReadOnlySet<string> All { get; } = new SortedSet<string>(ModelInfo.SupportedResources, StringComparer.Ordinal);

    public static bool IsKnown(string? type) => type is not null && All.Contains(type);

    /// <summary>Types the server writes itself (the audit trail): no client may store one, so none can pose as a record.</summary>
    public static bool IsServerKept(string? type) => type == "AuditEvent";
}
