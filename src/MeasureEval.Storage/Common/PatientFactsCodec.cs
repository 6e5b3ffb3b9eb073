using System.Text.Json;
using System.Text.Json.Serialization;
using MeasureEval.Core.Index;

namespace MeasureEval.Storage.Common;

/// <summary>The stored form of one patient's index entry: UTF-8 JSON from a source-generated context, nulls left out.</summary>
public static class PatientFactsCodec
{
    public static byte[] Encode(PatientFacts facts) =>
        JsonSerializer.SerializeToUtf8Bytes(facts, PatientFactsJsonContext.Default.PatientFacts);

    public static PatientFacts Decode(ReadOnlySpan<byte> utf8Json) =>
        JsonSerializer.Deserialize(utf8Json, PatientFactsJsonContext.Default.PatientFacts)
        ?? throw new InvalidDataException("A stored patient index entry is the JSON literal null.");
}

[JsonSourceGenerationOptions(DefaultIgnoreCondition = JsonIgnoreCondition.WhenWritingNull)]
[JsonSerializable(typeof(PatientFacts))]
internal sealed partial class PatientFactsJsonContext : JsonSerializerContext;
