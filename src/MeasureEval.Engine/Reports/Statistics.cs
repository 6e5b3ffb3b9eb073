namespace MeasureEval.Engine;

/// <summary>A 95 % (or other) interval around a rate, both bounds in [0, 1].</summary>
public readonly record struct RateInterval(double Lower, double Upper);

public static class Statistics
{
    /// <summary>z for a two-sided 95 % interval.</summary>
    public const double Z95 = 1.959964;

    /// <summary>
    /// Wilson score interval for <paramref name="numerator"/> successes out of <paramref name="n"/>, without continuity
    /// correction, clamped to [0, 1] (NIST e-Handbook 7.2.4.1; Newcombe 1998, Stat Med 17:857). Null when n is 0.
    /// </summary>
    public static RateInterval? Wilson(int numerator, int n, double z = Z95)
    {
        if (n <= 0)
        {
            return null;
        }

        ArgumentOutOfRangeException.ThrowIfNegative(numerator);
        ArgumentOutOfRangeException.ThrowIfGreaterThan(numerator, n);
        var p = (double)numerator / n;
        var z2 = z * z;
        var centre = p + (z2 / (2 * n));
        var spread = z * Math.Sqrt((p * (1 - p) / n) + (z2 / (4.0 * n * n)));
        var denominator = 1 + (z2 / n);
        return new RateInterval(Math.Clamp((centre - spread) / denominator, 0, 1), Math.Clamp((centre + spread) / denominator, 0, 1));
    }
}
