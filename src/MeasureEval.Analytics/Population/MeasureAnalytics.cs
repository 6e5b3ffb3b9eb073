using MeasureEval.Analytics.Panels;
using MeasureEval.Analytics.Summaries;
using MeasureEval.Analytics.Trends;
using MeasureEval.Core.Security;
using MeasureEval.Core.Storage;
using MeasureEval.Engine;

namespace MeasureEval.Analytics.Population;

/// <summary>
/// Runs the engine's population evaluation over the store and turns it into summaries, panel comparisons and trends,
/// with readable names for panels and payers. Each call streams the patients once; memory grows with the number of strata and periods, not patients.
/// Every number is computed within the caller's <see cref="DataScope"/>: for a payer, over its members during each period only.
/// </summary>
public sealed class MeasureAnalytics(IResourceStore store, MeasureRepository repository)
{
    public MeasureRepository Repository => repository;

    /// <summary>
    /// The report of one measure: summary and panels over <paramref name="period"/>, and the trend over the periods
    /// <paramref name="interval"/> cuts it into — all from one pass over the patients.
    /// </summary>
    public async Task<MeasureReportData> ReportAsync(
        MeasureDefinition measure, MeasurementPeriod period, decimal? target, TrendInterval interval, DataScope scope, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(measure);
        ArgumentNullException.ThrowIfNull(period);
        ArgumentNullException.ThrowIfNull(scope);
        var trendPeriods = TrendPeriods.Of(interval, period);
        var main = new PopulationSummary(measure, period, keepSubjects: false);
        var trend = trendPeriods.Select(p => new PopulationSummary(measure, p, keepSubjects: false)).ToArray();
        var evaluator = new MeasureEvaluator(repository, new StoreRecordSource(store));
        IReadOnlyList<MeasureDefinition> measures = [measure];
        if (scope.IsUnrestricted)
        {
            await foreach (var patient in store.StreamPatientFactsAsync(null, scope, cancellationToken).ConfigureAwait(false))
            {
                main.Add(evaluator.EvaluateAll(measures, patient, period)[0]);
                foreach (var summary in trend)
                {
                    summary.Add(evaluator.EvaluateAll(measures, patient, summary.Period)[0]);
                }
            }
        }
        else
        {
            // A payer's members differ from period to period (a membership must overlap each one), so each period is its
            // own pass over that period's members.
            foreach (var summary in trend.Prepend(main))
            {
                await foreach (var patient in store.StreamPatientFactsAsync(null, scope.During(summary.Period.Start, summary.Period.End), cancellationToken).ConfigureAwait(false))
                {
                    summary.Add(evaluator.EvaluateAll(measures, patient, summary.Period)[0]);
                }
            }
        }

        var labels = await LabelsAsync([main], scope, cancellationToken).ConfigureAwait(false);
        var measureSummary = MeasureSummary.From(main, labels);
        return new MeasureReportData(
            measureSummary,
            PanelComparison.Build(measureSummary, target),
            MeasureTrend.Build(measure.Id, interval, [.. trend.Select(t => (t.Period, RateSummary.From(t.Counts)))]),
            main.PatientsEvaluated,
            new Dictionary<string, int>(main.FindingCounts, StringComparer.Ordinal));
    }

    /// <summary>Every measure's summary over one period, in one pass (the index page).</summary>
    public async Task<IReadOnlyList<MeasureSummary>> SummariesAsync(MeasurementPeriod period, DataScope scope, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(period);
        ArgumentNullException.ThrowIfNull(scope);
        var measures = repository.Measures.ToList();
        var population = new PopulationEvaluator(new MeasureEvaluator(repository, new StoreRecordSource(store)));
        var summaries = await population.SummarizeAsync(store.StreamPatientFactsAsync(null, scope.During(period.Start, period.End), cancellationToken), measures, period, keepSubjects: false, cancellationToken)
            .ConfigureAwait(false);
        var labels = await LabelsAsync(summaries, scope, cancellationToken).ConfigureAwait(false);
        return [.. summaries.Select(s => MeasureSummary.From(s, labels))];
    }

    // Panel and payer strata are references ("Practitioner/…", "Organization/…"); the report shows the names they carry.
    private async Task<IReadOnlyDictionary<string, string>> LabelsAsync(IEnumerable<PopulationSummary> summaries, DataScope scope, CancellationToken cancellationToken)
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
            if (await ReferenceLabels.ResolveAsync(store, reference, scope, cancellationToken).ConfigureAwait(false) is { } label)
            {
                labels[reference] = label;
            }
        }

        return labels;
    }
}
