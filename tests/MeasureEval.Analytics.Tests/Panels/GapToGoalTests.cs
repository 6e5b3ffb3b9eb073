using MeasureEval.Analytics.Panels;

namespace MeasureEval.Analytics.Tests.Panels;

public class GapToGoalTests
{
    [Theory]
    // ceil(0.70 · 100) − 62 = 8 (decimal: 0.7 × 100 is exactly 70, so not 9).
    [InlineData(62, 100, "0.70", 8)]
    [InlineData(70, 100, "0.70", 0)]
    [InlineData(75, 100, "0.70", 0)]
    // ceil(0.80 · 37) = ceil(29.6) = 30; 30 − 21 = 9.
    [InlineData(21, 37, "0.80", 9)]
    public void PatientsToClose_Increase(int numerator, int n, string target, int expected)
    {
        Assert.Equal(expected, GapToGoal.PatientsToClose(numerator, n, decimal.Parse(target, System.Globalization.CultureInfo.InvariantCulture), inverse: false));
    }

    [Theory]
    // Inverse: 30 in the numerator of 100, target 0.20 → at most floor(20) may stay: 10 must leave.
    [InlineData(30, 100, "0.20", 10)]
    [InlineData(15, 100, "0.20", 0)]
    // floor(0.25 · 37) = floor(9.25) = 9; 12 − 9 = 3.
    [InlineData(12, 37, "0.25", 3)]
    public void PatientsToClose_Inverse(int numerator, int n, string target, int expected)
    {
        Assert.Equal(expected, GapToGoal.PatientsToClose(numerator, n, decimal.Parse(target, System.Globalization.CultureInfo.InvariantCulture), inverse: true));
    }

    [Fact]
    public void PatientsToClose_TargetOutOfRange_Throws()
    {
        Assert.Throws<ArgumentOutOfRangeException>(() => GapToGoal.PatientsToClose(1, 2, 1.5m, inverse: false));
    }
}
