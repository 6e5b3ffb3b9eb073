using System.Globalization;
using System.Text;
using System.Text.Json;
using MeasureEval.Engine.Gaps;

namespace MeasureEval.Api.CareGaps;

/// <summary>
/// Writes export rows, one per patient and measure, as CSV (RFC 4180: every field quoted where needed, CRLF line ends)
/// or NDJSON, flushing as it goes so that a large export never sits in memory.
/// </summary>
public sealed class CareGapExportWriter(Stream output, ExportFormat format) : IAsyncDisposable
{
    /// <summary>The columns, in order; NDJSON uses the same names as keys.</summary>
    public static IReadOnlyList<string> Columns { get; } =
        ["patient_id", "panel", "payer", "measure_id", "period_start", "period_end", "status", "what_closes_it", "due_by", "last_evidence", "counts_through", "due_again_from"];

    private const int FlushEvery = 200;
    private readonly StreamWriter _writer = new(output, new UTF8Encoding(false), 16 * 1024, leaveOpen: true);
    private int _pending;

    public async Task WriteHeaderAsync(CancellationToken cancellationToken)
    {
        if (format == ExportFormat.Csv)
        {
            await _writer.WriteAsync(string.Join(",", Columns).AsMemory(), cancellationToken);
            await _writer.WriteAsync("\r\n".AsMemory(), cancellationToken);
        }
    }

    public async Task WriteAsync(CareGap gap, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(gap);
        string?[] fields =
        [
            gap.PatientId, gap.Panel, gap.Payer, gap.MeasureId, Day(gap.Period.Start), Day(gap.Period.End), gap.Status.Code(),
            gap.Actions.Count == 0 ? null : gap.ActionText, Day(gap.DueBy), gap.Evidence.Count == 0 ? null : gap.EvidenceText,
            Day(gap.CountsThrough), Day(gap.DueAgainFrom),
        ];
        var line = format == ExportFormat.Csv ? Csv(fields) : Json(gap, fields);
        await _writer.WriteAsync(line.AsMemory(), cancellationToken);
        if (++_pending >= FlushEvery)
        {
            _pending = 0;
            await _writer.FlushAsync(cancellationToken);
        }
    }

    public async ValueTask DisposeAsync()
    {
        await _writer.FlushAsync();
        await _writer.DisposeAsync();
    }

    private static string Csv(string?[] fields)
    {
        var line = new StringBuilder();
        for (var i = 0; i < fields.Length; i++)
        {
            if (i > 0)
            {
                line.Append(',');
            }

            var field = fields[i] ?? "";
            if (field.AsSpan().IndexOfAny(",\"\r\n") >= 0)
            {
                line.Append('"').Append(field.Replace("\"", "\"\"", StringComparison.Ordinal)).Append('"');
            }
            else
            {
                line.Append(field);
            }
        }

        return line.Append("\r\n").ToString();
    }

    /// <summary>The columns as keys, plus the structured actions, evidence and counts behind the texts.</summary>
    private static string Json(CareGap gap, string?[] fields)
    {
        using var buffer = new MemoryStream();
        using (var json = new Utf8JsonWriter(buffer))
        {
            json.WriteStartObject();
            for (var i = 0; i < fields.Length; i++)
            {
                if (fields[i] is { } value)
                {
                    json.WriteString(Columns[i], value);
                }
                else
                {
                    json.WriteNull(Columns[i]);
                }
            }

            json.WriteStartArray("actions");
            foreach (var action in gap.Actions)
            {
                json.WriteStartObject();
                json.WriteString("text", action.Text);
                json.WriteString("what", action.What);
                if (action.DueBy is { } due)
                {
                    json.WriteString("due_by", Day(due));
                }

                if (action.ValueSetUrl is { } valueSet)
                {
                    json.WriteString("value_set", valueSet);
                }

                if (action.Missing is { } missing)
                {
                    json.WriteNumber("missing", missing);
                }

                json.WriteStartArray("resource_types");
                action.ResourceTypes.ToList().ForEach(json.WriteStringValue);
                json.WriteEndArray();
                json.WriteStartArray("codes");
                foreach (var code in action.Codes)
                {
                    json.WriteStartObject();
                    json.WriteString("system", code.System);
                    json.WriteString("code", code.Code);
                    json.WriteEndObject();
                }

                json.WriteEndArray();
                json.WriteEndObject();
            }

            json.WriteEndArray();
            json.WriteStartArray("evidence");
            foreach (var evidence in gap.Evidence)
            {
                json.WriteStartObject();
                json.WriteString("text", evidence.Text);
                if (evidence.Date is { } date)
                {
                    json.WriteString("date", Day(date));
                }

                json.WriteBoolean("counts", evidence.Counts);
                json.WriteStartArray("references");
                evidence.References.ToList().ForEach(json.WriteStringValue);
                json.WriteEndArray();
                json.WriteEndObject();
            }

            json.WriteEndArray();
            json.WriteStartArray("counts");
            foreach (var count in gap.Counts)
            {
                json.WriteStartObject();
                json.WriteString("label", count.Label);
                json.WriteNumber("counted", count.Counted);
                json.WriteNumber("required", count.Required);
                json.WriteNumber("missing", count.Missing);
                json.WriteEndObject();
            }

            json.WriteEndArray();
            json.WriteEndObject();
        }

        return Encoding.UTF8.GetString(buffer.ToArray()) + "\n";
    }

    private static string? Day(DateOnly? date) => date?.ToString("yyyy-MM-dd", CultureInfo.InvariantCulture);
}
