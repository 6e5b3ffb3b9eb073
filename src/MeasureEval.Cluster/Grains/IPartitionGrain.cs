using MeasureEval.Cluster.Partitions;

namespace MeasureEval.Cluster.Grains;

/// <summary>Evaluates one partition; key: partition number, extension: job id and attempt (a retry is a new activation).</summary>
public interface IPartitionGrain : IGrainWithIntegerCompoundKey
{
    System.Threading.Tasks.Task<PartitionResult> EvaluateAsync(ClusterEvaluationRequest request);
}

/// <summary>Fans a population evaluation out over the partitions inside the cluster and merges the partials.</summary>
public interface IEvaluationCoordinatorGrain : IGrainWithGuidKey
{
    /// <summary>Runs every partition; <paramref name="progress"/>, when given, hears of each partition result as it arrives.</summary>
    System.Threading.Tasks.Task<ClusterRunResult> RunAsync(ClusterEvaluationRequest request, IPartitionProgressObserver? progress);
}

/// <summary>The caller's side of a run's progress (an object reference on the node that took the request).</summary>
public interface IPartitionProgressObserver : IGrainObserver
{
    /// <summary>
    /// <paramref name="done"/> of <paramref name="total"/> partitions have their result at the coordinator. Awaited (not
    /// one-way), so every count has been delivered when the run returns; concurrent calls may arrive out of order.
    /// </summary>
    System.Threading.Tasks.Task PartitionsDone(int done, int total);
}
