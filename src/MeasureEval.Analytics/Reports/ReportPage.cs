using System.Text;
using MeasureEval.Analytics.Panels;
using MeasureEval.Analytics.Population;
using MeasureEval.Analytics.Summaries;
using MeasureEval.Analytics.Trends;
using MeasureEval.Engine;
using static MeasureEval.Analytics.Reports.ReportFormat;

namespace MeasureEval.Analytics.Reports;

/// <summary>
/// The server-rendered report of one measure: self-contained HTML with inline SVG (no script, no external asset),
/// every text HTML-encoded.
/// </summary>
public static class ReportPage
{
    public const string Caution = "Results support quality reporting and care management; clinical decisions stay with licensed clinicians and local rules.";

    public static string Render(MeasureReportData report, ReportLinks links)
    {
        ArgumentNullException.ThrowIfNull(report);
        ArgumentNullException.ThrowIfNull(links);
        var summary = report.Summary;
        var html = new StringBuilder();
        Head(html, $"{summary.Title} — {Period(summary.Period)}");
        html.Append($"<nav><a href=\"{Html(links.Index)}\">All measures</a></nav>");
        html.Append($"<header><h1>{Html(summary.Title)}</h1>");
        html.Append($"<p class=\"meta\">Measure <code>{Html(summary.MeasureId)}</code> · period {Html(Period(summary.Period))} · ")
            .Append(Html(summary.IsInverse ? "lower is better (inverse measure: the numerator holds the gaps)" : "higher is better"))
            .Append($" · {Html(Int(report.PatientsEvaluated))} patients evaluated</p>");
        html.Append($"<p class=\"caution\" role=\"note\">{Html(Caution)}</p></header>");

        Overall(html, summary);
        Strata(html, summary);
        Panels(html, report.Panels, links);
        Trend(html, report.Trend);
        Findings(html, report.Findings);
        html.Append("<section class=\"downloads\"><h2>Downloads</h2><ul>")
            .Append($"<li><a href=\"{Html(links.Json)}\">These numbers as JSON</a></li>")
            .Append($"<li><a href=\"{Html(links.Csv)}\">These numbers as CSV</a> (for spreadsheets)</li>")
            .Append($"<li><a href=\"{Html(links.GapsFor(null))}\">Open gaps, every panel (CSV)</a></li></ul></section>");
        Methods(html);
        html.Append("</body></html>");
        return html.ToString();
    }

    internal static void Head(StringBuilder html, string title)
    {
        html.Append("<!DOCTYPE html><html lang=\"en\"><head><meta charset=\"utf-8\">")
            .Append("<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">")
            .Append($"<title>{Html(title)}</title><style>{ReportStyles.Css}</style></head><body>");
    }

    private static void Overall(StringBuilder html, MeasureSummary summary)
    {
        var overall = summary.Overall;
        html.Append("<section id=\"overall\"><h2>Rate</h2>");
        html.Append(overall.Rate is null
            ? "<p class=\"headline\">No rate: no patient is in the denominator after exclusions and exceptions.</p>"
            : $"<p class=\"headline\"><strong>{Html(Percent(overall.Rate))}</strong> (95 % interval {Html(Interval(overall.Interval))}), {Html(Int(overall.Numerator))} of {Html(Int(overall.N))} patients</p>");
        html.Append("<table><caption>Populations</caption><thead><tr><th>Population</th><th class=\"num\">Patients</th></tr></thead><tbody>");
        Row(html, "Initial population", overall.InitialPopulation);
        Row(html, "Denominator", overall.Denominator);
        Row(html, "Denominator exclusions", overall.Exclusions);
        Row(html, "Denominator exceptions", overall.Exceptions);
        Row(html, "Numerator", overall.Numerator);
        Row(html, "Rated (denominator − exclusions − exceptions)", overall.N);
        Row(html, summary.IsInverse ? "Open gaps (in the numerator)" : "Open gaps (not in the numerator)", overall.OpenGaps(summary.IsInverse));
        html.Append("</tbody></table></section>");

        static void Row(StringBuilder html, string label, int value) =>
            html.Append($"<tr><td>{Html(label)}</td><td class=\"num\">{Html(Int(value))}</td></tr>");
    }

    private static void Strata(StringBuilder html, MeasureSummary summary)
    {
        html.Append("<section id=\"strata\"><h2>By stratum</h2>");
        html.Append(StrataChart.Render(summary, StratifierTitle));
        html.Append("<p class=\"legend\">Bars: rate; whiskers: 95 % Wilson interval; hatched bar: all patients. Each bar is labelled with rate, interval and numerator/n.</p>");
        html.Append("<table><caption>Rates by stratum</caption><thead><tr><th>Stratifier</th><th>Stratum</th><th class=\"num\">Numerator</th><th class=\"num\">n</th><th class=\"num\">Rate</th><th class=\"num\">95 % interval</th><th class=\"num\">Excluded</th><th class=\"num\">Excepted</th></tr></thead><tbody>");
        foreach (var stratifier in summary.Stratifiers)
        {
            foreach (var stratum in stratifier.Strata)
            {
                var r = stratum.Rate;
                html.Append($"<tr><td>{Html(StratifierTitle(stratifier))}</td><td>{Html(stratum.Label)}</td><td class=\"num\">{Html(Int(r.Numerator))}</td><td class=\"num\">{Html(Int(r.N))}</td>")
                    .Append($"<td class=\"num\">{Html(Percent(r.Rate))}</td><td class=\"num\">{Html(Interval(r.Interval))}</td><td class=\"num\">{Html(Int(r.Exclusions))}</td><td class=\"num\">{Html(Int(r.Exceptions))}</td></tr>");
            }
        }

        html.Append("</tbody></table></section>");
    }

    private static void Panels(StringBuilder html, PanelComparison panels, ReportLinks links)
    {
        html.Append("<section id=\"panels\"><h2>Primary-care panels against the network</h2>");
        html.Append(FunnelChart.Render(panels));
        html.Append("<p class=\"legend\">")
            .Append(LegendSwatch("<line x1=\"0\" y1=\"7\" x2=\"28\" y2=\"7\" stroke=\"#000000\" stroke-width=\"2\"/>")).Append(" network rate ")
            .Append(LegendSwatch("<line x1=\"0\" y1=\"7\" x2=\"28\" y2=\"7\" stroke=\"#0072B2\" stroke-width=\"1.5\" stroke-dasharray=\"8 4\"/>")).Append(" 95 % limits ")
            .Append(LegendSwatch("<line x1=\"0\" y1=\"7\" x2=\"28\" y2=\"7\" stroke=\"#D55E00\" stroke-width=\"1.5\" stroke-dasharray=\"2 3\"/>")).Append(" 99.8 % limits ")
            .Append(LegendSwatch(FunnelChart.Marker(Probability.FunnelPosition.Within, 14, 7))).Append(" within ")
            .Append(LegendSwatch(FunnelChart.Marker(Probability.FunnelPosition.Above95, 14, 7))).Append(" above ")
            .Append(LegendSwatch(FunnelChart.Marker(Probability.FunnelPosition.Below95, 14, 7))).Append(" below (a ring: beyond 99.8 %)")
            .Append("</p>");
        var target = panels.Target is { } t ? $"target {Percent((double)t)}" : "no target given (add ?target=0.75)";
        html.Append($"<table><caption>Panels ({Html(target)})</caption><thead><tr><th>Panel</th><th class=\"num\">Numerator</th><th class=\"num\">n</th><th class=\"num\">Rate</th><th class=\"num\">95 % interval</th><th class=\"num\">95 % limits</th><th class=\"num\">99.8 % limits</th><th>Against the network</th><th class=\"num\">To reach target</th><th>Gap list</th></tr></thead><tbody>");
        foreach (var panel in panels.Panels)
        {
            var r = panel.Rate;
            var limits95 = panel.Limits is { } l ? $"{PercentBare(l.Lower95)}–{PercentBare(l.Upper95)} %" : "—";
            var limits998 = panel.Limits is { } m ? $"{PercentBare(m.Lower998)}–{PercentBare(m.Upper998)} %" : "—";
            html.Append($"<tr data-panel=\"{Html(panel.Panel)}\"><td>{Html(panel.Label)}</td><td class=\"num\">{Html(Int(r.Numerator))}</td><td class=\"num\">{Html(Int(r.N))}</td><td class=\"num\">{Html(Percent(r.Rate))}</td><td class=\"num\">{Html(Interval(r.Interval))}</td>")
                .Append($"<td class=\"num\">{Html(limits95)}</td><td class=\"num\">{Html(limits998)}</td><td>{Html(Position(panel.Position))}</td><td class=\"num\">{Html(ToGoal(panel.PatientsToGoal, panels.Inverse))}</td>")
                .Append(panel.Panel == PanelComparison.Unattributed
                    ? $"<td>{Html(Int(r.OpenGaps(panels.Inverse)))} open</td></tr>"
                    : $"<td><a href=\"{Html(links.GapsFor(panel.Panel))}\">{Html(Int(r.OpenGaps(panels.Inverse)))} open (CSV)</a></td></tr>");
        }

        var network = panels.Network;
        html.Append($"<tr><th>Network</th><td class=\"num\">{Html(Int(network.Numerator))}</td><td class=\"num\">{Html(Int(network.N))}</td><td class=\"num\">{Html(Percent(network.Rate))}</td><td class=\"num\">{Html(Interval(network.Interval))}</td><td></td><td></td><td></td><td class=\"num\">{Html(ToGoal(panels.NetworkPatientsToGoal, panels.Inverse))}</td>")
            .Append($"<td><a href=\"{Html(links.GapsFor(null))}\">{Html(Int(network.OpenGaps(panels.Inverse)))} open (CSV)</a></td></tr>");
        html.Append("</tbody></table></section>");
    }

    private static string ToGoal(int? patients, bool inverse) =>
        patients is { } p ? (inverse ? $"{Int(p)} fewer in numerator" : $"{Int(p)} more patients") : "—";

    private static void Trend(StringBuilder html, MeasureTrend trend)
    {
        html.Append($"<section id=\"trend\"><h2>Trend ({Html(trend.Interval == TrendInterval.Quarter ? "quarters" : "rolling 12 months")})</h2>");
        html.Append(TrendChart.Render(trend));
        html.Append("<p class=\"legend\">Line: rate per period; whiskers: 95 % Wilson interval; diamond: significant change from the period before (two-sided pooled z-test, 5 %).</p>");
        html.Append("<table><caption>Rate per period</caption><thead><tr><th>Period</th><th class=\"num\">Numerator</th><th class=\"num\">n</th><th class=\"num\">Rate</th><th class=\"num\">95 % interval</th><th class=\"num\">Change</th><th class=\"num\">z</th><th class=\"num\">p</th><th>Significant at 5 %</th></tr></thead><tbody>");
        foreach (var point in trend.Points)
        {
            var r = point.Rate;
            var change = point.Change;
            html.Append($"<tr><td>{Html(point.Label)} ({Html(Period(point.Period))})</td><td class=\"num\">{Html(Int(r.Numerator))}</td><td class=\"num\">{Html(Int(r.N))}</td><td class=\"num\">{Html(Percent(r.Rate))}</td><td class=\"num\">{Html(Interval(r.Interval))}</td>")
                .Append($"<td class=\"num\">{Html(change is null ? "—" : Number(change.Difference * 100, "+0.0;−0.0;0.0") + " points")}</td>")
                .Append($"<td class=\"num\">{Html(change?.Z is { } z ? Number(z, "0.00") : "—")}</td><td class=\"num\">{Html(change?.PValue is { } p ? Number(p, "0.0000") : "—")}</td>")
                .Append($"<td>{Html(change is null ? "—" : change.Significant ? "yes" : "no")}</td></tr>");
        }

        html.Append("</tbody></table></section>");
    }

    private static void Findings(StringBuilder html, IReadOnlyDictionary<string, int> findings)
    {
        html.Append("<section id=\"findings\"><h2>Data quality</h2>");
        if (findings.Count == 0)
        {
            html.Append("<p>No data-quality finding in this period.</p></section>");
            return;
        }

        html.Append("<table><caption>Data-quality findings (records the measure could not use)</caption><thead><tr><th>Finding</th><th class=\"num\">Count</th></tr></thead><tbody>");
        foreach (var (code, count) in findings.OrderBy(f => f.Key, StringComparer.Ordinal))
        {
            html.Append($"<tr><td><code>{Html(code)}</code></td><td class=\"num\">{Html(Int(count))}</td></tr>");
        }

        html.Append("</tbody></table></section>");
    }

    private static void Methods(StringBuilder html) =>
        html.Append("<section class=\"methods\"><h2>Methods</h2><ul>")
            .Append("<li>Rate = numerator / (denominator − exclusions − exceptions); 95 % intervals are Wilson score intervals without continuity correction (NIST/SEMATECH e-Handbook §7.2.4.1; Newcombe, Stat Med 1998).</li>")
            .Append("<li>Funnel limits: exact binomial quantiles around the network rate at each panel's n, interpolated as in Spiegelhalter, “Funnel plots for comparing institutional performance”, Stat Med 2005. 95 % and 99.8 % limits.</li>")
            .Append("<li>Change between consecutive periods: two-sided pooled two-proportion z-test at 5 % (NIST/SEMATECH e-Handbook §7.3.3). Patients can appear in both periods, so the test is a screen, not a proof.</li>")
            .Append("<li>Patients to reach a target: ceil(target × n) − numerator (inverse measures: numerator − floor(target × n)), never below 0.</li>")
            .Append("</ul></section>");

    private static string LegendSwatch(string content) =>
        $"<svg width=\"28\" height=\"14\" viewBox=\"0 0 28 14\" aria-hidden=\"true\">{content}</svg>";

    internal static string StratifierTitle(StratifierSummary stratifier) => stratifier.Kind switch
    {
        StratifierKind.AgeBand => "Age band",
        StratifierKind.Gender => "Gender",
        StratifierKind.Payer => "Payer",
        StratifierKind.Panel => "Primary-care panel",
        _ => stratifier.Id,
    };
}
