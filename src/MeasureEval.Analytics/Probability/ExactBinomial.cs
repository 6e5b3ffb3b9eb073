namespace MeasureEval.Analytics.Probability;

/// <summary>
/// The binomial distribution Bin(n, p) computed exactly by summing its probability mass in log space, so that
/// populations of any size neither underflow (0.5^10000) nor lose the tail that decides a 99.8 % limit.
/// </summary>
public static class ExactBinomial
{
    /// <summary>P(R = r) for R ~ Bin(n, p).</summary>
    public static double Probability(int r, int n, double p)
    {
        Validate(n, p);
        if (r < 0 || r > n)
        {
            return 0;
        }

        // The degenerate ends put all mass on one count; the log form would evaluate 0·log 0.
        if (p == 0)
        {
            return r == 0 ? 1 : 0;
        }

        if (p == 1)
        {
            return r == n ? 1 : 0;
        }

        var logChoose = LogGamma.OfFactorial(n) - LogGamma.OfFactorial(r) - LogGamma.OfFactorial(n - r);
        return Math.Exp(logChoose + (r * Math.Log(p)) + ((n - r) * double.LogP1(-p)));
    }

    /// <summary>P(R ≤ r) for R ~ Bin(n, p).</summary>
    public static double Cumulative(int r, int n, double p)
    {
        Validate(n, p);
        if (r < 0)
        {
            return 0;
        }

        if (r >= n)
        {
            return 1;
        }

        var sum = 0.0;
        for (var k = 0; k <= r; k++)
        {
            sum += Probability(k, n, p);
        }

        return Math.Min(1, sum);
    }

    /// <summary>The <paramref name="q"/>-quantile: the smallest r with P(R ≤ r) ≥ q (0 &lt; q &lt; 1).</summary>
    public static int Quantile(double q, int n, double p) => QuantileWithCumulative(q, n, p).Quantile;

    /// <summary>The quantile together with P(R ≤ r) and P(R = r) at it, found in one pass over the mass.</summary>
    internal static (int Quantile, double Cumulative, double Mass) QuantileWithCumulative(double q, int n, double p)
    {
        Validate(n, p);
        if (!(q > 0 && q < 1))
        {
            throw new ArgumentOutOfRangeException(nameof(q), q, "a quantile level lies strictly between 0 and 1");
        }

        var sum = 0.0;
        for (var r = 0; r < n; r++)
        {
            var mass = Probability(r, n, p);
            sum += mass;
            if (sum >= q)
            {
                return (r, sum, mass);
            }
        }

        // Whatever rounding left of the sum, the last count closes the distribution.
        return (n, 1.0, Probability(n, n, p));
    }

    private static void Validate(int n, double p)
    {
        ArgumentOutOfRangeException.ThrowIfNegative(n);
        if (!(p >= 0 && p <= 1))
        {
            throw new ArgumentOutOfRangeException(nameof(p), p, "a probability lies in [0, 1]");
        }
    }
}
