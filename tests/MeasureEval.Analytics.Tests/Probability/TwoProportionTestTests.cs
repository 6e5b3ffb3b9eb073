using MathNet.Numerics.Distributions;
using MeasureEval.Analytics.Probability;

namespace MeasureEval.Analytics.Tests.Probability;

public class TwoProportionTestTests
{
    [Fact]
    public void Pooled_WorkedCase()
    {
        // Formula: NIST/SEMATECH e-Handbook §7.3.3, Case 1 (pooled p̂, z = (p̂1 − p̂2)/√(p̂(1 − p̂)(1/n1 + 1/n2))).
        // §7.3.3 gives the formula without a numeric case; this one is worked by hand from it (from memory that it
        // also appears as a textbook exercise: verify): 140/200 vs 255/340 → p̂ = 395/540 = 0.731481,
        // SE = √(0.731481 · 0.268519 · (1/200 + 1/340)) = 0.0394940, z = (0.70 − 0.75)/0.0394940 = −1.266015.
        // Our z is later − earlier, so sample 1 here is the later period.
        var result = TwoProportionTest.Pooled(255, 340, 140, 200)!;
        Assert.Equal(0.731481, result.Pooled, 6);
        Assert.Equal(-1.266015, result.Z!.Value, 1e-6);
        Assert.Equal(-0.05, result.Difference, 12);
        Assert.False(result.Significant);

        // Two-sided p from an independent normal CDF (MathNet.Numerics 5.0.0): 2·Φ(−1.266015) = 0.2055.
        Assert.Equal(2 * Normal.CDF(0, 1, -Math.Abs(result.Z.Value)), result.PValue!.Value, 1e-6);
    }

    [Fact]
    public void Pooled_SignificantChange()
    {
        // Hand arithmetic from the §7.3.3 formula: 60/200 → 90/200: p̂ = 0.375, SE = √(0.375·0.625·0.01) = 0.048412,
        // z = 0.15/0.048412 = 3.0984 > 1.959964.
        var result = TwoProportionTest.Pooled(60, 200, 90, 200)!;
        Assert.Equal(3.0984, result.Z!.Value, 4);
        Assert.True(result.Significant);
    }

    [Fact]
    public void Pooled_NoVariation_NoZ()
    {
        var result = TwoProportionTest.Pooled(30, 30, 45, 45)!;
        Assert.Null(result.Z);
        Assert.Null(result.PValue);
        Assert.False(result.Significant);
    }

    [Fact]
    public void Pooled_EmptySample_Null()
    {
        Assert.Null(TwoProportionTest.Pooled(0, 0, 5, 10));
    }
}
