using System.Text.RegularExpressions;
using MeasureEval.Analytics.Reports;
using MeasureEval.Analytics.Tests.Support;

namespace MeasureEval.Analytics.Tests.Reports;

public class ReportPageTests
{
    private static readonly ReportLinks Links = new("/reports", "/r.json", "/r.csv", panel => panel is null ? "/gaps" : "/gaps?panel=" + Uri.EscapeDataString(panel));

    [Fact]
    public void Render_SelfContained()
    {
        var html = ReportPage.Render(SampleReports.Report(), Links);

        // No script, no external stylesheet, image or font: everything is inline.
        Assert.DoesNotContain("<script", html, StringComparison.OrdinalIgnoreCase);
        Assert.DoesNotContain("<link", html, StringComparison.OrdinalIgnoreCase);
        Assert.DoesNotContain("<img", html, StringComparison.OrdinalIgnoreCase);
        Assert.DoesNotContain("@import", html, StringComparison.Ordinal);
        Assert.DoesNotContain("url(http", html, StringComparison.Ordinal);
        Assert.Contains("@media print", html, StringComparison.Ordinal);
    }

    [Fact]
    public void Render_CarriesTheCaution()
    {
        var html = ReportPage.Render(SampleReports.Report(), Links);
        Assert.Contains(ReportFormat.Html(ReportPage.Caution), html, StringComparison.Ordinal);
    }

    [Fact]
    public void Render_EncodesEveryDataText()
    {
        var html = ReportPage.Render(SampleReports.Report("Dr. <b onmouseover=\"x\">Evil</b> & Co"), Links);
        Assert.DoesNotContain("<b onmouseover", html, StringComparison.Ordinal);
        Assert.Contains("Dr. &lt;b onmouseover=&quot;x&quot;&gt;Evil&lt;/b&gt; &amp; Co", html, StringComparison.Ordinal);
    }

    [Fact]
    public void Render_ThreeChartsWithTheirMarks()
    {
        var html = ReportPage.Render(SampleReports.Report(), Links);
        Assert.Single(Regex.Matches(html, "data-chart=\"strata\""));
        Assert.Single(Regex.Matches(html, "data-chart=\"funnel\""));
        Assert.Single(Regex.Matches(html, "data-chart=\"trend\""));

        // Panels compared: Ortiz and Haas (n = 0 and unattributed are not); trend: three rated quarters of four.
        Assert.Equal(2, Regex.Count(html, "data-mark=\"panel\""));
        Assert.Equal(2, Regex.Count(html, "data-mark=\"limit-95\""));
        Assert.Equal(2, Regex.Count(html, "data-mark=\"limit-99.8\""));
        Assert.Equal(3, Regex.Count(html, "data-mark=\"trend-point\""));
        Assert.Equal(1, Regex.Count(html, "data-significant=\"true\""));
    }

    [Fact]
    public void Render_LinksToGapListsPerPanel()
    {
        var html = ReportPage.Render(SampleReports.Report(), Links);
        Assert.Contains("href=\"/gaps?panel=Practitioner%2Fortiz\"", html, StringComparison.Ordinal);
        Assert.Contains("href=\"/gaps\"", html, StringComparison.Ordinal);
    }
}
