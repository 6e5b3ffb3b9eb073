namespace MeasureEval.Analytics.Probability;

/// <summary>The outcome of a two-sided pooled two-proportion z-test of p1 = p2.</summary>
/// <param name="Difference">p̂2 − p̂1: the change from the first sample to the second.</param>
/// <param name="Pooled">p̂ = (x1 + x2) / (n1 + n2).</param>
/// <param name="Z">(p̂2 − p̂1) / √(p̂(1 − p̂)(1/n1 + 1/n2)); null when the standard error is 0 (p̂ is 0 or 1).</param>
/// <param name="PValue">Two-sided; null with <paramref name="Z"/>.</param>
public sealed record TwoProportionResult(double Difference, double Pooled, double? Z, double? PValue, bool Significant);

/// <summary>
/// Pooled two-proportion z-test for large samples (NIST/SEMATECH e-Handbook of Statistical Methods, §7.3.3 "How can
/// we determine whether two processes produce the same proportion of defectives?", Case 1): the difference is
/// significant at level α when |z| exceeds z(1 − α/2).
/// </summary>
public static class TwoProportionTest
{
    /// <summary>z(0.975), the two-sided 5 % critical value.</summary>
    public const double Critical5Percent = 1.959964;

    /// <summary>Compares x2/n2 (the later period) with x1/n1 (the earlier one); null when either sample is empty.</summary>
    public static TwoProportionResult? Pooled(int x1, int n1, int x2, int n2)
    {
        ArgumentOutOfRangeException.ThrowIfNegative(x1);
        ArgumentOutOfRangeException.ThrowIfNegative(x2);
        ArgumentOutOfRangeException.ThrowIfGreaterThan(x1, n1);
        ArgumentOutOfRangeException.ThrowIfGreaterThan(x2, n2);
        if (n1 == 0 || n2 == 0)
        {
            return null;
        }

        var p1 = (double)x1 / n1;
        var p2 = (double)x2 / n2;
        var pooled = (double)(x1 + x2) / (n1 + n2);
        var variance = pooled * (1 - pooled) * ((1.0 / n1) + (1.0 / n2));
        if (variance <= 0)
        {
            // Both samples all-in or all-out: no variation to test against, and no evidence of change.
            return new TwoProportionResult(p2 - p1, pooled, null, null, false);
        }

        var z = (p2 - p1) / Math.Sqrt(variance);
        return new TwoProportionResult(p2 - p1, pooled, z, StandardNormal.TwoSidedP(z), Math.Abs(z) > Critical5Percent);
    }
}
