using MeasureEval.Engine;

namespace MeasureEval.Cluster.Hosting;

/// <summary>The host's measure catalogue, as the partition grains see it (every node loads the same definitions).</summary>
public sealed class ClusterMeasureSource(IServiceProvider services, Func<IServiceProvider, CancellationToken, System.Threading.Tasks.Task<MeasureRepository>> load)
{
    public System.Threading.Tasks.Task<MeasureRepository> GetAsync(CancellationToken cancellationToken) => load(services, cancellationToken);
}
