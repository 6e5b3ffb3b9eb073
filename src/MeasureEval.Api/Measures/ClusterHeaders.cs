using System.Globalization;
using MeasureEval.Cluster.Partitions;

namespace MeasureEval.Api.Measures;

/// <summary>
/// Response headers of a population evaluation in cluster mode, so that a caller (and the cluster test) can see where the
/// work ran without reading logs: <c>X-Partitions-By-Node</c> (<c>node=count</c> for each node that returned partition
/// results, nodes as Orleans silo addresses <c>ip:port@generation</c>) and <c>X-Partition-Retries</c> (partition calls run again after a failure).
/// </summary>
public static class ClusterHeaders
{
    public const string PartitionsByNode = "X-Partitions-By-Node";

    public const string PartitionRetries = "X-Partition-Retries";

    public static void Write(HttpResponse response, ClusterRunResult? run)
    {
        ArgumentNullException.ThrowIfNull(response);
        if (run is null)
        {
            return;
        }

        response.Headers[PartitionsByNode] = string.Join(", ", run.PartitionSilos.Values
            .GroupBy(silo => silo, StringComparer.Ordinal)
            .OrderBy(g => g.Key, StringComparer.Ordinal)
            .Select(g => $"{g.Key}={g.Count().ToString(CultureInfo.InvariantCulture)}"));
        response.Headers[PartitionRetries] = run.Retries.ToString(CultureInfo.InvariantCulture);
    }
}
