using MeasureEval.Analytics.Panels;
using MeasureEval.Analytics.Probability;
using MeasureEval.Analytics.Tests.Support;

namespace MeasureEval.Analytics.Tests.Panels;

public class PanelComparisonTests
{
    [Fact]
    public void Build_ComparesEachPanelWithTheNetworkRate()
    {
        var comparison = PanelComparison.Build(SampleReports.Summary(), 0.7m);

        // Network 170/280; Ortiz 90/116 = 77.6 %, well above; Haas 45/102 = 44.1 %, well below (both beyond 99.8 %).
        var ortiz = comparison.Panels.Single(p => p.Panel == "Practitioner/ortiz");
        Assert.Equal(FunnelLimits.At(116, 170.0 / 280), ortiz.Limits);
        Assert.Equal(FunnelPosition.Above998, ortiz.Position);
        Assert.Equal(FunnelPosition.Below998, comparison.Panels.Single(p => p.Panel == "Practitioner/haas").Position);
    }

    [Fact]
    public void Build_UnattributedAndEmptyPanelsAreNotCompared()
    {
        var comparison = PanelComparison.Build(SampleReports.Summary(), 0.7m);
        var unattributed = comparison.Panels.Single(p => p.Panel == PanelComparison.Unattributed);
        Assert.Null(unattributed.Limits);
        Assert.Null(unattributed.Position);
        Assert.NotNull(unattributed.PatientsToGoal);

        var empty = comparison.Panels.Single(p => p.Panel == "Practitioner/new");
        Assert.Null(empty.Position);
        Assert.Null(empty.PatientsToGoal);
    }

    [Fact]
    public void Build_GapToGoalPerPanelAndOverall()
    {
        var comparison = PanelComparison.Build(SampleReports.Summary(), 0.7m);

        // ceil(0.7 · 280) − 170 = 196 − 170 = 26; Haas ceil(0.7 · 102) − 45 = 72 − 45 = 27; Ortiz is past the target.
        Assert.Equal(26, comparison.NetworkPatientsToGoal);
        Assert.Equal(27, comparison.Panels.Single(p => p.Panel == "Practitioner/haas").PatientsToGoal);
        Assert.Equal(0, comparison.Panels.Single(p => p.Panel == "Practitioner/ortiz").PatientsToGoal);
    }

    [Fact]
    public void Build_InverseMeasureCountsPatientsLeavingTheNumerator()
    {
        var comparison = PanelComparison.Build(SampleReports.Summary(inverse: true), 0.2m);

        // 170 in the numerator of 280; at most floor(0.2 · 280) = 56 may stay: 114 must leave.
        Assert.True(comparison.Inverse);
        Assert.Equal(114, comparison.NetworkPatientsToGoal);
    }

    [Fact]
    public void Build_WithoutTarget_NoGapToGoal()
    {
        var comparison = PanelComparison.Build(SampleReports.Summary(), null);
        Assert.Null(comparison.NetworkPatientsToGoal);
        Assert.All(comparison.Panels, p => Assert.Null(p.PatientsToGoal));
    }

    [Fact]
    public void Build_CurveSpansThePanels()
    {
        var comparison = PanelComparison.Build(SampleReports.Summary(), null);
        Assert.True(comparison.Curve[^1].N >= 116);
        Assert.True(comparison.Curve.Count > 20);
        Assert.All(comparison.Curve, l => Assert.Equal(170.0 / 280, l.Target));
    }
}
