using MeasureEval.Cluster.Hosting;
using MeasureEval.Cluster.Partitions;
using MeasureEval.Cluster.Placement;
using MeasureEval.Core.Index;
using MeasureEval.Core.Partitions;
using MeasureEval.Core.Storage;
using MeasureEval.Engine;
using Microsoft.Extensions.Logging;
using Microsoft.Extensions.Options;
using Orleans.Runtime;

namespace MeasureEval.Cluster.Grains;

/// <summary>Streams only its partition's rows of the shared store's index and aggregates them on the evaluation threads.</summary>
[PartitionSpreadPlacement]
internal sealed partial class PartitionGrain(
    IResourceStore store, ClusterMeasureSource measures, EvaluationScheduler scheduler, ILocalSiloDetails silo, IOptions<MeasureClusterOptions> options,
    ILogger<PartitionGrain> logger)
    : Grain, IPartitionGrain
{
    // Small batches keep facts and results short-lived (see the CLI's batch evaluation).
    private const int BatchSize = 32;

    public async System.Threading.Tasks.Task<PartitionResult> EvaluateAsync(ClusterEvaluationRequest request)
    {
        ArgumentNullException.ThrowIfNull(request);
        var partition = (int)this.GetPrimaryKeyLong(out _);
        var cancellationToken = CancellationToken.None;
        var repository = await measures.GetAsync(cancellationToken);
        var definitions = request.MeasureIds.Select(id => repository.TryGetMeasure(id, out var m) ? m : throw new InvalidOperationException($"measure '{id}' is not loaded on {silo.SiloAddress}")).ToArray();
        var period = new MeasurementPeriod(request.PeriodStart, request.PeriodEnd);
        var evaluator = new MeasureEvaluator(repository, new StoreRecordSource(store));
        var summaries = definitions.Select(m => new PopulationSummary(m, period, request.KeepSubjects)).ToArray();
        LogStarted(logger, partition);
        if (options.Value.PartitionStartDelay > TimeSpan.Zero)
        {
            await System.Threading.Tasks.Task.Delay(options.Value.PartitionStartDelay, cancellationToken);
        }

        // Everyone: only this partition's rows of the index. A Group: only its members that fall in this partition.
        var patients = request.PatientIds is null
            ? store.StreamPartitionFactsAsync(partition, request.Partitions, request.Scope, cancellationToken)
            : store.StreamPatientFactsAsync([.. request.PatientIds.Where(id => PatientPartitioner.PartitionOf(id, request.Partitions) == partition)], request.Scope, cancellationToken);
        var batch = new List<PatientFacts>(BatchSize);
        await foreach (var patient in patients)
        {
            if (request.Practitioner is not null && patient.Demographics?.GeneralPractitioner != request.Practitioner)
            {
                continue;
            }

            batch.Add(patient);
            if (batch.Count == BatchSize)
            {
                await EvaluateAsync(batch, evaluator, definitions, period, summaries, cancellationToken);
                batch = new List<PatientFacts>(BatchSize);
            }
        }

        if (batch.Count > 0)
        {
            await EvaluateAsync(batch, evaluator, definitions, period, summaries, cancellationToken);
        }

        DeactivateOnIdle();
        LogEvaluated(logger, partition);
        return new PartitionResult(partition, silo.SiloAddress.ToParsableString(), [.. summaries.Select(MeasurePartial.From)]);
    }

    private System.Threading.Tasks.Task<int> EvaluateAsync(
        List<PatientFacts> batch, MeasureEvaluator evaluator, MeasureDefinition[] definitions, MeasurementPeriod period, PopulationSummary[] summaries, CancellationToken cancellationToken) =>
        scheduler.Run(() =>
        {
            foreach (var patient in batch)
            {
                var results = evaluator.EvaluateAll(definitions, patient, period);
                for (var i = 0; i < summaries.Length; i++)
                {
                    summaries[i].Add(results[i]);
                }
            }

            return batch.Count;
        }, cancellationToken);

    [LoggerMessage(Level = LogLevel.Information, Message = "Partition {Partition} started on this node")]
    private static partial void LogStarted(ILogger logger, int partition);

    [LoggerMessage(Level = LogLevel.Information, Message = "Partition {Partition} evaluated on this node")]
    private static partial void LogEvaluated(ILogger logger, int partition);
}
