namespace MeasureEval.Engine.Tests.Reports;

public sealed class StatisticsTests
{
    // Worked examples of Newcombe 1998 (Stat Med 17:857, Table I, method 3 "score"), formula as in NIST e-Handbook 7.2.4.1.
    [Theory]
    [InlineData(81, 263, 0.2553, 0.3662)]
    [InlineData(15, 148, 0.0624, 0.1605)]
    [InlineData(0, 20, 0.0, 0.1611)]
    public void Wilson_PublishedExamples_MatchToFourDecimals(int numerator, int n, double lower, double upper)
    {
        var interval = Statistics.Wilson(numerator, n)!.Value;
        Assert.Equal(lower, interval.Lower, 4);
        Assert.Equal(upper, interval.Upper, 4);
    }

    [Fact]
    public void Wilson_EmptyDenominator_HasNoInterval() => Assert.Null(Statistics.Wilson(0, 0));

    [Fact]
    public void Wilson_AllSuccesses_ClampsAtOne()
    {
        // 20/20: the upper bound is exactly 1 and the lower bound mirrors 0/20 (1 − 0.1611, Newcombe 1998).
        var interval = Statistics.Wilson(20, 20)!.Value;
        Assert.Equal(1.0, interval.Upper, 10);
        Assert.Equal(0.8389, interval.Lower, 4);
    }
}
