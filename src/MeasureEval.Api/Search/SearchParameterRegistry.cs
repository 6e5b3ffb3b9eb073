using Hl7.Fhir.Model;

namespace MeasureEval.Api.Search;

/// <summary>What a search parameter means here; the parser and the CapabilityStatement both read this list.</summary>
public enum SearchParameterKind
{
    Id,
    LastUpdated,
    PatientReference,
    Identifier,
}

public sealed record SearchParameterDefinition(string Name, SearchParamType Type, SearchParameterKind Kind, string DefinitionUrl, string Documentation);

/// <summary>The search parameters implemented, per resource type (names and definitions from the R4 search registry).</summary>
public static class SearchParameterRegistry
{
    private static readonly SearchParameterDefinition IdParameter = new(
        "_id", SearchParamType.Token, SearchParameterKind.Id, "http://hl7.org/fhir/SearchParameter/Resource-id", "Logical id; comma-separated values are alternatives.");

    private static readonly SearchParameterDefinition LastUpdatedParameter = new(
        "_lastUpdated", SearchParamType.Date, SearchParameterKind.LastUpdated, "http://hl7.org/fhir/SearchParameter/Resource-lastUpdated",
        "meta.lastUpdated; prefixes eq, ne, gt, lt, ge, le, sa, eb; the value's precision sets the range; values without a zone are UTC.");

    /// <summary>The reference parameters that name a resource's patient, per type (R4 search parameter registry).</summary>
    private static readonly Dictionary<string, string[]> PatientParameters = new(StringComparer.Ordinal)
    {
        ["Observation"] = ["patient", "subject"],
        ["Condition"] = ["patient", "subject"],
        ["Procedure"] = ["patient", "subject"],
        ["Encounter"] = ["patient", "subject"],
        ["DiagnosticReport"] = ["patient", "subject"],
        ["ServiceRequest"] = ["patient", "subject"],
        ["MedicationRequest"] = ["patient", "subject"],
        ["Immunization"] = ["patient"],
        ["Coverage"] = ["beneficiary", "patient"],
    };

    private static readonly SearchParameterDefinition PatientIdentifier = new(
        "identifier", SearchParamType.Token, SearchParameterKind.Identifier, "http://hl7.org/fhir/SearchParameter/Patient-identifier",
        "system|value, |value (no system) or value (any system); comma-separated values are alternatives.");

    /// <summary>Parameters every type supports, then the type's own.</summary>
    public static IReadOnlyList<SearchParameterDefinition> For(string resourceType)
    {
        var list = new List<SearchParameterDefinition> { IdParameter, LastUpdatedParameter };
        if (PatientParameters.TryGetValue(resourceType, out var names))
        {
            list.AddRange(names.Select(n => new SearchParameterDefinition(
                n, SearchParamType.Reference, SearchParameterKind.PatientReference,
                $"http://hl7.org/fhir/SearchParameter/{DefinitionOwner(resourceType, n)}",
                "The patient the resource is about: Patient/id, id, or an absolute URL ending in Patient/id.")));
        }

        if (resourceType == "Patient")
        {
            list.Add(PatientIdentifier);
        }

        return list;
    }

    public static SearchParameterDefinition? Find(string resourceType, string name) =>
        For(resourceType).FirstOrDefault(p => p.Name == name);

    // R4 shares some definitions across types (clinical-patient, clinical-subject); the others are per type.
    private static string DefinitionOwner(string resourceType, string name) => (resourceType, name) switch
    {
        ("Coverage", _) => $"Coverage-{name}",
        ("Immunization", _) => "clinical-patient",
        (_, "patient") => "clinical-patient",
        ("Observation" or "Condition" or "Procedure" or "Encounter" or "DiagnosticReport" or "ServiceRequest" or "MedicationRequest", "subject") => $"{resourceType}-subject",
        _ => $"{resourceType}-{name}",
    };
}
