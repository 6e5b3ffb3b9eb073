namespace MeasureEval.Analytics.Panels;

/// <summary>How many patients' gaps must close for a rate to reach a target.</summary>
public static class GapToGoal
{
    /// <summary>
    /// For an increase measure: ceil(target · n) − numerator, floored at 0 (that many more must enter the numerator).
    /// For a decrease (inverse) measure, where the numerator is the gap: numerator − floor(target · n), floored at 0
    /// (that many must leave the numerator for the rate to fall to the target). Decimal arithmetic so that
    /// 0.7 × 100 is exactly 70, not 70.00000000000001 rounded up to 71.
    /// </summary>
    public static int PatientsToClose(int numerator, int n, decimal target, bool inverse)
    {
        ArgumentOutOfRangeException.ThrowIfNegative(numerator);
        ArgumentOutOfRangeException.ThrowIfGreaterThan(numerator, n);
        if (target is < 0 or > 1)
        {
            throw new ArgumentOutOfRangeException(nameof(target), target, "a target rate lies in [0, 1]");
        }

        var goal = target * n;
        return inverse
            ? Math.Max(0, numerator - (int)Math.Floor(goal))
            : Math.Max(0, (int)Math.Ceiling(goal) - numerator);
    }
}
