using MeasureEval.Analytics.Probability;
using MeasureEval.Analytics.Summaries;
using MeasureEval.Engine;

namespace MeasureEval.Analytics.Panels;

/// <summary>One primary-care panel against the network.</summary>
/// <param name="Limits">Funnel limits at the panel's n around the network rate; null for the unattributed group or n = 0.</param>
/// <param name="Position">Where the panel's rate lies against those limits; null with <paramref name="Limits"/>.</param>
/// <param name="PatientsToGoal">How many gaps must close to reach the target; null without a target or n = 0.</param>
public sealed record PanelRow(string Panel, string Label, RateSummary Rate, FunnelLimitSet? Limits, FunnelPosition? Position, int? PatientsToGoal);

/// <summary>Each panel's rate against the network rate, with funnel limits and gap-to-goal.</summary>
/// <param name="Curve">The limits at a spread of n for drawing the funnel (empty when the network has no rate).</param>
public sealed record PanelComparison(
    string MeasureId,
    bool Inverse,
    RateSummary Network,
    decimal? Target,
    int? NetworkPatientsToGoal,
    IReadOnlyList<PanelRow> Panels,
    IReadOnlyList<FunnelLimitSet> Curve)
{
    /// <summary>The stratum of patients with no generalPractitioner: shown, never compared as if it were a panel.</summary>
    public const string Unattributed = "unattributed";

    public static PanelComparison Build(MeasureSummary summary, decimal? target)
    {
        ArgumentNullException.ThrowIfNull(summary);
        if (target is < 0 or > 1)
        {
            throw new ArgumentOutOfRangeException(nameof(target), target, "a target rate lies in [0, 1]");
        }

        var network = summary.Overall;
        var p0 = network.Rate;
        var panels = new List<PanelRow>();
        foreach (var stratum in summary.StratifierOf(StratifierKind.Panel)?.Strata ?? [])
        {
            var rate = stratum.Rate;
            FunnelLimitSet? limits = null;
            FunnelPosition? position = null;
            if (p0 is { } p && rate.N > 0 && stratum.Code != Unattributed)
            {
                limits = FunnelLimits.At(rate.N, p);
                position = limits.Classify(rate.Numerator);
            }

            panels.Add(new PanelRow(stratum.Code, stratum.Label, rate, limits, position, ToGoal(rate, target, summary.IsInverse)));
        }

        var compared = panels.Where(r => r.Limits is not null).Select(r => r.Rate.N).ToList();
        IReadOnlyList<FunnelLimitSet> curve = p0 is { } target0 && compared.Count > 0
            ? CurveNs(compared.Min(), compared.Max()).Select(n => FunnelLimits.At(n, target0)).ToList()
            : [];
        return new PanelComparison(summary.MeasureId, summary.IsInverse, network, target, ToGoal(network, target, summary.IsInverse), panels, curve);
    }

    private static int? ToGoal(RateSummary rate, decimal? target, bool inverse) =>
        target is { } t && rate.N > 0 ? GapToGoal.PatientsToClose(rate.Numerator, rate.N, t, inverse) : null;

    // Geometric spacing from the smallest compared panel (at most 5) to a little past the largest, so that every
    // panel has its limits drawn above and below it.
    private static IEnumerable<int> CurveNs(int minN, int maxN)
    {
        var bottom = Math.Min(5, minN);
        var top = Math.Max(bottom + 5, (int)Math.Ceiling(maxN * 1.1));
        var seen = new SortedSet<int>();
        const int steps = 48;
        for (var i = 0; i <= steps; i++)
        {
            seen.Add((int)Math.Round(bottom * Math.Pow((double)top / bottom, (double)i / steps)));
        }

        return seen;
    }
}
