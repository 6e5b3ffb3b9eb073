using MathNet.Numerics.Distributions;
using MeasureEval.Analytics.Probability;

namespace MeasureEval.Analytics.Tests.Probability;

public class FunnelLimitsTests
{
    // The interpolated limit of Spiegelhalter (Stat Med 2005;24:1185, appendix on exact binomial limits) computed from an independent
    // binomial (MathNet.Numerics 5.0.0): r = smallest count with F(r) ≥ q, α = (F(r) − q)/(F(r) − F(r − 1)), (r − α)/n.
    private static double Reference(double q, int n, double p0)
    {
        var r = 0;
        while (Binomial.CDF(p0, n, r) < q)
        {
            r++;
        }

        var f = Binomial.CDF(p0, n, r);
        var below = r == 0 ? 0 : Binomial.CDF(p0, n, r - 1);
        return Math.Clamp((r - ((f - q) / (f - below))) / n, 0, 1);
    }

    [Theory]
    [InlineData(20, 0.65)]
    [InlineData(57, 0.42)]
    [InlineData(140, 0.81)]
    [InlineData(600, 0.12)]
    [InlineData(3000, 0.55)]
    public void At_AgreesWithIndependentBinomial(int n, double p0)
    {
        var limits = FunnelLimits.At(n, p0);
        Assert.Equal(Reference(0.001, n, p0), limits.Lower998, 1e-9);
        Assert.Equal(Reference(0.025, n, p0), limits.Lower95, 1e-9);
        Assert.Equal(Reference(0.975, n, p0), limits.Upper95, 1e-9);
        Assert.Equal(Reference(0.999, n, p0), limits.Upper998, 1e-9);
    }

    [Fact]
    public void At_LimitsAreNestedAroundTheTarget()
    {
        var limits = FunnelLimits.At(200, 0.6);
        Assert.True(limits.Lower998 < limits.Lower95);
        Assert.True(limits.Lower95 < 0.6 && 0.6 < limits.Upper95);
        Assert.True(limits.Upper95 < limits.Upper998);
    }

    [Fact]
    public void At_NarrowsAsNGrows()
    {
        // The funnel shape: limits close in on p0 roughly as 1/√n.
        var small = FunnelLimits.At(25, 0.5);
        var large = FunnelLimits.At(2500, 0.5);
        Assert.True(large.Upper95 - large.Lower95 < (small.Upper95 - small.Lower95) / 5);
    }

    [Fact]
    public void At_ClampsAtZero()
    {
        // Bin(10, 0.01): F(0) = 0.99^10 = 0.9044 ≥ 0.025, so r = 0 and (0 − α)/n is negative before clamping.
        Assert.Equal(0, FunnelLimits.At(10, 0.01).Lower95);
    }

    [Theory]
    [InlineData(100, 0.5, 50, FunnelPosition.Within)]
    [InlineData(100, 0.5, 62, FunnelPosition.Above95)]
    [InlineData(100, 0.5, 68, FunnelPosition.Above998)]
    [InlineData(100, 0.5, 38, FunnelPosition.Below95)]
    [InlineData(100, 0.5, 32, FunnelPosition.Below998)]
    public void Classify_AgainstBothLimits(int n, double p0, int numerator, FunnelPosition expected)
    {
        // Bin(100, 0.5) has sd 5: 62 is 2.4 sd above (between 2 and 3), 68 is 3.6 sd above (normal approximation, for choosing cases).
        Assert.Equal(expected, FunnelLimits.At(n, p0).Classify(numerator));
    }
}
