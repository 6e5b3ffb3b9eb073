using System.Buffers;
using System.IO.Pipelines;
using System.Runtime.CompilerServices;
using MeasureEval.Api.Errors;
using MeasureEval.Api.Fhir;
using MeasureEval.Core.Fhir;

namespace MeasureEval.Api.Ingest;

/// <summary>Reads NDJSON (one resource per line) from a pipe, one line at a time; memory is bounded by the longest line.</summary>
public static class NdjsonIngestReader
{
    public static async IAsyncEnumerable<object> ReadAsync(PipeReader pipe, IngestOptions options, [EnumeratorCancellation] CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(pipe);
        ArgumentNullException.ThrowIfNull(options);
        long lineNumber = 0;
        long total = 0;
        while (true)
        {
            var read = await pipe.ReadAsync(cancellationToken);
            var buffer = read.Buffer;
            var items = new List<object>();
            while (TryTakeLine(ref buffer, out var line))
            {
                lineNumber++;
                total += line.Length + 1;
                if (ParseLine(line, lineNumber, options) is { } item)
                {
                    items.Add(item);
                }
            }

            if (read.IsCompleted && buffer.Length > 0)
            {
                lineNumber++;
                total += buffer.Length;
                if (ParseLine(buffer, lineNumber, options) is { } item)
                {
                    items.Add(item);
                }

                buffer = buffer.Slice(buffer.End);
            }

            var pendingTooLong = buffer.Length > options.MaxBodyBytes;
            pipe.AdvanceTo(buffer.Start, buffer.End);
            foreach (var item in items)
            {
                yield return item;
            }

            if (total > options.MaxStreamBytes)
            {
                yield return new IngestFailure(new FhirIssue(ErrorCatalogue.BodyTooLarge, $"The body exceeds the limit of {options.MaxStreamBytes} bytes (Ingest:MaxStreamBytes).", null, lineNumber));
                yield break;
            }

            if (pendingTooLong)
            {
                yield return new IngestFailure(new FhirIssue(ErrorCatalogue.BodyTooLarge, $"Line {lineNumber + 1} exceeds {options.MaxBodyBytes} bytes (Ingest:MaxBodyBytes).", null, lineNumber + 1));
                yield break;
            }

            if (read.IsCompleted)
            {
                yield break;
            }
        }
    }

    private static bool TryTakeLine(ref ReadOnlySequence<byte> buffer, out ReadOnlySequence<byte> line)
    {
        var newline = buffer.PositionOf((byte)'\n');
        if (newline is null)
        {
            line = default;
            return false;
        }

        line = buffer.Slice(0, newline.Value);
        buffer = buffer.Slice(buffer.GetPosition(1, newline.Value));
        return true;
    }

    private static IngestItem? ParseLine(ReadOnlySequence<byte> line, long lineNumber, IngestOptions options)
    {
        if (IsBlank(line))
        {
            return null;
        }

        var ok = FhirJson.TryParseResource(line, options.MaxJsonDepth, out var resource, out var issues);
        var root = resource?.TypeName ?? "";
        var mapped = issues.Select(i => FhirIssue.FromParse(i) with { Line = lineNumber, Diagnostics = $"Line {lineNumber}: {i.Message}" }).ToList();
        return new IngestItem(ok ? resource : null, mapped, root, lineNumber);
    }

    private static bool IsBlank(ReadOnlySequence<byte> line)
    {
        foreach (var segment in line)
        {
            foreach (var b in segment.Span)
            {
                if (b is not ((byte)' ' or (byte)'\t' or (byte)'\r'))
                {
                    return false;
                }
            }
        }

        return true;
    }
}
