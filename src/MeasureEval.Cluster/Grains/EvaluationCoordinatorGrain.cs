using MeasureEval.Cluster.Hosting;
using MeasureEval.Cluster.Partitions;
using Microsoft.Extensions.Logging;
using Microsoft.Extensions.Options;
using Orleans.Placement;
using Orleans.Runtime;

namespace MeasureEval.Cluster.Grains;

/// <summary>
/// Runs inside the cluster, on the node that took the request, so a dead node is learned from membership (its calls
/// fail or time out here) and its partitions are run again, as new activations placed on the survivors.
/// </summary>
[PreferLocalPlacement]
internal sealed partial class EvaluationCoordinatorGrain(IOptions<MeasureClusterOptions> options, ILogger<EvaluationCoordinatorGrain> logger)
    : Grain, IEvaluationCoordinatorGrain
{
    private static readonly TimeSpan RetryDelay = TimeSpan.FromSeconds(1);
    private int _retries;
    private int _done;

    public async System.Threading.Tasks.Task<ClusterRunResult> RunAsync(ClusterEvaluationRequest request, IPartitionProgressObserver? progress)
    {
        ArgumentNullException.ThrowIfNull(request);
        var job = this.GetPrimaryKey().ToString("N");
        var results = await System.Threading.Tasks.Task.WhenAll(Enumerable.Range(0, request.Partitions).Select(async p =>
        {
            var result = await RunPartitionAsync(job, p, request);

            // Continuations run one at a time on the grain's scheduler, so the count needs no lock.
            _done++;
            if (progress is not null)
            {
                try
                {
                    await progress.PartitionsDone(_done, request.Partitions);
                }
                catch (Exception e) when (e is OrleansException or TimeoutException)
                {
                    // Progress is for the caller's information; losing a count must not fail the evaluation.
                    LogProgressLost(logger, e.GetType().Name);
                }
            }

            return result;
        }));
        var merged = request.MeasureIds.Select(id => new MeasurePartial { MeasureId = id, Subjects = request.KeepSubjects ? [] : null }).ToArray();
        foreach (var result in results)
        {
            for (var i = 0; i < merged.Length; i++)
            {
                merged[i].Merge(result.Measures[i]);
            }
        }

        DeactivateOnIdle();
        return new ClusterRunResult(merged, results.ToDictionary(r => r.Partition, r => r.Silo), _retries);
    }

    private async System.Threading.Tasks.Task<PartitionResult> RunPartitionAsync(string job, int partition, ClusterEvaluationRequest request)
    {
        for (var attempt = 0; ; attempt++)
        {
            try
            {
                return await GrainFactory.GetGrain<IPartitionGrain>(partition, $"{job}/{attempt}").EvaluateAsync(request);
            }
            catch (Exception e) when (e is OrleansException or TimeoutException && attempt + 1 < options.Value.PartitionAttempts)
            {
                _retries++;
                LogRetry(logger, partition, attempt + 1, e.GetType().Name);
                await System.Threading.Tasks.Task.Delay(RetryDelay);
            }
        }
    }

    [LoggerMessage(Level = LogLevel.Warning, Message = "A progress report to the caller failed ({Error})")]
    private static partial void LogProgressLost(ILogger logger, string error);

    [LoggerMessage(Level = LogLevel.Warning, Message = "Partition {Partition} failed ({Error}); attempt {Attempt} on the live nodes")]
    private static partial void LogRetry(ILogger logger, int partition, int attempt, string error);
}
