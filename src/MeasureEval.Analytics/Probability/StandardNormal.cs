namespace MeasureEval.Analytics.Probability;

/// <summary>The standard normal distribution function, for two-sided p-values.</summary>
public static class StandardNormal
{
    /// <summary>Φ(z) = erfc(−z/√2) / 2.</summary>
    public static double Cdf(double z) => 0.5 * Erfc(-z / Math.Sqrt(2));

    /// <summary>P(|Z| ≥ |z|).</summary>
    public static double TwoSidedP(double z) => Erfc(Math.Abs(z) / Math.Sqrt(2));

    /// <summary>
    /// Complementary error function by the Chebyshev fit of Press et al., Numerical Recipes (2nd ed., §6.2, erfcc):
    /// fractional error below 1.2e-7 everywhere — ample for a p-value reported to four decimals.
    /// </summary>
    public static double Erfc(double x)
    {
        var z = Math.Abs(x);
        var t = 1 / (1 + (0.5 * z));
        double[] c = [-1.26551223, 1.00002368, 0.37409196, 0.09678418, -0.18628806, 0.27886807, -1.13520398, 1.48851587, -0.82215223, 0.17087277];
        var poly = 0.0;
        for (var i = c.Length - 1; i >= 0; i--)
        {
            poly = c[i] + (t * poly);
        }

        var ans = t * Math.Exp((-z * z) + poly);
        return x >= 0 ? ans : 2 - ans;
    }
}
