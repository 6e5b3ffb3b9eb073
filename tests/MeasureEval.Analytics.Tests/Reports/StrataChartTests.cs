using System.Text.RegularExpressions;
using MeasureEval.Analytics.Reports;
using MeasureEval.Analytics.Tests.Support;

namespace MeasureEval.Analytics.Tests.Reports;

public partial class StrataChartTests
{
    [Fact]
    public void Render_OneBarAndWhiskerPerRatedRowAndALabelOnEveryRow()
    {
        var svg = StrataChart.Render(SampleReports.Summary(), s => s.Id);

        // Overall + 3 age bands + 4 panels = 8 rows; "Dr. New Start" has n = 0: a label, no bar.
        Assert.Equal(7, Marks(svg, "bar"));
        Assert.Equal(7, Marks(svg, "whisker"));
        Assert.Equal(8, Marks(svg, "bar-label"));
        Assert.Contains("no rate (n = 0)", svg, StringComparison.Ordinal);
    }

    [Fact]
    public void Render_EncodesLabels()
    {
        var svg = StrataChart.Render(SampleReports.Summary("<script>alert(1)</script>"), s => s.Id);
        Assert.DoesNotContain("<script>", svg, StringComparison.Ordinal);
        Assert.Contains("&lt;script&gt;", svg, StringComparison.Ordinal);
    }

    [Fact]
    public void Render_BarLengthIsTheRate()
    {
        // 170/280 = 60.71 % of the 400-unit plot.
        var svg = StrataChart.Render(SampleReports.Summary(), s => s.Id);
        var first = BarWidth().Match(svg);
        Assert.Equal(400 * 170.0 / 280, double.Parse(first.Groups[1].Value, System.Globalization.CultureInfo.InvariantCulture), 1);
    }

    private static int Marks(string svg, string mark) => Regex.Count(svg, $"data-mark=\"{mark}\"");

    [GeneratedRegex("data-mark=\"bar\" [^>]*? width=\"([0-9.]+)\"")]
    private static partial Regex BarWidth();
}
