namespace MeasureEval.Synthetic.Output;

/// <summary>What a writer produced: files written (relative names, in writing order) and resources per type.</summary>
public sealed record PopulationWriteSummary(IReadOnlyList<string> Files, IReadOnlyDictionary<string, long> ResourcesByType)
{
    public long TotalResources => ResourcesByType.Values.Sum();
}
