using MeasureEval.Engine;

namespace MeasureEval.Analytics.Summaries;

/// <summary>One stratum of a stratifier: its code (as the engine writes it), a readable label, and its rate.</summary>
public sealed record StratumSummary(string Code, string Label, RateSummary Rate);

/// <summary>One stratifier of a measure with its strata in a stable order.</summary>
public sealed record StratifierSummary(string Id, StratifierKind Kind, string? Description, IReadOnlyList<StratumSummary> Strata);

/// <summary>The rate of one measure over one period, overall and per stratum.</summary>
public sealed record MeasureSummary(
    string MeasureId,
    string Title,
    string ImprovementNotation,
    MeasurementPeriod Period,
    RateSummary Overall,
    IReadOnlyList<StratifierSummary> Stratifiers)
{
    /// <summary>A decrease (inverse) measure: a lower rate is better and the numerator holds the gaps.</summary>
    public bool IsInverse => ImprovementNotation == "decrease";

    public StratifierSummary? StratifierOf(StratifierKind kind) => Stratifiers.FirstOrDefault(s => s.Kind == kind);

    /// <summary>
    /// Reads the engine's aggregate. Age bands keep the order the definition lists them; other strata go by code
    /// (ordinal), so that reports are reproducible.
    /// </summary>
    /// <param name="labels">Readable labels of stratum codes (panel and payer references); a code without one is shown as is.</param>
    public static MeasureSummary From(PopulationSummary population, IReadOnlyDictionary<string, string>? labels = null)
    {
        ArgumentNullException.ThrowIfNull(population);
        var measure = population.Measure;
        var stratifiers = new List<StratifierSummary>();
        foreach (var stratifier in measure.Stratifiers)
        {
            var byCode = population.Strata.TryGetValue(stratifier.Id, out var found) ? found : [];
            var bandOrder = stratifier.Bands.Select((b, i) => (b.Code, i)).ToDictionary(x => x.Code, x => x.i, StringComparer.Ordinal);
            var strata = byCode
                .OrderBy(kv => bandOrder.TryGetValue(kv.Key, out var i) ? i : int.MaxValue)
                .ThenBy(kv => kv.Key, StringComparer.Ordinal)
                .Select(kv => new StratumSummary(kv.Key, labels is not null && labels.TryGetValue(kv.Key, out var l) ? l : kv.Key, RateSummary.From(kv.Value)))
                .ToList();
            stratifiers.Add(new StratifierSummary(stratifier.Id, stratifier.Kind, stratifier.Description, strata));
        }

        return new MeasureSummary(measure.Id, measure.Title ?? measure.Name, measure.ImprovementNotation, population.Period, RateSummary.From(population.Counts), stratifiers);
    }
}
