using MeasureEval.Analytics.Panels;
using MeasureEval.Analytics.Summaries;
using MeasureEval.Analytics.Trends;
using MeasureEval.Core.Storage;
using MeasureEval.Engine;

namespace MeasureEval.Analytics.Population;

/// <summary>
/// Runs the engine's population evaluation over the store and turns it into summaries, panel comparisons and trends,
/// with readable names for panels and payers. Each call streams the patients once; memory grows with the number of strata and periods, not patients.
/// </summary>
public sealed class MeasureAnalytics(IResourceStore store, MeasureRepository repository)
{
    public MeasureRepository Repository => repository;

    /// <summary>
    /// The report of one measure: summary and panels over <paramref name="period"/>, and the trend over the periods
    /// <paramref name="interval"/> cuts it into — all from one pass over the patients.
    /// </summary>
    public async Task<MeasureReportData> ReportAsync(
        MeasureDefinition measure, MeasurementPeriod period, decimal? target, TrendInterval interval, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(measure);
        ArgumentNullException.ThrowIfNull(period);
        var trendPeriods = TrendPeriods.Of(interval, period);
        var main = new PopulationSummary(measure, period, keepSubjects: false);
        var trend = trendPeriods.Select(p => new PopulationSummary(measure, p, keepSubjects: false)).ToArray();
        var evaluator = new MeasureEvaluator(repository, new StoreRecordSource(store));
        IReadOnlyList<MeasureDefinition> measures = [measure];
        await foreach (var patient in store.StreamPatientFactsAsync(null, cancellationToken).ConfigureAwait(false))
        {
            main.Add(evaluator.EvaluateAll(measures, patient, period)[0]);
            foreach (var summary in trend)
            {
                summary.Add(evaluator.EvaluateAll(measures, patient, summary.Period)[0]);
            }
        }

        var labels = await LabelsAsync([main], cancellationToken).ConfigureAwait(false);
        var measureSummary = MeasureSummary.From(main, labels);
        return new MeasureReportData(
            measureSummary,
            PanelComparison.Build(measureSummary, target),
            MeasureTrend.Build(measure.Id, interval, [.. trend.Select(t => (t.Period, RateSummary.From(t.Counts)))]),
            main.PatientsEvaluated,
            new Dictionary<string, int>(main.FindingCounts, StringComparer.Ordinal));
    }

    /// <summary>Every measure's summary over one period, in one pass (the index page).</summary>
    public async Task<IReadOnlyList<MeasureSummary>> SummariesAsync(MeasurementPeriod period, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(period);
        var measures = repository.Measures.ToList();
        var population = new PopulationEvaluator(new MeasureEvaluator(repository, new StoreRecordSource(store)));
        var summaries = await population.SummarizeAsync(store.StreamPatientFactsAsync(null, cancellationToken), measures, period, keepSubjects: false, cancellationToken)
            .ConfigureAwait(false);
        var labels = await LabelsAsync(summaries, cancellationToken).ConfigureAwait(false);
        return [.. summaries.Select(s => MeasureSummary.From(s, labels))];
    }

    // Panel and payer strata are references ("Practitioner/…", "Organization/…"); the report shows the names they carry.
    private async Task<IReadOnlyDictionary<string, string>> LabelsAsync(IEnumerable<PopulationSummary> summaries, CancellationToken cancellationToken)
    {
        var references = new SortedSet<string>(StringComparer.Ordinal);
        foreach (var summary in summaries)
        {
            foreach (var stratifier in summary.Measure.Stratifiers.Where(s => s.Kind is StratifierKind.Panel or StratifierKind.Payer))
            {
                if (summary.Strata.TryGetValue(stratifier.Id, out var strata))
                {
                    references.UnionWith(strata.Keys);
                }
            }
        }

        var labels = new Dictionary<string, string>(StringComparer.Ordinal)
        {
            [PanelComparison.Unattributed] = "Unattributed",
            [Payer.None] = "No coverage",
            [Payer.SelfPay] = "Self-pay",
        };
        foreach (var reference in references)
        {
            if (await ReferenceLabels.ResolveAsync(store, reference, cancellationToken).ConfigureAwait(false) is { } label)
            {
                labels[reference] = label;
            }
        }

        return labels;
    }
}
