using MeasureEval.Analytics.Panels;
using MeasureEval.Analytics.Summaries;
using MeasureEval.Analytics.Trends;

namespace MeasureEval.Analytics.Population;

/// <summary>Everything the report page shows for one measure, and what its JSON and CSV forms carry.</summary>
/// <param name="PatientsEvaluated">Patients in the store that were evaluated (in the initial population or not).</param>
/// <param name="Findings">Data-quality finding code → number of findings over the period.</param>
public sealed record MeasureReportData(
    MeasureSummary Summary,
    PanelComparison Panels,
    MeasureTrend Trend,
    int PatientsEvaluated,
    IReadOnlyDictionary<string, int> Findings);
