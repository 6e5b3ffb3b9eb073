using MeasureEval.Analytics.Trends;
using MeasureEval.Engine;

namespace MeasureEval.Analytics.Tests.Trends;

public class TrendPeriodsTests
{
    [Fact]
    public void Of_QuartersOfACalendarYear()
    {
        var quarters = TrendPeriods.Of(TrendInterval.Quarter, MeasurementPeriod.CalendarYear(2026));
        Assert.Equal(
            [
                new MeasurementPeriod(new(2026, 1, 1), new(2026, 3, 31)),
                new MeasurementPeriod(new(2026, 4, 1), new(2026, 6, 30)),
                new MeasurementPeriod(new(2026, 7, 1), new(2026, 9, 30)),
                new MeasurementPeriod(new(2026, 10, 1), new(2026, 12, 31)),
            ],
            quarters);
        Assert.Equal("2026-Q3", TrendPeriods.Label(TrendInterval.Quarter, quarters[2]));
    }

    [Fact]
    public void Of_OnlyWholeQuartersFit()
    {
        var quarters = TrendPeriods.Of(TrendInterval.Quarter, new MeasurementPeriod(new(2026, 1, 1), new(2026, 8, 15)));
        Assert.Equal(2, quarters.Count);
    }

    [Fact]
    public void Of_Rolling12MonthsEndEachMonth()
    {
        var periods = TrendPeriods.Of(TrendInterval.Rolling12Months, MeasurementPeriod.CalendarYear(2026));
        Assert.Equal(12, periods.Count);
        Assert.Equal(new MeasurementPeriod(new(2025, 2, 1), new(2026, 1, 31)), periods[0]);

        // Calendar arithmetic: the window ending 2026-02-28 starts 2025-03-01.
        Assert.Equal(new MeasurementPeriod(new(2025, 3, 1), new(2026, 2, 28)), periods[1]);
        Assert.Equal(MeasurementPeriod.CalendarYear(2026), periods[11]);
        Assert.Equal("12 mo to 2026-02", TrendPeriods.Label(TrendInterval.Rolling12Months, periods[1]));
    }

    [Theory]
    [InlineData(null, TrendInterval.Quarter)]
    [InlineData("quarter", TrendInterval.Quarter)]
    [InlineData("rolling-12-months", TrendInterval.Rolling12Months)]
    public void TryParse_KnownCodes(string? code, TrendInterval expected)
    {
        Assert.True(TrendPeriods.TryParse(code, out var interval));
        Assert.Equal(expected, interval);
    }

    [Fact]
    public void TryParse_UnknownCode_False()
    {
        Assert.False(TrendPeriods.TryParse("weekly", out _));
    }
}
