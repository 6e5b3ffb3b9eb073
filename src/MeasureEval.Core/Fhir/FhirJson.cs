using Hl7.Fhir.Model;
using Hl7.Fhir.Serialization;

namespace MeasureEval.Core.Fhir;

/// <summary>One strict parser and one serializer for the whole process: both are thread-safe and costly to build.</summary>
public static class FhirJson
{
    public static FhirJsonDeserializer Deserializer { get; } = new();

    public static FhirJsonSerializer Serializer { get; } = new();

    public static string Serialize(Resource resource, bool pretty = false) =>
        Serializer.SerializeToString(resource, pretty);

    public static T Parse<T>(string json) where T : Resource => Deserializer.Deserialize<T>(json);
}
