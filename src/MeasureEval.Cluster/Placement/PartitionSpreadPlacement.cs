using Orleans.Placement;
using Orleans.Runtime;
using Orleans.Runtime.Placement;

namespace MeasureEval.Cluster.Placement;

/// <summary>
/// Places partition grains round-robin by partition number over the live silos (sorted by address, so every node
/// computes the same spread): a burst of 64 activations lands evenly, which the default random placement does not do.
/// </summary>
[GenerateSerializer, Immutable, SuppressReferenceTracking]
public sealed class PartitionSpreadPlacement : PlacementStrategy
{
    internal static readonly PartitionSpreadPlacement Instance = new();
}

[AttributeUsage(AttributeTargets.Class, AllowMultiple = false)]
public sealed class PartitionSpreadPlacementAttribute() : PlacementAttribute(PartitionSpreadPlacement.Instance);

public sealed class PartitionSpreadPlacementDirector : IPlacementDirector
{
    public System.Threading.Tasks.Task<SiloAddress> OnAddActivation(PlacementStrategy strategy, PlacementTarget target, IPlacementContext context)
    {
        ArgumentNullException.ThrowIfNull(context);
        var silos = context.GetCompatibleSilos(target).OrderBy(s => s.ToParsableString(), StringComparer.Ordinal).ToArray();
        var partition = target.GrainIdentity.GetIntegerKey(out _);
        return System.Threading.Tasks.Task.FromResult(silos[(int)(partition % silos.Length)]);
    }
}
