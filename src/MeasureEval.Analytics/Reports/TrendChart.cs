using System.Text;
using MeasureEval.Analytics.Trends;
using static MeasureEval.Analytics.Reports.ReportFormat;

namespace MeasureEval.Analytics.Reports;

/// <summary>
/// The rate per period as a line with 95 % whiskers and a text label on every point. A point whose change from the
/// period before is significant (pooled z-test, 5 %) is drawn as a diamond and labelled as such.
/// </summary>
public static class TrendChart
{
    private const double Width = 860;
    private const double Height = 320;
    private const double Left = 64;
    private const double Right = 40;
    private const double Top = 24;
    private const double Bottom = 56;

    public static string Render(MeasureTrend trend)
    {
        ArgumentNullException.ThrowIfNull(trend);
        var svg = new StringBuilder();
        svg.Append($"<svg xmlns=\"http://www.w3.org/2000/svg\" class=\"chart\" data-chart=\"trend\" viewBox=\"0 0 {Coordinate(Width)} {Coordinate(Height)}\" role=\"img\" aria-labelledby=\"trend-title\">");
        svg.Append("<title id=\"trend-title\">Rate per period with 95 % intervals; diamonds mark a significant change from the period before</title>");
        var points = trend.Points;
        if (points.Count == 0)
        {
            svg.Append("<text x=\"20\" y=\"40\">No whole period fits the measurement period.</text></svg>");
            return svg.ToString();
        }

        var step = (Width - Left - Right) / points.Count;
        double X(int i) => Left + (step * (i + 0.5));
        double Y(double rate) => Top + ((1 - rate) * (Height - Top - Bottom));
        for (var tick = 0; tick <= 100; tick += 20)
        {
            var y = Y(tick / 100.0);
            svg.Append($"<line x1=\"{Coordinate(Left)}\" y1=\"{Coordinate(y)}\" x2=\"{Coordinate(Width - Right)}\" y2=\"{Coordinate(y)}\" stroke=\"{Palette.LightGrey}\"/>");
            svg.Append($"<text x=\"{Coordinate(Left - 6)}\" y=\"{Coordinate(y + 4)}\" text-anchor=\"end\" fill=\"{Palette.Grey}\">{tick} %</text>");
        }

        var line = new List<string>();
        for (var i = 0; i < points.Count; i++)
        {
            if (points[i].Rate.Rate is { } rate)
            {
                line.Add($"{Coordinate(X(i))},{Coordinate(Y(rate))}");
            }

            // Rolling windows are named by their last month on the axis (the axis title says the rest), so twelve fit.
            var axisLabel = trend.Interval == TrendInterval.Rolling12Months ? points[i].Period.End.ToString("yyyy-MM", System.Globalization.CultureInfo.InvariantCulture) : points[i].Label;
            svg.Append($"<text x=\"{Coordinate(X(i))}\" y=\"{Coordinate(Height - Bottom + 18)}\" text-anchor=\"middle\" font-size=\"11\" fill=\"{Palette.Grey}\">{Html(axisLabel)}</text>");
        }

        if (line.Count > 1)
        {
            svg.Append($"<polyline data-mark=\"trend-line\" points=\"{string.Join(' ', line)}\" fill=\"none\" stroke=\"{Palette.Blue}\" stroke-width=\"2\"/>");
        }

        for (var i = 0; i < points.Count; i++)
        {
            var point = points[i];
            var cx = X(i);
            if (point.Rate.Rate is not { } rate || point.Rate.Interval is not { } interval)
            {
                svg.Append($"<text data-mark=\"trend-gap\" x=\"{Coordinate(cx)}\" y=\"{Coordinate(Y(0.5))}\" text-anchor=\"middle\">no rate</text>");
                continue;
            }

            var cy = Y(rate);
            var significant = point.Change is { Significant: true };
            svg.Append($"<g data-mark=\"trend-point\" data-significant=\"{(significant ? "true" : "false")}\"><title>{Html(point.Label)}: {Html(RateLabel(point.Rate))}</title>");
            svg.Append($"<g stroke=\"{Palette.Black}\" stroke-width=\"1.2\"><line x1=\"{Coordinate(cx)}\" y1=\"{Coordinate(Y(interval.Lower))}\" x2=\"{Coordinate(cx)}\" y2=\"{Coordinate(Y(interval.Upper))}\"/>")
                .Append($"<line x1=\"{Coordinate(cx - 5)}\" y1=\"{Coordinate(Y(interval.Lower))}\" x2=\"{Coordinate(cx + 5)}\" y2=\"{Coordinate(Y(interval.Lower))}\"/>")
                .Append($"<line x1=\"{Coordinate(cx - 5)}\" y1=\"{Coordinate(Y(interval.Upper))}\" x2=\"{Coordinate(cx + 5)}\" y2=\"{Coordinate(Y(interval.Upper))}\"/></g>");
            svg.Append(significant
                ? $"<path d=\"M{Coordinate(cx)} {Coordinate(cy - 8)} L{Coordinate(cx + 8)} {Coordinate(cy)} L{Coordinate(cx)} {Coordinate(cy + 8)} L{Coordinate(cx - 8)} {Coordinate(cy)} Z\" fill=\"{Palette.Vermillion}\" stroke=\"{Palette.Black}\"/>"
                : $"<circle cx=\"{Coordinate(cx)}\" cy=\"{Coordinate(cy)}\" r=\"5\" fill=\"{Palette.SkyBlue}\" stroke=\"{Palette.Black}\"/>");
            var label = significant ? $"{Percent(rate)} significant change" : Percent(rate);
            svg.Append($"<text x=\"{Coordinate(cx + 8)}\" y=\"{Coordinate(cy - 10)}\" font-size=\"11\">{Html(label)}</text></g>");
        }

        svg.Append($"<text x=\"{Coordinate((Left + Width - Right) / 2)}\" y=\"{Coordinate(Height - 12)}\" text-anchor=\"middle\" fill=\"{Palette.Grey}\">{Html(trend.Interval == TrendInterval.Quarter ? "quarter" : "12 months ending")}</text>");
        svg.Append("</svg>");
        return svg.ToString();
    }
}
