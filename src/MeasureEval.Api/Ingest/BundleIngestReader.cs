using System.Buffers;
using System.IO.Pipelines;
using System.Runtime.CompilerServices;
using System.Text.Json;
using MeasureEval.Api.Errors;
using MeasureEval.Core.Fhir;

namespace MeasureEval.Api.Ingest;

/// <summary>
/// Reads a collection or searchset Bundle from a pipe entry by entry: the outer object is walked with a resumable
/// <see cref="Utf8JsonReader"/>, each complete entry is parsed on its own and released. Memory is bounded by the
/// largest entry, not the body.
/// </summary>
public static class BundleIngestReader
{
    private enum Stage
    {
        Start,
        Root,
        Entries,
        Done,
    }

    private sealed class ScanState
    {
        public JsonReaderState Reader;
        public Stage Stage;
        public int EntryIndex;
        public string? BundleType;
        public bool TypeChecked;
        public long Consumed;
        public List<object> Items { get; } = [];
        public IngestFailure? Failure;
    }

    public static async IAsyncEnumerable<object> ReadAsync(PipeReader pipe, IngestOptions options, [EnumeratorCancellation] CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(pipe);
        ArgumentNullException.ThrowIfNull(options);
        var state = new ScanState { Reader = new JsonReaderState(new JsonReaderOptions { MaxDepth = options.MaxJsonDepth }) };
        while (true)
        {
            var read = await pipe.ReadAsync(cancellationToken);
            var buffer = read.Buffer;
            var consumed = Scan(buffer, read.IsCompleted, state, options);
            state.Consumed += consumed;
            var rest = buffer.Length - consumed;
            pipe.AdvanceTo(buffer.GetPosition(consumed), buffer.End);
            foreach (var item in state.Items)
            {
                yield return item;
            }

            state.Items.Clear();
            if (state.Failure is null && state.Consumed + rest > options.MaxStreamBytes)
            {
                state.Failure = new IngestFailure(new FhirIssue(ErrorCatalogue.BodyTooLarge, $"The body exceeds the limit of {options.MaxStreamBytes} bytes (Ingest:MaxStreamBytes).", $"Bundle.entry[{state.EntryIndex}]"));
            }

            if (state.Failure is null && rest > options.MaxBodyBytes)
            {
                state.Failure = new IngestFailure(new FhirIssue(ErrorCatalogue.BodyTooLarge, $"An entry exceeds {options.MaxBodyBytes} bytes (Ingest:MaxBodyBytes).", $"Bundle.entry[{state.EntryIndex}]"));
            }

            if (state.Failure is { } failure)
            {
                yield return failure;
                yield break;
            }

            if (read.IsCompleted)
            {
                if (state.Stage != Stage.Done)
                {
                    yield return new IngestFailure(new FhirIssue(ErrorCatalogue.MalformedJson, "The body ended before the Bundle was complete.", state.Stage == Stage.Entries ? $"Bundle.entry[{state.EntryIndex}]" : "Bundle"));
                }

                yield break;
            }
        }
    }

    /// <summary>Consumes as many complete units as the buffer holds and returns the bytes consumed.</summary>
    private static long Scan(ReadOnlySequence<byte> buffer, bool final, ScanState state, IngestOptions options)
    {
        var reader = new Utf8JsonReader(buffer, final, state.Reader);
        try
        {
            while (state.Failure is null && Step(ref reader, buffer, state, options))
            {
            }
        }
        catch (JsonException ex)
        {
            var tooDeep = ex.Message.Contains("depth", StringComparison.OrdinalIgnoreCase);
            var where = state.Stage == Stage.Entries ? $"Bundle.entry[{state.EntryIndex}]" : "Bundle";
            state.Failure = new IngestFailure(new FhirIssue(
                tooDeep ? ErrorCatalogue.TooDeep : ErrorCatalogue.MalformedJson,
                tooDeep ? $"JSON nesting exceeds the limit of {options.MaxJsonDepth} levels (Ingest:MaxJsonDepth); reading stopped." : $"Malformed JSON; reading stopped: {ex.Message}",
                where,
                ex.LineNumber + 1,
                ex.BytePositionInLine + 1));
        }
        catch (InvalidOperationException)
        {
            // System.Text.Json throws this, not JsonException, for a string with an unpaired surrogate escape or invalid UTF-8.
            var where = state.Stage == Stage.Entries ? $"Bundle.entry[{state.EntryIndex}]" : "Bundle";
            state.Failure = new IngestFailure(new FhirIssue(ErrorCatalogue.MalformedJson, "Malformed JSON; reading stopped: a string is not valid Unicode (invalid UTF-8 or an unpaired surrogate escape).", where));
        }

        state.Reader = reader.CurrentState;
        return reader.BytesConsumed;
    }

    /// <summary>Advances over one unit (a token, a property with its value, an entry). False when more data is needed or the Bundle ended.</summary>
    private static bool Step(ref Utf8JsonReader reader, ReadOnlySequence<byte> buffer, ScanState state, IngestOptions options)
    {
        var ahead = reader;
        switch (state.Stage)
        {
            case Stage.Start:
                if (!ahead.Read())
                {
                    return false;
                }

                if (ahead.TokenType != JsonTokenType.StartObject)
                {
                    state.Failure = new IngestFailure(new FhirIssue(ErrorCatalogue.InvalidStructure, "$ingest takes a Bundle (JSON object) or NDJSON.", null));
                    return false;
                }

                state.Stage = Stage.Root;
                break;
            case Stage.Root:
                if (!ahead.Read())
                {
                    return false;
                }

                if (ahead.TokenType == JsonTokenType.EndObject)
                {
                    state.Stage = Stage.Done;
                    reader = ahead;
                    return false;
                }

                var name = ahead.GetString();
                if (!ahead.Read())
                {
                    return false;
                }

                if (name == "entry")
                {
                    if (ahead.TokenType != JsonTokenType.StartArray)
                    {
                        state.Failure = new IngestFailure(new FhirIssue(ErrorCatalogue.InvalidStructure, "Bundle.entry must be an array.", "Bundle.entry"));
                        return false;
                    }

                    if (!CheckType(state, final: false))
                    {
                        return false;
                    }

                    state.Stage = Stage.Entries;
                }
                else if (name is "resourceType" or "type")
                {
                    var value = ahead.TokenType == JsonTokenType.String ? ahead.GetString() : null;
                    if (name == "resourceType" && value != "Bundle")
                    {
                        state.Failure = new IngestFailure(new FhirIssue(ErrorCatalogue.InvalidResourceType, $"$ingest takes a Bundle or NDJSON, not '{value}'.", "Bundle.resourceType"));
                        return false;
                    }

                    if (name == "type")
                    {
                        state.BundleType = value;
                        if (state.EntryIndex > 0 && !CheckType(state, final: true))
                        {
                            return false;
                        }
                    }
                }
                else if (!ahead.TrySkip())
                {
                    return false;
                }

                break;
            case Stage.Entries:
                if (!ahead.Read())
                {
                    return false;
                }

                if (ahead.TokenType == JsonTokenType.EndArray)
                {
                    state.Stage = Stage.Root;
                    break;
                }

                var start = ahead.TokenStartIndex;
                if (!ahead.TrySkip())
                {
                    return false;
                }

                var index = state.EntryIndex++;
                var entry = buffer.Slice(start, ahead.BytesConsumed - start);
                state.Items.Add(ParseEntry(entry, index, options));
                break;
            default:
                if (ahead.Read())
                {
                    state.Failure = new IngestFailure(new FhirIssue(ErrorCatalogue.MalformedJson, "Unexpected content after the Bundle.", null));
                }

                return false;
        }

        reader = ahead;
        return true;
    }

    private static bool CheckType(ScanState state, bool final)
    {
        if (state.TypeChecked || (state.BundleType is null && !final))
        {
            return true;
        }

        state.TypeChecked = true;
        if (state.BundleType is "collection" or "searchset")
        {
            return true;
        }

        var hint = state.BundleType is "transaction" or "batch" ? " Post transaction and batch Bundles to the base URL (POST /)." : "";
        state.Failure = new IngestFailure(new FhirIssue(ErrorCatalogue.WrongBundleType, $"$ingest takes collection or searchset Bundles, not '{state.BundleType}'.{hint}", "Bundle.type"));
        return false;
    }

    private static IngestItem ParseEntry(ReadOnlySequence<byte> entry, int index, IngestOptions options)
    {
        var root = $"Bundle.entry[{index}].resource";
        var reader = new Utf8JsonReader(entry, new JsonReaderOptions { MaxDepth = options.MaxJsonDepth });
        reader.Read();
        if (reader.TokenType != JsonTokenType.StartObject)
        {
            return new IngestItem(null, [new FhirIssue(ErrorCatalogue.InvalidStructure, "A Bundle entry must be a JSON object.", $"Bundle.entry[{index}]")], root, null);
        }

        while (reader.Read() && reader.TokenType == JsonTokenType.PropertyName)
        {
            var isResource = reader.ValueTextEquals("resource"u8);
            reader.Read();
            if (isResource && reader.TokenType == JsonTokenType.StartObject)
            {
                var start = reader.TokenStartIndex;
                reader.Skip();
                var slice = entry.Slice(start, reader.BytesConsumed - start);
                var ok = FhirJson.TryParseResource(slice, options.MaxJsonDepth, out var resource, out var issues);
                return new IngestItem(ok ? resource : null, [.. issues.Select(i => FhirIssue.FromParse(i, root, withPosition: false))], root, null);
            }

            reader.Skip();
        }

        return new IngestItem(null, [new FhirIssue(ErrorCatalogue.EntryResourceMissing, "The entry has no resource.", $"Bundle.entry[{index}]")], root, null);
    }
}
