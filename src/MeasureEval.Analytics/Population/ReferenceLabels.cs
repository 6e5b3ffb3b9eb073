using Hl7.Fhir.Model;
using MeasureEval.Core.Fhir;
using MeasureEval.Core.Security;
using MeasureEval.Core.Storage;

namespace MeasureEval.Analytics.Population;

/// <summary>Readable names of the practitioners and organizations that panel and payer strata point at.</summary>
public static class ReferenceLabels
{
    /// <summary>The name of a stored Practitioner, PractitionerRole's practitioner or Organization; null when none is stored.</summary>
    public static async Task<string?> ResolveAsync(IResourceStore store, string reference, DataScope scope, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(store);
        ArgumentNullException.ThrowIfNull(reference);
        var slash = reference.IndexOf('/', StringComparison.Ordinal);
        if (slash <= 0 || slash == reference.Length - 1 || reference.IndexOf('/', slash + 1) >= 0)
        {
            // Not a plain relative reference (absolute URLs, versioned references): shown as written.
            return null;
        }

        var type = reference[..slash];
        if (type is not ("Practitioner" or "Organization"))
        {
            return null;
        }

        var stored = await store.ReadAsync(type, reference[(slash + 1)..], scope, cancellationToken).ConfigureAwait(false);
        if (stored is not { Deleted: false, Json: { } json })
        {
            return null;
        }

        return FhirJson.Parse<Resource>(json) switch
        {
            Practitioner p => NameOf(p.Name.FirstOrDefault()),
            Organization o => string.IsNullOrWhiteSpace(o.Name) ? null : o.Name,
            _ => null,
        };
    }

    private static string? NameOf(HumanName? name)
    {
        if (name is null)
        {
            return null;
        }

        if (!string.IsNullOrWhiteSpace(name.Text))
        {
            return name.Text;
        }

        var parts = name.Prefix.Concat(name.Given).Append(name.Family).Where(s => !string.IsNullOrWhiteSpace(s));
        var joined = string.Join(' ', parts);
        return joined.Length == 0 ? null : joined;
    }
}
