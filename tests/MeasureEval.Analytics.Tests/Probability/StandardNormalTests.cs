using MathNet.Numerics.Distributions;
using MeasureEval.Analytics.Probability;

namespace MeasureEval.Analytics.Tests.Probability;

public class StandardNormalTests
{
    [Theory]
    [InlineData(-3.5)]
    [InlineData(-1.959964)]
    [InlineData(-0.3)]
    [InlineData(0)]
    [InlineData(1.0)]
    [InlineData(2.5758)]
    public void Cdf_AgreesWithMathNet(double z)
    {
        Assert.Equal(Normal.CDF(0, 1, z), StandardNormal.Cdf(z), 1e-7);
    }

    [Fact]
    public void TwoSidedP_AtTheFivePercentCriticalValue()
    {
        // z(0.975) = 1.959964 (standard normal table, NIST e-Handbook 1.3.6.7.1): two-sided p = 0.05.
        Assert.Equal(0.05, StandardNormal.TwoSidedP(1.959964), 1e-6);
    }
}
