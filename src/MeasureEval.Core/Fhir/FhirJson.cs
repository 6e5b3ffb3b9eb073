using System.Buffers;
using System.Text.Json;
using Hl7.Fhir.Model;
using Hl7.Fhir.Serialization;
using Hl7.Fhir.Utility;

namespace MeasureEval.Core.Fhir;

/// <summary>One strict parser and one serializer for the whole process: both are thread-safe and costly to build.</summary>
public static class FhirJson
{
    /// <summary>JSON nesting allowed when the caller names no limit (System.Text.Json's own default).</summary>
    public const int DefaultMaxDepth = 64;

    public static FhirJsonDeserializer Deserializer { get; } = new();

    public static FhirJsonSerializer Serializer { get; } = new();

    public static string Serialize(Resource resource, bool pretty = false) =>
        Serializer.SerializeToString(resource, pretty);

    public static T Parse<T>(string json) where T : Resource => Deserializer.Deserialize<T>(json);

    /// <summary>
    /// Parses one resource strictly and collects every issue instead of stopping at the first. Returns false when
    /// there is any issue; <paramref name="resource"/> then holds what could be read (null after a syntax error).
    /// </summary>
    public static bool TryParseResource(ReadOnlySequence<byte> utf8Json, int maxDepth, out Resource? resource, out IReadOnlyList<FhirParseIssue> issues)
    {
        var reader = new Utf8JsonReader(utf8Json, new JsonReaderOptions { MaxDepth = maxDepth });
        return TryParseResource(ref reader, maxDepth, out resource, out issues);
    }

    public static bool TryParseResource(ReadOnlyMemory<byte> utf8Json, int maxDepth, out Resource? resource, out IReadOnlyList<FhirParseIssue> issues) =>
        TryParseResource(new ReadOnlySequence<byte>(utf8Json), maxDepth, out resource, out issues);

    private static bool TryParseResource(ref Utf8JsonReader reader, int maxDepth, out Resource? resource, out IReadOnlyList<FhirParseIssue> issues)
    {
        resource = null;
        try
        {
            if (!reader.Read())
            {
                issues = [new FhirParseIssue(FhirParseIssueKind.Syntax, "EMPTY", "", 1, 1, "The body is empty; a FHIR resource (JSON object) was expected.")];
                return false;
            }

            if (reader.TokenType != JsonTokenType.StartObject)
            {
                issues = [new FhirParseIssue(FhirParseIssueKind.Structure, "NOT_OBJECT", "", null, null, $"A FHIR resource must be a JSON object, found {reader.TokenType}.")];
                return false;
            }

            var ok = Deserializer.TryDeserializeResource(ref reader, out resource, out var raw);
            var found = Convert(raw);
            if (reader.Read())
            {
                found.Add(new FhirParseIssue(FhirParseIssueKind.Syntax, "TRAILING", "", null, null, $"Unexpected content after the resource at byte offset {reader.TokenStartIndex}."));
            }

            // The parser reports nested elements before their parents' later siblings: give them in reading order.
            issues = [.. found.OrderBy(i => i.Line ?? long.MaxValue).ThenBy(i => i.Position ?? long.MaxValue)];
            return ok && found.Count == 0;
        }
        catch (JsonException ex)
        {
            resource = null;
            var tooDeep = reader.CurrentDepth >= maxDepth - 1;
            issues =
            [
                new FhirParseIssue(
                    tooDeep ? FhirParseIssueKind.TooDeep : FhirParseIssueKind.Syntax,
                    tooDeep ? "MAX_DEPTH" : "JSON",
                    "",
                    ex.LineNumber + 1,
                    ex.BytePositionInLine + 1,
                    tooDeep ? $"JSON nesting exceeds the limit of {maxDepth} levels." : ex.Message),
            ];
            return false;
        }
        catch (InvalidOperationException)
        {
            // System.Text.Json throws this, not JsonException, when a string holds an unpaired surrogate escape or invalid UTF-8.
            resource = null;
            issues = [new FhirParseIssue(FhirParseIssueKind.Syntax, "JSON", "", null, null, "A JSON string is not valid Unicode (invalid UTF-8 or an unpaired surrogate escape).")];
            return false;
        }
    }

    private static List<FhirParseIssue> Convert(IEnumerable<CodedException>? raw)
    {
        var list = new List<FhirParseIssue>();
        if (raw is null)
        {
            return list;
        }

        var all = raw.ToList();
        // An unknown resourceType also produces "empty object" complaints about the same element: noise.
        var unknownTypePaths = all.OfType<ExtendedCodedException>()
            .Where(e => e.ErrorCode == "PVAL130")
            .Select(e => e.InstancePath)
            .ToHashSet(StringComparer.Ordinal);
        foreach (var e in all)
        {
            if (e is ExtendedCodedException x)
            {
                if (x.ErrorCode is "PVAL129" or "JSON120" && unknownTypePaths.Contains(x.InstancePath))
                {
                    continue;
                }

                var path = x.InstancePath is null or "$this" or "(root)" ? "" : x.InstancePath;
                list.Add(new FhirParseIssue(KindOf(x.ErrorCode), x.ErrorCode, path, x.LineNumber, x.Position, x.BaseErrorMessage ?? x.Message));
            }
            else
            {
                list.Add(new FhirParseIssue(KindOf(e.ErrorCode), e.ErrorCode, "", null, null, e.Message));
            }
        }

        return list;
    }

    private static FhirParseIssueKind KindOf(string code) => code switch
    {
        "PVAL128" or "PVAL131" => FhirParseIssueKind.UnknownElement,
        "PVAL130" or "PVAL132" or "JSON102" or "JSON103" => FhirParseIssueKind.ResourceType,
        "PVAL116" or "PVAL119" or "PVAL120" or "PVAL123" or "PVAL124" or "PVAL125" or "PVAL126" or "PVAL127" => FhirParseIssueKind.InvalidValue,
        _ => FhirParseIssueKind.Structure,
    };
}
