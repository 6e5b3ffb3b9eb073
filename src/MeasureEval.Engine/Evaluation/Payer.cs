using MeasureEval.Core.Index;

namespace MeasureEval.Engine;

/// <summary>The payer stratum of a patient for a period.</summary>
public static class Payer
{
    public const string SelfPay = "self-pay";
    public const string None = "none";

    /// <summary>
    /// A Coverage counts if active and its period overlaps the measurement period (no period: all of it). Of several, those
    /// active on periodEnd come first, then the lowest order (a Coverage without order after those with one), then the lowest id.
    /// The stratum is the first payor reference; a payor that is a Patient or RelatedPerson is self-pay.
    /// </summary>
    public static string Of(PatientFacts patient, MeasurementPeriod period)
    {
        CoverageFact? best = null;
        (bool, int, string) bestKey = default;
        foreach (var coverage in patient.Coverages)
        {
            if (coverage.Status != "active")
            {
                continue;
            }

            var start = StatedTime.TryParse(coverage.PeriodStart, out var s) ? s.First : DateOnly.MinValue;
            var end = StatedTime.TryParse(coverage.PeriodEnd, out var e) ? e.Last : DateOnly.MaxValue;
            if (start > period.End || end < period.Start)
            {
                continue;
            }

            var onEnd = start <= period.End && end >= period.End;
            var key = (!onEnd, coverage.Order ?? int.MaxValue, coverage.Id);
            if (best is null || Compare(key, bestKey) < 0)
            {
                best = coverage;
                bestKey = key;
            }
        }

        if (best is null || best.Payors.Count == 0)
        {
            return None;
        }

        var payor = best.Payors[0];
        return IsSelf(payor) ? SelfPay : payor;
    }

    private static int Compare((bool, int, string) a, (bool, int, string) b)
    {
        var c = a.Item1.CompareTo(b.Item1);
        if (c != 0)
        {
            return c;
        }

        c = a.Item2.CompareTo(b.Item2);
        return c != 0 ? c : string.CompareOrdinal(a.Item3, b.Item3);
    }

    private static bool IsSelf(string reference) =>
        reference.StartsWith("Patient/", StringComparison.Ordinal) || reference.StartsWith("RelatedPerson/", StringComparison.Ordinal)
        || reference.Contains("/Patient/", StringComparison.Ordinal) || reference.Contains("/RelatedPerson/", StringComparison.Ordinal);
}
