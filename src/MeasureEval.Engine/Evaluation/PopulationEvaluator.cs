using System.Runtime.CompilerServices;
using System.Threading.Channels;
using MeasureEval.Core.Index;
using MeasureEval.Core.Partitions;

namespace MeasureEval.Engine;

/// <summary>
/// Evaluates several measures over a stream of patients in one pass: each patient's facts are read once, their dates
/// parsed once and shared definitions computed once for all measures.
/// </summary>
/// <remarks>
/// With <paramref name="workers"/> above 1 a summary is computed in parallel: one reader streams the patients and hands
/// each to the worker its id hashes to (<see cref="PatientPartitioner"/>, the store's and the cluster's partitioning:
/// stable across runs and processes); every worker aggregates its own partial summaries, which are then added up in worker order. Counts,
/// strata and findings are sums, so the result equals the serial one exactly; subject lists hold the same ids (the
/// report sorts them).
/// </remarks>
public sealed class PopulationEvaluator(MeasureEvaluator evaluator, int workers = 1)
{
    /// <summary>Patients queued per worker: enough to keep a worker busy while the reader decodes, small enough to bound memory.</summary>
    private const int QueuePerWorker = 256;

    /// <summary>Per patient, the results of every measure (same order as <paramref name="measures"/>).</summary>
    public async IAsyncEnumerable<IReadOnlyList<PatientResult>> EvaluateAsync(
        IAsyncEnumerable<PatientFacts> patients, IReadOnlyList<MeasureDefinition> measures, MeasurementPeriod period,
        [EnumeratorCancellation] CancellationToken cancellationToken)
    {
        await foreach (var patient in patients.WithCancellation(cancellationToken).ConfigureAwait(false))
        {
            yield return evaluator.EvaluateAll(measures, patient, period);
        }
    }

    /// <summary>Aggregates without keeping per-patient results (patient ids only when <paramref name="keepSubjects"/>).</summary>
    public Task<IReadOnlyList<PopulationSummary>> SummarizeAsync(
        IAsyncEnumerable<PatientFacts> patients, IReadOnlyList<MeasureDefinition> measures, MeasurementPeriod period, bool keepSubjects,
        CancellationToken cancellationToken) =>
        SummarizeAsync(patients, measures, period, keepSubjects, progress: null, total: 0, cancellationToken);

    /// <summary>As above, telling <paramref name="progress"/> after every patient: patients done of <paramref name="total"/> (0 when not known).</summary>
    public async Task<IReadOnlyList<PopulationSummary>> SummarizeAsync(
        IAsyncEnumerable<PatientFacts> patients, IReadOnlyList<MeasureDefinition> measures, MeasurementPeriod period, bool keepSubjects,
        IProgress<EvaluationProgress>? progress, long total, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(patients);
        ArgumentNullException.ThrowIfNull(measures);
        if (workers <= 1)
        {
            var summaries = NewSummaries(measures, period, keepSubjects);
            long done = 0;
            await foreach (var results in EvaluateAsync(patients, measures, period, cancellationToken).ConfigureAwait(false))
            {
                for (var i = 0; i < summaries.Length; i++)
                {
                    summaries[i].Add(results[i]);
                }

                progress?.Report(new EvaluationProgress(++done, total, EvaluationProgress.Patients));
            }

            return summaries;
        }

        return await SummarizeParallelAsync(patients, measures, period, keepSubjects, progress, total, cancellationToken).ConfigureAwait(false);
    }

    private async Task<IReadOnlyList<PopulationSummary>> SummarizeParallelAsync(
        IAsyncEnumerable<PatientFacts> patients, IReadOnlyList<MeasureDefinition> measures, MeasurementPeriod period, bool keepSubjects,
        IProgress<EvaluationProgress>? progress, long total, CancellationToken cancellationToken)
    {
        using var failed = CancellationTokenSource.CreateLinkedTokenSource(cancellationToken);
        var queues = Enumerable.Range(0, workers)
            .Select(_ => Channel.CreateBounded<PatientFacts>(new BoundedChannelOptions(QueuePerWorker) { SingleReader = true, SingleWriter = true }))
            .ToArray();
        var partials = Enumerable.Range(0, workers).Select(_ => NewSummaries(measures, period, keepSubjects)).ToArray();
        long done = 0;
        var running = queues.Select((queue, w) => Task.Run(
            async () =>
            {
                try
                {
                    await foreach (var patient in queue.Reader.ReadAllAsync(failed.Token).ConfigureAwait(false))
                    {
                        var results = evaluator.EvaluateAll(measures, patient, period);
                        for (var i = 0; i < results.Count; i++)
                        {
                            partials[w][i].Add(results[i]);
                        }

                        progress?.Report(new EvaluationProgress(Interlocked.Increment(ref done), total, EvaluationProgress.Patients));
                    }
                }
                catch
                {
                    // Stop the reader and the other workers; the first failure is rethrown below.
                    await failed.CancelAsync().ConfigureAwait(false);
                    throw;
                }
            },
            CancellationToken.None)).ToArray();

        Exception? readFailure = null;
        try
        {
            await foreach (var patient in patients.WithCancellation(failed.Token).ConfigureAwait(false))
            {
                await queues[PatientPartitioner.PartitionOf(patient.PatientId, workers)].Writer.WriteAsync(patient, failed.Token).ConfigureAwait(false);
            }
        }
        catch (Exception e)
        {
            readFailure = e;
            await failed.CancelAsync().ConfigureAwait(false);
        }
        finally
        {
            foreach (var queue in queues)
            {
                queue.Writer.TryComplete();
            }
        }

        try
        {
            await Task.WhenAll(running).ConfigureAwait(false);
        }
        catch (OperationCanceledException) when (readFailure is not null)
        {
            // The workers stopped because the reader failed; its exception is the one to report.
        }

        if (readFailure is not null)
        {
            System.Runtime.ExceptionServices.ExceptionDispatchInfo.Capture(readFailure).Throw();
        }

        var merged = NewSummaries(measures, period, keepSubjects);
        foreach (var partial in partials)
        {
            for (var i = 0; i < merged.Length; i++)
            {
                merged[i].Merge(partial[i]);
            }
        }

        return merged;
    }

    private static PopulationSummary[] NewSummaries(IReadOnlyList<MeasureDefinition> measures, MeasurementPeriod period, bool keepSubjects) =>
        [.. measures.Select(m => new PopulationSummary(m, period, keepSubjects))];
}
