using MeasureEval.Engine;

namespace MeasureEval.Analytics.Summaries;

/// <summary>
/// Population counts of one group of patients and the rate they give: numerator / (denominator − exclusions − exceptions),
/// with its 95 % Wilson score interval (the engine's <see cref="Statistics.Wilson"/>) on that same n. No rate and no
/// interval when n is 0.
/// </summary>
public sealed record RateSummary(int InitialPopulation, int Denominator, int Exclusions, int Exceptions, int Numerator)
{
    public static RateSummary Empty { get; } = new(0, 0, 0, 0, 0);

    /// <summary>The patients the rate is computed on.</summary>
    public int N => Denominator - Exclusions - Exceptions;

    public double? Rate => N > 0 ? (double)Numerator / N : null;

    public RateInterval? Interval => Statistics.Wilson(Numerator, N);

    public static RateSummary From(PopulationTally counts)
    {
        ArgumentNullException.ThrowIfNull(counts);
        return new RateSummary(counts.InitialPopulation, counts.Denominator, counts.DenominatorExclusion, counts.DenominatorException, counts.Numerator);
    }

    /// <summary>Rated patients with an open gap: outside the numerator for an increase measure, inside it for a decrease measure.</summary>
    public int OpenGaps(bool inverse) => inverse ? Numerator : N - Numerator;
}
