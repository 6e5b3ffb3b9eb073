using System.Globalization;
using System.Text.Encodings.Web;
using MeasureEval.Analytics.Probability;
using MeasureEval.Analytics.Summaries;
using MeasureEval.Engine;

namespace MeasureEval.Analytics.Reports;

/// <summary>How numbers and text appear in the report: invariant culture, percentages to one decimal, every text encoded.</summary>
public static class ReportFormat
{
    private static readonly CultureInfo Invariant = CultureInfo.InvariantCulture;

    /// <summary>HTML-encodes text for element content and attribute values alike.</summary>
    public static string Html(string? text) => HtmlEncoder.Default.Encode(text ?? string.Empty);

    // A no-break space keeps "62.5 %" on one line in narrow table cells.
    public static string Percent(double? value) => value is { } v ? (v * 100).ToString("0.0", Invariant) + "\u00A0%" : "—";

    public static string PercentBare(double value) => (value * 100).ToString("0.0", Invariant);

    public static string Interval(RateInterval? interval) =>
        interval is { } i ? $"{PercentBare(i.Lower)}–{PercentBare(i.Upper)}\u00A0%" : "—";

    /// <summary>"62.5 % (55.1–69.3 %) · 40/64", or "no rate (n = 0)".</summary>
    public static string RateLabel(RateSummary rate)
    {
        ArgumentNullException.ThrowIfNull(rate);
        return rate.Rate is null
            ? "no rate (n = 0)"
            : $"{Percent(rate.Rate)} ({Interval(rate.Interval)}) · {rate.Numerator.ToString(Invariant)}/{rate.N.ToString(Invariant)}";
    }

    public static string Number(double value, string format) => value.ToString(format, Invariant);

    public static string Int(int value) => value.ToString(Invariant);

    /// <summary>An SVG coordinate: two decimals, invariant.</summary>
    public static string Coordinate(double value) => value.ToString("0.##", Invariant);

    public static string Date(DateOnly date) => date.ToString("yyyy-MM-dd", Invariant);

    public static string Period(MeasurementPeriod period)
    {
        ArgumentNullException.ThrowIfNull(period);
        return $"{Date(period.Start)} to {Date(period.End)}";
    }

    public static string Position(FunnelPosition? position) => position switch
    {
        FunnelPosition.Within => "within 95 % limits",
        FunnelPosition.Above95 => "above 95 % limit",
        FunnelPosition.Above998 => "above 99.8 % limit",
        FunnelPosition.Below95 => "below 95 % limit",
        FunnelPosition.Below998 => "below 99.8 % limit",
        _ => "not compared",
    };

    public static string PositionCode(FunnelPosition? position) => position switch
    {
        FunnelPosition.Within => "within",
        FunnelPosition.Above95 => "above-95",
        FunnelPosition.Above998 => "above-99.8",
        FunnelPosition.Below95 => "below-95",
        FunnelPosition.Below998 => "below-99.8",
        _ => "not-compared",
    };
}
