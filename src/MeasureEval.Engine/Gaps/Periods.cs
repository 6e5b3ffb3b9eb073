namespace MeasureEval.Engine.Gaps;

/// <summary>Following periods of the same length: whole months shift by months (a calendar year by a year), others by days.</summary>
public static class Periods
{
    public static MeasurementPeriod Shift(MeasurementPeriod period, int times)
    {
        ArgumentNullException.ThrowIfNull(period);
        var after = period.End.AddDays(1);
        if (period.Start.Day == 1 && after.Day == 1)
        {
            var months = ((after.Year - period.Start.Year) * 12) + after.Month - period.Start.Month;
            var start = period.Start.AddMonths(months * times);
            return new MeasurementPeriod(start, start.AddMonths(months).AddDays(-1));
        }

        var days = period.End.DayNumber - period.Start.DayNumber + 1;
        return new MeasurementPeriod(period.Start.AddDays(days * times), period.End.AddDays(days * times));
    }
}
