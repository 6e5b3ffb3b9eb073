using System.Globalization;
using System.Text;
using MeasureEval.Analytics.Population;
using MeasureEval.Analytics.Summaries;
using MeasureEval.Engine;

namespace MeasureEval.Analytics.Reports;

/// <summary>
/// The report's numbers as one flat CSV table for spreadsheets: a row per overall rate, stratum, panel and trend
/// period; rates as fractions with full precision; empty cells where a value does not apply.
/// </summary>
public static class ReportCsv
{
    public static readonly string[] Header =
    [
        "measure", "section", "stratifier", "code", "label", "period_start", "period_end",
        "initial_population", "denominator", "exclusions", "exceptions", "numerator", "n", "rate", "ci95_lower", "ci95_upper",
        "limit998_lower", "limit95_lower", "limit95_upper", "limit998_upper", "position", "patients_to_target",
        "change", "z", "p_value", "significant",
    ];

    private static readonly CultureInfo Invariant = CultureInfo.InvariantCulture;

    public static string Write(MeasureReportData report)
    {
        ArgumentNullException.ThrowIfNull(report);
        var csv = new StringBuilder();
        CsvText.Row(csv, Header);
        var summary = report.Summary;
        var period = summary.Period;
        Rate(csv, summary.MeasureId, "overall", "", "", "All patients", period, summary.Overall);
        foreach (var stratifier in summary.Stratifiers)
        {
            foreach (var stratum in stratifier.Strata)
            {
                Rate(csv, summary.MeasureId, "stratum", stratifier.Id, stratum.Code, stratum.Label, period, stratum.Rate);
            }
        }

        var panels = report.Panels;
        foreach (var panel in panels.Panels)
        {
            var l = panel.Limits;
            Rate(
                csv, summary.MeasureId, "panel", "", panel.Panel, panel.Label, period, panel.Rate,
                [D(l?.Lower998), D(l?.Lower95), D(l?.Upper95), D(l?.Upper998), panel.Position is null ? "" : ReportFormat.PositionCode(panel.Position), I(panel.PatientsToGoal)]);
        }

        Rate(csv, summary.MeasureId, "network", "", "", "Network", period, panels.Network, ["", "", "", "", "", I(panels.NetworkPatientsToGoal)]);
        foreach (var point in report.Trend.Points)
        {
            var c = point.Change;
            Rate(
                csv, summary.MeasureId, "trend", "", "", point.Label, point.Period, point.Rate,
                ["", "", "", "", "", "", D(c?.Difference), D(c?.Z), D(c?.PValue), c is null ? "" : c.Significant ? "true" : "false"]);
        }

        return csv.ToString();
    }

    private static void Rate(
        StringBuilder csv, string measure, string section, string stratifier, string code, string label, MeasurementPeriod period, RateSummary rate,
        string[]? extra = null)
    {
        var fields = new List<string?>
        {
            CsvText.Text(measure), section, CsvText.Text(stratifier), CsvText.Text(code), CsvText.Text(label),
            period.Start.ToString("yyyy-MM-dd", Invariant), period.End.ToString("yyyy-MM-dd", Invariant),
            I(rate.InitialPopulation), I(rate.Denominator), I(rate.Exclusions), I(rate.Exceptions), I(rate.Numerator), I(rate.N),
            D(rate.Rate), D(rate.Interval?.Lower), D(rate.Interval?.Upper),
        };
        fields.AddRange(extra ?? []);
        while (fields.Count < Header.Length)
        {
            fields.Add("");
        }

        CsvText.Row(csv, [.. fields]);
    }

    private static string D(double? value) => value is { } v ? v.ToString("R", Invariant) : "";

    private static string I(int? value) => value is { } v ? v.ToString(Invariant) : "";
}
