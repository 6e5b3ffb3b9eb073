using System.Text;
using MeasureEval.Analytics.Summaries;
using static MeasureEval.Analytics.Reports.ReportFormat;

namespace MeasureEval.Analytics.Reports;

/// <summary>
/// Horizontal bars of the overall rate and every stratum's rate, each with its 95 % interval as a whisker and a text
/// label (rate, interval, numerator/n). The overall bar is hatched as well as coloured; a stratum with no rate gets a
/// text row and no bar.
/// </summary>
public static class StrataChart
{
    private const double Width = 860;
    private const double LabelWidth = 200;
    private const double PlotWidth = 400;
    private const double RowHeight = 24;
    private const double GroupGap = 20;
    private const double Top = 28;

    public static string Render(MeasureSummary summary, Func<StratifierSummary, string> stratifierTitle)
    {
        ArgumentNullException.ThrowIfNull(summary);
        ArgumentNullException.ThrowIfNull(stratifierTitle);
        var rows = new List<(string? Group, string Label, RateSummary Rate, bool Overall)> { (null, "All patients", summary.Overall, true) };
        foreach (var stratifier in summary.Stratifiers.Where(s => s.Strata.Count > 0))
        {
            var first = true;
            foreach (var stratum in stratifier.Strata)
            {
                rows.Add((first ? stratifierTitle(stratifier) : null, stratum.Label, stratum.Rate, false));
                first = false;
            }
        }

        var groups = rows.Count(r => r.Group is not null);
        var height = Top + (rows.Count * RowHeight) + (groups * GroupGap) + 30;
        var svg = new StringBuilder();
        svg.Append($"<svg xmlns=\"http://www.w3.org/2000/svg\" class=\"chart\" data-chart=\"strata\" viewBox=\"0 0 {Coordinate(Width)} {Coordinate(height)}\" role=\"img\" aria-labelledby=\"strata-title\">");
        svg.Append($"<title id=\"strata-title\">Rate with 95 % interval, overall and by stratum: {Html(summary.Title)}</title>");
        svg.Append("<defs><pattern id=\"hatch\" width=\"6\" height=\"6\" patternUnits=\"userSpaceOnUse\" patternTransform=\"rotate(45)\">")
            .Append($"<rect width=\"6\" height=\"6\" fill=\"{Palette.BluishGreen}\"/><line x1=\"0\" y1=\"0\" x2=\"0\" y2=\"6\" stroke=\"#FFFFFF\" stroke-width=\"2\"/></pattern></defs>");

        var plotBottom = height - 24;
        Axis(svg, plotBottom);

        var y = Top;
        foreach (var row in rows)
        {
            if (row.Group is not null)
            {
                y += GroupGap;
                svg.Append($"<text class=\"group\" x=\"4\" y=\"{Coordinate(y - 6)}\" font-weight=\"bold\">{Html(row.Group)}</text>");
            }

            var mid = y + (RowHeight / 2);
            svg.Append($"<text x=\"{Coordinate(LabelWidth - 8)}\" y=\"{Coordinate(mid + 4)}\" text-anchor=\"end\"><title>{Html(row.Label)}</title>{Html(Shorten(row.Label))}</text>");
            if (row.Rate.Rate is { } rate && row.Rate.Interval is { } interval)
            {
                var fill = row.Overall ? "url(#hatch)" : Palette.SkyBlue;
                svg.Append($"<rect data-mark=\"bar\" x=\"{Coordinate(LabelWidth)}\" y=\"{Coordinate(y + 4)}\" width=\"{Coordinate(X(rate) - LabelWidth)}\" height=\"{Coordinate(RowHeight - 8)}\" fill=\"{fill}\" stroke=\"{Palette.Black}\" stroke-width=\"0.5\"><title>{Html(row.Label)}: {Html(RateLabel(row.Rate))}</title></rect>");
                var x1 = X(interval.Lower);
                var x2 = X(interval.Upper);
                svg.Append($"<g data-mark=\"whisker\" stroke=\"{Palette.Black}\" stroke-width=\"1.5\">")
                    .Append($"<line x1=\"{Coordinate(x1)}\" y1=\"{Coordinate(mid)}\" x2=\"{Coordinate(x2)}\" y2=\"{Coordinate(mid)}\"/>")
                    .Append($"<line x1=\"{Coordinate(x1)}\" y1=\"{Coordinate(mid - 6)}\" x2=\"{Coordinate(x1)}\" y2=\"{Coordinate(mid + 6)}\"/>")
                    .Append($"<line x1=\"{Coordinate(x2)}\" y1=\"{Coordinate(mid - 6)}\" x2=\"{Coordinate(x2)}\" y2=\"{Coordinate(mid + 6)}\"/></g>");
            }

            svg.Append($"<text data-mark=\"bar-label\" x=\"{Coordinate(LabelWidth + PlotWidth + 10)}\" y=\"{Coordinate(mid + 4)}\">{Html(RateLabel(row.Rate))}</text>");
            y += RowHeight;
        }

        svg.Append("</svg>");
        return svg.ToString();
    }

    // The label column is fixed; a longer name is cut with an ellipsis (the full name is in the tooltip and the table).
    private static string Shorten(string label) => label.Length <= 30 ? label : string.Concat(label.AsSpan(0, 29), "…");

    private static double X(double rate) => LabelWidth + (rate * PlotWidth);

    private static void Axis(StringBuilder svg, double bottom)
    {
        for (var tick = 0; tick <= 100; tick += 25)
        {
            var x = X(tick / 100.0);
            svg.Append($"<line x1=\"{Coordinate(x)}\" y1=\"{Coordinate(Top - 8)}\" x2=\"{Coordinate(x)}\" y2=\"{Coordinate(bottom)}\" stroke=\"{Palette.LightGrey}\" stroke-width=\"1\"/>");
            svg.Append($"<text x=\"{Coordinate(x)}\" y=\"{Coordinate(bottom + 16)}\" text-anchor=\"middle\" fill=\"{Palette.Grey}\">{tick} %</text>");
        }

        svg.Append($"<text x=\"{Coordinate(LabelWidth + PlotWidth + 10)}\" y=\"16\" fill=\"{Palette.Grey}\">rate (95 % interval) · numerator/n</text>");
    }
}
