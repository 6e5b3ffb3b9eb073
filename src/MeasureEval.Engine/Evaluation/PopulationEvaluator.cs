using System.Runtime.CompilerServices;
using MeasureEval.Core.Index;

namespace MeasureEval.Engine;

/// <summary>
/// Evaluates several measures over a stream of patients in one pass: each patient's facts are read once, their dates
/// parsed once and shared definitions computed once for all measures.
/// </summary>
public sealed class PopulationEvaluator(MeasureEvaluator evaluator)
{
    /// <summary>Per patient, the results of every measure (same order as <paramref name="measures"/>).</summary>
    public async IAsyncEnumerable<IReadOnlyList<PatientResult>> EvaluateAsync(
        IAsyncEnumerable<PatientFacts> patients, IReadOnlyList<MeasureDefinition> measures, MeasurementPeriod period,
        [EnumeratorCancellation] CancellationToken cancellationToken)
    {
        await foreach (var patient in patients.WithCancellation(cancellationToken).ConfigureAwait(false))
        {
            yield return evaluator.EvaluateAll(measures, patient, period);
        }
    }

    /// <summary>Aggregates without keeping per-patient results (patient ids only when <paramref name="keepSubjects"/>).</summary>
    public async Task<IReadOnlyList<PopulationSummary>> SummarizeAsync(
        IAsyncEnumerable<PatientFacts> patients, IReadOnlyList<MeasureDefinition> measures, MeasurementPeriod period, bool keepSubjects,
        CancellationToken cancellationToken)
    {
        var summaries = measures.Select(m => new PopulationSummary(m, period, keepSubjects)).ToArray();
        await foreach (var results in EvaluateAsync(patients, measures, period, cancellationToken).ConfigureAwait(false))
        {
            for (var i = 0; i < summaries.Length; i++)
            {
                summaries[i].Add(results[i]);
            }
        }

        return summaries;
    }
}
