using MeasureEval.Analytics.Summaries;

namespace MeasureEval.Analytics.Tests.Summaries;

public class RateSummaryTests
{
    [Theory]
    // Newcombe RG, Stat Med 1998;17:857–872, Table I (method 3, Wilson score without continuity correction);
    // formula NIST e-Handbook §7.2.4.1.
    [InlineData(81, 263, 0.2553, 0.3662)]
    [InlineData(15, 148, 0.0624, 0.1605)]
    [InlineData(0, 20, 0.0, 0.1611)]
    public void Interval_NewcombeValues(int numerator, int n, double lower, double upper)
    {
        var summary = new RateSummary(n, n, 0, 0, numerator);
        Assert.Equal(lower, summary.Interval!.Value.Lower, 4);
        Assert.Equal(upper, summary.Interval!.Value.Upper, 4);
    }

    [Fact]
    public void Interval_OnDenominatorLessExclusionsAndExceptions()
    {
        // 300 in the denominator, 25 excluded, 12 excepted: n = 263 — the same interval as 81/263 above.
        var summary = new RateSummary(310, 300, 25, 12, 81);
        Assert.Equal(263, summary.N);
        Assert.Equal(81.0 / 263, summary.Rate!.Value, 12);
        Assert.Equal(0.2553, summary.Interval!.Value.Lower, 4);
    }

    [Fact]
    public void Rate_NoneWhenNothingIsRated()
    {
        var summary = new RateSummary(4, 4, 4, 0, 0);
        Assert.Null(summary.Rate);
        Assert.Null(summary.Interval);
    }

    [Fact]
    public void OpenGaps_DependsOnImprovementNotation()
    {
        var summary = new RateSummary(100, 100, 0, 0, 30);
        Assert.Equal(70, summary.OpenGaps(inverse: false));
        Assert.Equal(30, summary.OpenGaps(inverse: true));
    }
}
