using System.Text.Json;
using Hl7.Fhir.Model;
using Hl7.Fhir.Serialization;
using Hl7.Fhir.Utility;
using MeasureEval.Core.Fhir;

namespace MeasureEval.Cli.Batch;

/// <summary>
/// Reads FHIR input from a directory: <c>*.ndjson</c> (one resource per line, Bulk Data) and <c>*.json</c> (a Bundle or a
/// single resource), files in ordinal name order. Parsing is strict and collects every issue of every file; lines are
/// parsed in parallel batches and handed on in file order, so the result never depends on thread timing.
/// </summary>
internal static class FhirInputReader
{
    private const int LinesPerBatch = 2048;

    /// <summary>One parsed resource with where it came from.</summary>
    public readonly record struct ParsedResource(Resource Resource, string File, int Line);

    public static IReadOnlyList<string> InputFiles(string directory) =>
        [.. Directory.EnumerateFiles(directory)
            .Where(f => f.EndsWith(".ndjson", StringComparison.OrdinalIgnoreCase) || f.EndsWith(".json", StringComparison.OrdinalIgnoreCase))
            .Order(StringComparer.Ordinal)];

    /// <summary>
    /// Parses every file lazily, yielding batches of resources in input order and adding every issue to
    /// <paramref name="issues"/>. Resources of a Bundle are yielded as its entries (the Bundle itself is not).
    /// </summary>
    public static IEnumerable<IReadOnlyList<ParsedResource>> Read(string directory, List<InputIssue> issues, IProgress<long>? recordsRead = null)
    {
        long records = 0;
        foreach (var path in InputFiles(directory))
        {
            var name = Path.GetFileName(path);
            if (path.EndsWith(".ndjson", StringComparison.OrdinalIgnoreCase))
            {
                var lineNumber = 0;
                foreach (var batch in File.ReadLines(path).Select(l => (Text: l, Number: ++lineNumber)).Where(l => l.Text.Length > 0).Chunk(LinesPerBatch))
                {
                    var parsed = new (Resource? Resource, List<InputIssue>? Issues)[batch.Length];
                    Parallel.For(0, batch.Length, i => parsed[i] = Parse(batch[i].Text, name, batch[i].Number));
                    var resources = new List<ParsedResource>(batch.Length);
                    for (var i = 0; i < batch.Length; i++)
                    {
                        if (parsed[i].Issues is { } found)
                        {
                            issues.AddRange(found);
                        }
                        else if (parsed[i].Resource is { } resource)
                        {
                            resources.Add(new ParsedResource(resource, name, batch[i].Number));
                        }
                    }

                    records += batch.Length;
                    recordsRead?.Report(records);
                    yield return resources;
                }
            }
            else
            {
                var (resource, found) = Parse(File.ReadAllText(path), name, 0);
                records++;
                recordsRead?.Report(records);
                if (found is not null)
                {
                    issues.AddRange(found);
                    continue;
                }

                yield return resource is Bundle bundle
                    ? [.. bundle.Entry.Where(e => e.Resource is not null).Select(e => new ParsedResource(e.Resource!, name, 0))]
                    : [new ParsedResource(resource!, name, 0)];
            }
        }
    }

    private static (Resource? Resource, List<InputIssue>? Issues) Parse(string json, string file, int line)
    {
        try
        {
            return (FhirJson.Deserializer.DeserializeResource(json), null);
        }
        catch (DeserializationFailedException ex)
        {
            return (null, [.. ex.Exceptions.Select(e => e is ExtendedCodedException coded
                ? new InputIssue(file, line, coded.InstancePath, coded.ErrorCode, coded.BaseErrorMessage ?? coded.Message)
                : new InputIssue(file, line, null, "invalid", e.Message))]);
        }
        catch (JsonException ex)
        {
            // System.Text.Json counts lines from 0; an NDJSON record is one line, so its own number is the location.
            return (null, [new InputIssue(file, line > 0 ? line : (int)(ex.LineNumber ?? 0) + 1, null, "malformed-json", ex.Message)]);
        }
    }
}
