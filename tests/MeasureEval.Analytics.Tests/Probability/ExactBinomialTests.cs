using MathNet.Numerics.Distributions;
using MeasureEval.Analytics.Probability;

namespace MeasureEval.Analytics.Tests.Probability;

public class ExactBinomialTests
{
    [Theory]
    [InlineData(10, 0.5)]
    [InlineData(37, 0.62)]
    [InlineData(250, 0.08)]
    [InlineData(4000, 0.71)]
    public void Cumulative_AgreesWithMathNet(int n, double p)
    {
        // Independent implementation: MathNet.Numerics 5.0.0 Binomial.CDF (regularized incomplete beta).
        for (var r = 0; r <= n; r += Math.Max(1, n / 40))
        {
            Assert.Equal(Binomial.CDF(p, n, r), ExactBinomial.Cumulative(r, n, p), 1e-10);
        }
    }

    [Fact]
    public void Probability_SmallCaseByHand()
    {
        // Bin(4, 0.5): P(R = 2) = C(4,2)/16 = 6/16 (textbook arithmetic).
        Assert.Equal(0.375, ExactBinomial.Probability(2, 4, 0.5), 1e-14);
    }

    [Fact]
    public void Probability_LargeNDoesNotUnderflowNearTheMode()
    {
        // 0.5^10000 underflows a naive product; the mass at the mode is ≈ 1/√(π·n/2) = 0.007979 (normal approximation).
        Assert.Equal(Binomial.PMF(0.5, 10000, 5000), ExactBinomial.Probability(5000, 10000, 0.5), 1e-12);
    }

    [Theory]
    [InlineData(0.025, 50, 0.7)]
    [InlineData(0.975, 50, 0.7)]
    [InlineData(0.001, 500, 0.3)]
    [InlineData(0.999, 500, 0.3)]
    [InlineData(0.5, 7, 0.05)]
    public void Quantile_IsTheSmallestCountReachingTheLevel(double q, int n, double p)
    {
        var r = ExactBinomial.Quantile(q, n, p);
        Assert.True(Binomial.CDF(p, n, r) >= q);
        Assert.True(r == 0 || Binomial.CDF(p, n, r - 1) < q);
    }

    [Fact]
    public void Quantile_DegenerateProbabilities()
    {
        Assert.Equal(0, ExactBinomial.Quantile(0.999, 20, 0));
        Assert.Equal(20, ExactBinomial.Quantile(0.001, 20, 1));
    }
}
