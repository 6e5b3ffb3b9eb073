using Hl7.Fhir.Model;
using Hl7.Fhir.Serialization;
using MeasureEval.Core.Fhir;
using MeasureEval.Core.Storage;

namespace MeasureEval.Api.Fhir;

public static class StoredResources
{
    /// <summary>The stored JSON as a POCO, for embedding in a Bundle. Stored JSON was validated when written.</summary>
    public static Resource ToPoco(this StoredResource stored)
    {
        ArgumentNullException.ThrowIfNull(stored);
        return FhirJson.Deserializer.DeserializeResource(stored.Json ?? throw new InvalidOperationException("A deletion has no body."));
    }

    public static string Location(this StoredResource stored) => $"{stored.ResourceType}/{stored.Id}/_history/{stored.VersionId}";
}
