namespace MeasureEval.Analytics.Probability;

/// <summary>Where a unit's observed proportion lies against the funnel around the network rate.</summary>
public enum FunnelPosition
{
    /// <summary>Inside the 95 % limits.</summary>
    Within,

    /// <summary>Above the upper 95 % limit, not above the upper 99.8 % limit.</summary>
    Above95,

    /// <summary>Above the upper 99.8 % limit.</summary>
    Above998,

    /// <summary>Below the lower 95 % limit, not below the lower 99.8 % limit.</summary>
    Below95,

    /// <summary>Below the lower 99.8 % limit.</summary>
    Below998,
}

/// <summary>Funnel-plot control limits on the proportion scale for a unit of size <see cref="N"/>.</summary>
public sealed record FunnelLimitSet(int N, double Target, double Lower998, double Lower95, double Upper95, double Upper998)
{
    /// <summary>
    /// Strictly outside a limit counts: a proportion that sits on a limit is within (the limit is where
    /// an in-control unit may still fall).
    /// </summary>
    public FunnelPosition Classify(int numerator)
    {
        ArgumentOutOfRangeException.ThrowIfNegative(numerator);
        ArgumentOutOfRangeException.ThrowIfGreaterThan(numerator, N);
        var y = (double)numerator / N;
        if (y > Upper998)
        {
            return FunnelPosition.Above998;
        }

        if (y > Upper95)
        {
            return FunnelPosition.Above95;
        }

        if (y < Lower998)
        {
            return FunnelPosition.Below998;
        }

        return y < Lower95 ? FunnelPosition.Below95 : FunnelPosition.Within;
    }
}

/// <summary>
/// Exact binomial funnel limits around a target proportion p0 (Spiegelhalter DJ, "Funnel plots for comparing
/// institutional performance", Stat Med 2005;24:1185–1202, appendix on exact limits — A.1.1 from memory: verify).
/// For a unit of size n, the limit at
/// level q is taken from the binomial quantile r_q of Bin(n, p0) — the smallest r with P(R ≤ r) ≥ q — and
/// interpolated so that the plotted limits are smooth in n:
///   α = [P(R ≤ r_q) − q] / [P(R ≤ r_q) − P(R ≤ r_q − 1)],   limit = (r_q − α) / n.
/// The 95 % limits use q = 0.025 and 0.975, the 99.8 % limits q = 0.001 and 0.999 (about 2 and 3 standard errors).
/// Limits are clamped to [0, 1]: the interpolation can step below 0 when r_q = 0.
/// </summary>
public static class FunnelLimits
{
    public const double Lower95Level = 0.025;
    public const double Upper95Level = 0.975;
    public const double Lower998Level = 0.001;
    public const double Upper998Level = 0.999;

    public static FunnelLimitSet At(int n, double target)
    {
        ArgumentOutOfRangeException.ThrowIfNegativeOrZero(n);
        return new FunnelLimitSet(
            n,
            target,
            Limit(Lower998Level, n, target),
            Limit(Lower95Level, n, target),
            Limit(Upper95Level, n, target),
            Limit(Upper998Level, n, target));
    }

    /// <summary>The interpolated limit on the proportion scale at level <paramref name="q"/>.</summary>
    public static double Limit(double q, int n, double target)
    {
        ArgumentOutOfRangeException.ThrowIfNegativeOrZero(n);
        var (r, cumulative, mass) = ExactBinomial.QuantileWithCumulative(q, n, target);

        // P(R ≤ r) − P(R ≤ r − 1) is the mass at r, taken directly rather than as a difference of two sums near 1.
        var alpha = mass > 0 ? (cumulative - q) / mass : 0;
        return Math.Clamp((r - alpha) / n, 0, 1);
    }
}
