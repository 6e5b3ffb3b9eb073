using System.Text;
using MeasureEval.Analytics.Panels;
using MeasureEval.Analytics.Probability;
using static MeasureEval.Analytics.Reports.ReportFormat;

namespace MeasureEval.Analytics.Reports;

/// <summary>
/// Funnel plot: each panel's rate against its n, the network rate as a solid line, the 95 % limits dashed and the
/// 99.8 % limits dotted. A panel's shape says where it lies (circle within, triangle up above, triangle down below;
/// a second ring beyond 99.8 %), and each carries its name as text.
/// </summary>
public static class FunnelChart
{
    private const double Width = 860;
    private const double Height = 440;
    private const double Left = 64;
    private const double Right = 150;
    private const double Top = 20;
    private const double Bottom = 52;

    public static string Render(PanelComparison comparison)
    {
        ArgumentNullException.ThrowIfNull(comparison);
        var svg = new StringBuilder();
        svg.Append($"<svg xmlns=\"http://www.w3.org/2000/svg\" class=\"chart\" data-chart=\"funnel\" viewBox=\"0 0 {Coordinate(Width)} {Coordinate(Height)}\" role=\"img\" aria-labelledby=\"funnel-title\">");
        svg.Append("<title id=\"funnel-title\">Funnel plot of panel rates against the network rate with 95 % and 99.8 % exact binomial limits</title>");
        var compared = comparison.Panels.Where(p => p.Limits is not null).ToList();
        if (comparison.Network.Rate is not { } network || compared.Count == 0)
        {
            svg.Append("<text x=\"20\" y=\"40\">No panel to compare: the network has no rate or no patient is attributed to a panel.</text></svg>");
            return svg.ToString();
        }

        var maxN = Math.Max(comparison.Curve.Count > 0 ? comparison.Curve[^1].N : 1, compared.Max(p => p.Rate.N));
        double X(double n) => Left + (n / maxN * (Width - Left - Right));
        double Y(double rate) => Top + ((1 - rate) * (Height - Top - Bottom));

        // Axes and grid.
        for (var tick = 0; tick <= 100; tick += 20)
        {
            var y = Y(tick / 100.0);
            svg.Append($"<line x1=\"{Coordinate(Left)}\" y1=\"{Coordinate(y)}\" x2=\"{Coordinate(Width - Right)}\" y2=\"{Coordinate(y)}\" stroke=\"{Palette.LightGrey}\"/>");
            svg.Append($"<text x=\"{Coordinate(Left - 6)}\" y=\"{Coordinate(y + 4)}\" text-anchor=\"end\" fill=\"{Palette.Grey}\">{tick} %</text>");
        }

        foreach (var n in NiceTicks(maxN))
        {
            svg.Append($"<text x=\"{Coordinate(X(n))}\" y=\"{Coordinate(Height - Bottom + 18)}\" text-anchor=\"middle\" fill=\"{Palette.Grey}\">{Int(n)}</text>");
        }

        svg.Append($"<text x=\"{Coordinate((Left + Width - Right) / 2)}\" y=\"{Coordinate(Height - 10)}\" text-anchor=\"middle\" fill=\"{Palette.Grey}\">patients in the rate (n)</text>");
        svg.Append($"<line x1=\"{Coordinate(Left)}\" y1=\"{Coordinate(Top)}\" x2=\"{Coordinate(Left)}\" y2=\"{Coordinate(Height - Bottom)}\" stroke=\"{Palette.Grey}\"/>");
        svg.Append($"<line x1=\"{Coordinate(Left)}\" y1=\"{Coordinate(Height - Bottom)}\" x2=\"{Coordinate(Width - Right)}\" y2=\"{Coordinate(Height - Bottom)}\" stroke=\"{Palette.Grey}\"/>");

        // Network rate and the four limit curves, each with a text label at its right end.
        svg.Append($"<line data-mark=\"network\" x1=\"{Coordinate(Left)}\" y1=\"{Coordinate(Y(network))}\" x2=\"{Coordinate(Width - Right)}\" y2=\"{Coordinate(Y(network))}\" stroke=\"{Palette.Black}\" stroke-width=\"2\"/>");
        svg.Append($"<text x=\"{Coordinate(Left + 6)}\" y=\"{Coordinate(Y(network) - 6)}\" font-weight=\"bold\">network {Html(Percent(network))}</text>");
        // End labels: the 99.8 % label keeps at least a line away from the 95 % one (both lower limits are often 0).
        var last = comparison.Curve.Count > 0 ? comparison.Curve[^1] : null;
        var upper95 = last is null ? 0 : Y(last.Upper95);
        var lower95 = last is null ? 0 : Y(last.Lower95);
        Curve(svg, comparison.Curve, l => l.Upper998, X, Y, "limit-99.8", Palette.Vermillion, "2 3", "99.8 % upper", Math.Min(upper95 - 12, last is null ? 0 : Y(last.Upper998)));
        Curve(svg, comparison.Curve, l => l.Upper95, X, Y, "limit-95", Palette.Blue, "8 4", "95 % upper", upper95);
        Curve(svg, comparison.Curve, l => l.Lower95, X, Y, "limit-95", Palette.Blue, "8 4", "95 % lower", lower95);
        Curve(svg, comparison.Curve, l => l.Lower998, X, Y, "limit-99.8", Palette.Vermillion, "2 3", "99.8 % lower", Math.Max(lower95 + 12, last is null ? 0 : Y(last.Lower998)));

        // Labels are placed top to bottom and pushed down past any label they would overlap.
        var placed = new List<(double X1, double X2, double Y)>();
        foreach (var panel in compared.OrderBy(p => -p.Rate.Rate!.Value).ThenBy(p => p.Rate.N))
        {
            var cx = X(panel.Rate.N);
            var cy = Y(panel.Rate.Rate!.Value);
            var text = $"{panel.Label} {Percent(panel.Rate.Rate)}";
            var labelY = cy - 7;
            var x2 = cx + 9 + (text.Length * 6.2);
            while (placed.Any(b => b.X1 < x2 && cx + 9 < b.X2 && Math.Abs(b.Y - labelY) < 13))
            {
                labelY += 13;
            }

            placed.Add((cx + 9, x2, labelY));
            var position = panel.Position!.Value;
            svg.Append($"<g data-mark=\"panel\" data-position=\"{PositionCode(position)}\"><title>{Html(panel.Label)}: {Html(RateLabel(panel.Rate))}, {Html(Position(position))}</title>");
            svg.Append(Marker(position, cx, cy));
            svg.Append($"<text x=\"{Coordinate(cx + 9)}\" y=\"{Coordinate(labelY)}\" font-size=\"11\">{Html(text)}</text></g>");
        }

        svg.Append("</svg>");
        return svg.ToString();
    }

    /// <summary>The marker of a position: the shape alone tells the direction, the extra ring tells 99.8 %.</summary>
    internal static string Marker(FunnelPosition position, double cx, double cy)
    {
        var ring = position is FunnelPosition.Above998 or FunnelPosition.Below998
            ? $"<circle cx=\"{Coordinate(cx)}\" cy=\"{Coordinate(cy)}\" r=\"10\" fill=\"none\" stroke=\"{Palette.Black}\" stroke-width=\"1.5\"/>"
            : string.Empty;
        return position switch
        {
            FunnelPosition.Above95 or FunnelPosition.Above998 =>
                $"<path d=\"M{Coordinate(cx)} {Coordinate(cy - 7)} L{Coordinate(cx + 6.5)} {Coordinate(cy + 5)} L{Coordinate(cx - 6.5)} {Coordinate(cy + 5)} Z\" fill=\"{Palette.Orange}\" stroke=\"{Palette.Black}\"/>" + ring,
            FunnelPosition.Below95 or FunnelPosition.Below998 =>
                $"<path d=\"M{Coordinate(cx)} {Coordinate(cy + 7)} L{Coordinate(cx + 6.5)} {Coordinate(cy - 5)} L{Coordinate(cx - 6.5)} {Coordinate(cy - 5)} Z\" fill=\"{Palette.ReddishPurple}\" stroke=\"{Palette.Black}\"/>" + ring,
            _ => $"<circle cx=\"{Coordinate(cx)}\" cy=\"{Coordinate(cy)}\" r=\"5\" fill=\"{Palette.SkyBlue}\" stroke=\"{Palette.Black}\"/>",
        };
    }

    private static void Curve(
        StringBuilder svg, IReadOnlyList<FunnelLimitSet> curve, Func<FunnelLimitSet, double> limit, Func<double, double> x, Func<double, double> y,
        string mark, string colour, string dash, string label, double labelY)
    {
        if (curve.Count == 0)
        {
            return;
        }

        var points = string.Join(' ', curve.Select(l => $"{Coordinate(x(l.N))},{Coordinate(y(limit(l)))}"));
        svg.Append($"<polyline data-mark=\"{mark}\" points=\"{points}\" fill=\"none\" stroke=\"{colour}\" stroke-width=\"1.5\" stroke-dasharray=\"{dash}\"/>");
        svg.Append($"<text x=\"{Coordinate(x(curve[^1].N) + 6)}\" y=\"{Coordinate(labelY + 4)}\" font-size=\"11\">{Html(label)}</text>");
    }

    private static IEnumerable<int> NiceTicks(int maxN)
    {
        var raw = maxN / 5.0;
        var magnitude = Math.Pow(10, Math.Floor(Math.Log10(raw)));
        var step = (int)Math.Max(1, new[] { 1, 2, 5, 10 }.Select(m => m * magnitude).First(s => s >= raw));
        for (var n = 0; n <= maxN; n += step)
        {
            yield return n;
        }
    }
}
