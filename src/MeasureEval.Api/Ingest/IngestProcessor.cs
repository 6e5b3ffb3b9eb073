using System.Globalization;
using System.Threading.Channels;
using Hl7.Fhir.Model;
using MeasureEval.Api.Errors;
using MeasureEval.Api.Fhir;
using MeasureEval.Core.Storage;
using Microsoft.Extensions.Logging;
using Microsoft.Extensions.Options;

namespace MeasureEval.Api.Ingest;

/// <summary>What an ingest stored and refused. <see cref="Failure"/> is set when the body became unreadable part-way.</summary>
public sealed record IngestSummary(IReadOnlyDictionary<string, int> StoredByType, int Refused, IReadOnlyList<FhirIssue> Issues, FhirIssue? Failure)
{
    public int Stored => StoredByType.Values.Sum();
}

/// <summary>
/// Upserts streamed resources by id in batches of <see cref="IngestOptions.BulkBatchSize"/> (one store session each):
/// a refused line or entry does not stop the rest, and committed batches stay when the body breaks later.
/// </summary>
public sealed partial class IngestProcessor(IResourceStore store, IOptions<IngestOptions> options, ILogger<IngestProcessor> logger)
{
    /// <summary>Refusals beyond this many are counted but not itemised, so the answer to a bad export stays readable.</summary>
    public const int MaxReportedIssues = 1000;

    public async Task<IngestSummary> IngestAsync(IAsyncEnumerable<object> items, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(items);
        var storedByType = new SortedDictionary<string, int>(StringComparer.Ordinal);
        var issues = new List<FhirIssue>();
        var refused = 0;
        FhirIssue? failure = null;
        var pending = new List<Resource>(options.Value.BulkBatchSize);
        // Reading and parsing run ahead on another thread while a batch is written: the two costs overlap.
        var channel = Channel.CreateBounded<object>(new BoundedChannelOptions(2 * options.Value.BulkBatchSize) { SingleReader = true, SingleWriter = true });
        using var stop = CancellationTokenSource.CreateLinkedTokenSource(cancellationToken);
        var producer = ProduceAsync(items, channel.Writer, stop.Token);
        try
        {
            await foreach (var item in channel.Reader.ReadAllAsync(cancellationToken))
            {
                if (item is IngestFailure broken)
                {
                    failure = broken.Issue;
                    break;
                }

                var unit = (IngestItem)item;
                var found = unit.Issues.ToList();
                if (unit.Resource is { } resource && found.Count == 0 && string.IsNullOrEmpty(resource.Id))
                {
                    var where = unit.Line is { } line ? $"Line {line}: " : "";
                    found.Add(new FhirIssue(ErrorCatalogue.IngestIdMissing, $"{where}the {resource.TypeName} has no id; $ingest upserts by id.", $"{unit.Root}.id", unit.Line));
                }

                if (unit.Resource is { } kept && FhirResourceTypes.IsServerKept(kept.TypeName))
                {
                    var where = unit.Line is { } line ? $"Line {line}: " : "";
                    found.Add(new FhirIssue(ErrorCatalogue.AuditEventNotAResource, $"{where}{kept.TypeName} is written by the server only.", unit.Root, unit.Line));
                }

                if (found.Count > 0 || unit.Resource is null)
                {
                    refused++;
                    foreach (var issue in found)
                    {
                        if (issues.Count < MaxReportedIssues)
                        {
                            issues.Add(issue);
                        }
                    }

                    continue;
                }

                pending.Add(unit.Resource);
                if (pending.Count >= options.Value.BulkBatchSize)
                {
                    await FlushAsync(pending, storedByType, cancellationToken);
                }
            }

            await FlushAsync(pending, storedByType, cancellationToken);
        }
        finally
        {
            // Stops the reader if writing failed; after a normal end it has finished already.
            await stop.CancelAsync();
            await producer;
        }

        if (refused > 0 && issues.Count >= MaxReportedIssues)
        {
            issues.Add(new FhirIssue(ErrorCatalogue.IngestSummary, $"Only the first {MaxReportedIssues} issues are listed."));
        }

        LogIngested(storedByType.Values.Sum(), refused, failure is not null);
        return new IngestSummary(storedByType, refused, issues, failure);
    }

    private static async System.Threading.Tasks.Task ProduceAsync(IAsyncEnumerable<object> items, ChannelWriter<object> writer, CancellationToken cancellationToken)
    {
        await System.Threading.Tasks.Task.Yield();
        try
        {
            await foreach (var item in items.WithCancellation(cancellationToken))
            {
                await writer.WriteAsync(item, cancellationToken);
                if (item is IngestFailure)
                {
                    break;
                }
            }

            writer.Complete();
        }
        catch (Exception ex)
        {
            // Handed to the consumer, which rethrows it (or has stopped already).
            writer.Complete(ex);
        }
    }

    private async System.Threading.Tasks.Task FlushAsync(List<Resource> pending, SortedDictionary<string, int> storedByType, CancellationToken cancellationToken)
    {
        if (pending.Count == 0)
        {
            return;
        }

        await using (var session = await store.BeginWriteAsync(cancellationToken))
        {
            foreach (var resource in pending)
            {
                await session.UpdateAsync(resource, null, cancellationToken);
            }

            await session.CommitAsync(cancellationToken);
        }

        foreach (var resource in pending)
        {
            storedByType[resource.TypeName] = storedByType.GetValueOrDefault(resource.TypeName) + 1;
        }

        pending.Clear();
    }

    /// <summary>The 200 answer: counts as Parameters, refusals in an OperationOutcome part.</summary>
    public static Parameters ToParameters(IngestSummary summary)
    {
        ArgumentNullException.ThrowIfNull(summary);
        var parameters = new Parameters();
        parameters.Add("stored", new Integer(summary.Stored));
        parameters.Add("refused", new Integer(summary.Refused));
        foreach (var (type, count) in summary.StoredByType)
        {
            parameters.Parameter.Add(new Parameters.ParameterComponent
            {
                Name = "type",
                Part =
                [
                    new Parameters.ParameterComponent { Name = "resourceType", Value = new Code(type) },
                    new Parameters.ParameterComponent { Name = "stored", Value = new Integer(count) },
                ],
            });
        }

        var outcomeIssues = summary.Issues.Count > 0
            ? summary.Issues
            : [new FhirIssue(ErrorCatalogue.IngestSummary, $"Stored {summary.Stored.ToString(CultureInfo.InvariantCulture)} resources; nothing refused.")];
        parameters.Parameter.Add(new Parameters.ParameterComponent { Name = "outcome", Resource = OperationOutcomes.From(outcomeIssues) });
        return parameters;
    }

    /// <summary>The answer when the body broke part-way: the failure first, then what was kept, then the refusals.</summary>
    public static IReadOnlyList<FhirIssue> FailureIssues(IngestSummary summary)
    {
        ArgumentNullException.ThrowIfNull(summary);
        var kept = string.Join(", ", summary.StoredByType.Select(kv => $"{kv.Key} {kv.Value}"));
        return
        [
            summary.Failure!,
            new FhirIssue(ErrorCatalogue.IngestAborted, $"Stored {summary.Stored} resources before the failure ({(kept.Length > 0 ? kept : "none")}); refused {summary.Refused}."),
            .. summary.Issues,
        ];
    }

    [LoggerMessage(Level = LogLevel.Information, Message = "Ingest stored {Stored} resources, refused {Refused}, body broken: {Broken}")]
    private partial void LogIngested(int stored, int refused, bool broken);
}
