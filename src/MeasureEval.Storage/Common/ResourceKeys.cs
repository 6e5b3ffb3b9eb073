using System.Text.RegularExpressions;
using Hl7.Fhir.Model;
using MeasureEval.Core.Index;

namespace MeasureEval.Storage.Common;

/// <summary>What the store indexes for search besides the resource body: ids, patient compartment, identifier tokens.</summary>
public static partial class ResourceKeys
{
    /// <summary>Elements that place a resource in a patient's compartment, in the order they are tried.</summary>
    private static readonly string[] PatientElements = ["subject", "patient", "beneficiary"];

    /// <summary>True for a FHIR id: [A-Za-z0-9\-\.]{1,64} (FHIR R4 datatypes, "id").</summary>
    public static bool IsValidId([System.Diagnostics.CodeAnalysis.NotNullWhen(true)] string? id) => id is not null && IdPattern().IsMatch(id);

    /// <summary>A new server-assigned id: a version-7 GUID in 32 hex digits, so ids of new resources sort by creation time.</summary>
    public static string NewId(TimeProvider timeProvider)
    {
        ArgumentNullException.ThrowIfNull(timeProvider);
        return Guid.CreateVersion7(timeProvider.GetUtcNow()).ToString("N");
    }

    /// <summary>The patient whose compartment holds the resource: the Patient itself, or its subject/patient/beneficiary when that is a Patient reference.</summary>
    public static string? CompartmentPatientOf(Resource resource)
    {
        ArgumentNullException.ThrowIfNull(resource);
        if (resource is Patient)
        {
            return resource.Id;
        }

        foreach (var name in PatientElements)
        {
            if (resource.TryGetValue(name, out var value) && value is ResourceReference reference
                && FactExtractor.PatientIdOf(reference) is { } patientId)
            {
                return patientId;
            }
        }

        return null;
    }

    /// <summary>Distinct (system, value) identifier tokens; a missing system is the empty string.</summary>
    public static IReadOnlyCollection<(string System, string Value)> IdentifiersOf(Resource resource)
    {
        ArgumentNullException.ThrowIfNull(resource);
        if (!resource.TryGetValue("identifier", out var value))
        {
            return [];
        }

        IEnumerable<Identifier> identifiers = value switch
        {
            Identifier single => [single],
            IEnumerable<Identifier> many => many,
            _ => [],
        };
        var tokens = new HashSet<(string System, string Value)>();
        foreach (var identifier in identifiers)
        {
            if (!string.IsNullOrEmpty(identifier.Value))
            {
                tokens.Add((identifier.System ?? string.Empty, identifier.Value));
            }
        }

        return tokens;
    }

    [GeneratedRegex(@"^[A-Za-z0-9\-\.]{1,64}$", RegexOptions.CultureInvariant)]
    private static partial Regex IdPattern();
}
