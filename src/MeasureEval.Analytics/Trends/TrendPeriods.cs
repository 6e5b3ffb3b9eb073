using MeasureEval.Engine;

namespace MeasureEval.Analytics.Trends;

/// <summary>How a span is cut into consecutive periods.</summary>
public enum TrendInterval
{
    /// <summary>Consecutive three-month periods from the span's first day.</summary>
    Quarter,

    /// <summary>Twelve-month periods ending on each month end in the span.</summary>
    Rolling12Months,
}

public static class TrendPeriods
{
    public const string QuarterCode = "quarter";
    public const string Rolling12MonthsCode = "rolling-12-months";

    public static bool TryParse(string? code, out TrendInterval interval)
    {
        switch (code)
        {
            case null or "" or QuarterCode:
                interval = TrendInterval.Quarter;
                return true;
            case Rolling12MonthsCode:
                interval = TrendInterval.Rolling12Months;
                return true;
            default:
                interval = default;
                return false;
        }
    }

    public static string Code(this TrendInterval interval) => interval == TrendInterval.Quarter ? QuarterCode : Rolling12MonthsCode;

    /// <summary>
    /// The periods of a span. Quarters: [start, start + 3 months − 1 day], then on, while a whole quarter fits the span.
    /// Rolling: for each month end E inside the span, [E + 1 day − 12 months, E] (calendar arithmetic, so 2026-02-28
    /// gives 2025-03-01 … 2026-02-28).
    /// </summary>
    public static IReadOnlyList<MeasurementPeriod> Of(TrendInterval interval, MeasurementPeriod span)
    {
        ArgumentNullException.ThrowIfNull(span);
        var periods = new List<MeasurementPeriod>();
        if (interval == TrendInterval.Quarter)
        {
            for (var start = span.Start; ; start = start.AddMonths(3))
            {
                var end = start.AddMonths(3).AddDays(-1);
                if (end > span.End)
                {
                    break;
                }

                periods.Add(new MeasurementPeriod(start, end));
            }
        }
        else
        {
            var monthEnd = new DateOnly(span.Start.Year, span.Start.Month, 1).AddMonths(1).AddDays(-1);
            for (; monthEnd <= span.End; monthEnd = new DateOnly(monthEnd.Year, monthEnd.Month, 1).AddMonths(2).AddDays(-1))
            {
                periods.Add(new MeasurementPeriod(monthEnd.AddDays(1).AddMonths(-12), monthEnd));
            }
        }

        return periods;
    }

    /// <summary>A short label: "2026-Q1" for a calendar quarter, otherwise the period's end month ("12 mo to 2026-03").</summary>
    public static string Label(TrendInterval interval, MeasurementPeriod period)
    {
        ArgumentNullException.ThrowIfNull(period);
        if (interval == TrendInterval.Quarter && period.Start.Day == 1 && (period.Start.Month - 1) % 3 == 0)
        {
            return $"{period.Start.Year}-Q{((period.Start.Month - 1) / 3) + 1}";
        }

        return interval == TrendInterval.Quarter
            ? $"{period.Start:yyyy-MM-dd}–{period.End:yyyy-MM-dd}"
            : $"12 mo to {period.End:yyyy-MM}";
    }
}
