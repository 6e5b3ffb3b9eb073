using MeasureEval.Analytics.Probability;
using MeasureEval.Analytics.Summaries;
using MeasureEval.Engine;

namespace MeasureEval.Analytics.Trends;

/// <summary>One period of a trend and its change from the period before (pooled z-test; null for the first).</summary>
public sealed record TrendPoint(MeasurementPeriod Period, string Label, RateSummary Rate, TwoProportionResult? Change);

/// <summary>A measure's rate over consecutive periods.</summary>
public sealed record MeasureTrend(string MeasureId, TrendInterval Interval, IReadOnlyList<TrendPoint> Points)
{
    public static MeasureTrend Build(string measureId, TrendInterval interval, IReadOnlyList<(MeasurementPeriod Period, RateSummary Rate)> periods)
    {
        ArgumentNullException.ThrowIfNull(periods);
        var points = new List<TrendPoint>(periods.Count);
        for (var i = 0; i < periods.Count; i++)
        {
            var (period, rate) = periods[i];
            var change = i == 0 ? null : TwoProportionTest.Pooled(periods[i - 1].Rate.Numerator, periods[i - 1].Rate.N, rate.Numerator, rate.N);
            points.Add(new TrendPoint(period, TrendPeriods.Label(interval, period), rate, change));
        }

        return new MeasureTrend(measureId, interval, points);
    }
}
