using System.Text;
using MeasureEval.Analytics.Summaries;
using MeasureEval.Engine;
using static MeasureEval.Analytics.Reports.ReportFormat;

namespace MeasureEval.Analytics.Reports;

/// <summary>The index of reports: every measure's rate over one period, each linking to its report.</summary>
public static class ReportIndexPage
{
    public static string Render(MeasurementPeriod period, IReadOnlyList<MeasureSummary> summaries, Func<string, string> reportLink)
    {
        ArgumentNullException.ThrowIfNull(period);
        ArgumentNullException.ThrowIfNull(summaries);
        ArgumentNullException.ThrowIfNull(reportLink);
        var html = new StringBuilder();
        ReportPage.Head(html, $"Measure reports — {Period(period)}");
        html.Append($"<header><h1>Measure reports</h1><p class=\"meta\">Period {Html(Period(period))}</p>");
        html.Append($"<p class=\"caution\" role=\"note\">{Html(ReportPage.Caution)}</p></header>");
        html.Append("<section><table><caption>Measures</caption><thead><tr><th>Measure</th><th>Better</th><th class=\"num\">Numerator</th><th class=\"num\">n</th><th class=\"num\">Rate</th><th class=\"num\">95 % interval</th><th class=\"num\">Open gaps</th></tr></thead><tbody>");
        foreach (var summary in summaries)
        {
            var r = summary.Overall;
            html.Append($"<tr data-measure=\"{Html(summary.MeasureId)}\"><td><a href=\"{Html(reportLink(summary.MeasureId))}\">{Html(summary.Title)}</a></td><td>{Html(summary.IsInverse ? "lower" : "higher")}</td>")
                .Append($"<td class=\"num\">{Html(Int(r.Numerator))}</td><td class=\"num\">{Html(Int(r.N))}</td><td class=\"num\">{Html(Percent(r.Rate))}</td><td class=\"num\">{Html(Interval(r.Interval))}</td><td class=\"num\">{Html(Int(r.OpenGaps(summary.IsInverse)))}</td></tr>");
        }

        html.Append("</tbody></table></section></body></html>");
        return html.ToString();
    }
}
