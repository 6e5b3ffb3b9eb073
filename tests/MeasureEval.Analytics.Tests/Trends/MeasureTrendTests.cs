using MeasureEval.Analytics.Tests.Support;

namespace MeasureEval.Analytics.Tests.Trends;

public class MeasureTrendTests
{
    [Fact]
    public void Build_ChangeBetweenConsecutivePeriods()
    {
        var points = SampleReports.Report().Trend.Points;
        Assert.Null(points[0].Change);

        // 80/200 → 84/200: +2 points, not significant; 84/200 → 120/200: pooled p̂ = 0.51,
        // z = 0.18/√(0.51·0.49·0.01) = 3.601 (hand arithmetic, NIST e-Handbook §7.3.3 formula): significant.
        Assert.Equal(0.02, points[1].Change!.Difference, 12);
        Assert.False(points[1].Change!.Significant);
        Assert.Equal(3.601, points[2].Change!.Z!.Value, 3);
        Assert.True(points[2].Change!.Significant);

        // A period with nobody rated has no test.
        Assert.Null(points[3].Change);
    }
}
