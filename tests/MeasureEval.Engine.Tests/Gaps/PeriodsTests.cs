using MeasureEval.Engine.Gaps;

namespace MeasureEval.Engine.Tests.Gaps;

public sealed class PeriodsTests
{
    [Fact]
    public void Shift_CalendarYearByYears() =>
        Assert.Equal(MeasurementPeriod.CalendarYear(2028), Periods.Shift(MeasurementPeriod.CalendarYear(2026), 2));

    [Fact]
    public void Shift_QuarterByMonthsKeepsMonthEnds() =>
        Assert.Equal(new MeasurementPeriod(new DateOnly(2026, 4, 1), new DateOnly(2026, 6, 30)), Periods.Shift(new MeasurementPeriod(new DateOnly(2026, 1, 1), new DateOnly(2026, 3, 31)), 1));

    [Fact]
    public void Shift_OtherPeriodsByDays() =>
        Assert.Equal(new MeasurementPeriod(new DateOnly(2026, 1, 11), new DateOnly(2026, 1, 20)), Periods.Shift(new MeasurementPeriod(new DateOnly(2026, 1, 1), new DateOnly(2026, 1, 10)), 1));
}
