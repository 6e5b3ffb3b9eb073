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
    System.Threading.Tasks.Task<ClusterRunResult> RunAsync(ClusterEvaluationRequest request);
}
