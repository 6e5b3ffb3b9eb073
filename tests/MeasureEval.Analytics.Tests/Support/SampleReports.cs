using MeasureEval.Analytics.Panels;
using MeasureEval.Analytics.Population;
using MeasureEval.Analytics.Summaries;
using MeasureEval.Analytics.Trends;
using MeasureEval.Engine;

namespace MeasureEval.Analytics.Tests.Support;

/// <summary>Hand-made summaries (invented Riverbend clinics) for rendering tests that need no store.</summary>
internal static class SampleReports
{
    public static readonly MeasurementPeriod Year2026 = MeasurementPeriod.CalendarYear(2026);

    public static MeasureSummary Summary(string panelLabel = "Dr. Ada Ortiz", bool inverse = false) => new(
        "colorectal-cancer-screening",
        "Colorectal cancer screening",
        inverse ? "decrease" : "increase",
        Year2026,
        new RateSummary(300, 290, 10, 0, 170),
        [
            new StratifierSummary("age-band", StratifierKind.AgeBand, null,
            [
                new StratumSummary("45-49", "45-49", new RateSummary(60, 58, 2, 0, 20)),
                new StratumSummary("50-64", "50-64", new RateSummary(140, 136, 4, 0, 85)),
                new StratumSummary("65-75", "65-75", new RateSummary(100, 96, 4, 0, 65)),
            ]),
            new StratifierSummary("panel", StratifierKind.Panel, null,
            [
                new StratumSummary("Practitioner/ortiz", panelLabel, new RateSummary(120, 118, 2, 0, 90)),
                new StratumSummary("Practitioner/haas", "Dr. Lena Haas", new RateSummary(110, 106, 4, 0, 45)),
                new StratumSummary("Practitioner/new", "Dr. New Start", new RateSummary(2, 2, 2, 0, 0)),
                new StratumSummary(PanelComparison.Unattributed, "Unattributed", new RateSummary(68, 64, 2, 0, 35)),
            ]),
        ]);

    public static MeasureReportData Report(string panelLabel = "Dr. Ada Ortiz")
    {
        var summary = Summary(panelLabel);
        var quarters = TrendPeriods.Of(TrendInterval.Quarter, Year2026);
        var trend = MeasureTrend.Build(summary.MeasureId, TrendInterval.Quarter,
        [
            (quarters[0], new RateSummary(200, 200, 0, 0, 80)),
            (quarters[1], new RateSummary(200, 200, 0, 0, 84)),
            (quarters[2], new RateSummary(200, 200, 0, 0, 120)),
            (quarters[3], new RateSummary(0, 0, 0, 0, 0)),
        ]);
        return new MeasureReportData(summary, PanelComparison.Build(summary, 0.7m), trend, 512, new Dictionary<string, int> { ["no-usable-time"] = 3 });
    }
}
