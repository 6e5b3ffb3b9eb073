using System.Collections.Concurrent;
using Fhir.Metrics;
using MeasureEval.Core.Index;

namespace MeasureEval.Engine;

/// <summary>
/// Converts a record's quantity to the unit a measure compares in. Order: same code (exact, no arithmetic); a conversion
/// the measure declares (HbA1c mmol/mol → %, which UCUM would treat as two dimensionless ratios); dimensionless scores
/// ("", "1", annotations such as "{score}"); then UCUM via Fhir.Metrics. UCUM factors are computed once per unit pair,
/// since a Fhir.Metrics conversion costs far more than the comparison it serves. Results are never rounded.
/// </summary>
public static class Quantities
{
    private static readonly ConcurrentDictionary<(string From, string To), (decimal Scale, decimal Offset)?> UcumFactors = new();

    /// <summary>The unit code a quantity is judged by: Quantity.code when its system is UCUM or absent; Quantity.unit when no code is given.</summary>
    public static string? UnitOf(FactQuantity quantity)
    {
        if (quantity.System is not null && quantity.System != CodeSystems.Ucum)
        {
            return null;
        }

        return quantity.Code ?? quantity.Unit ?? "";
    }

    public static bool IsUnity(string unit) => unit.Length == 0 || unit == "1" || (unit.StartsWith('{') && unit.EndsWith('}'));

    public static bool TryConvert(decimal value, string from, string to, IReadOnlyList<UnitConversion> declared, out decimal converted)
    {
        converted = value;
        if (from == to)
        {
            return true;
        }

        foreach (var conversion in declared)
        {
            if (conversion.From == from && conversion.To == to)
            {
                converted = (value * conversion.Multiply) + conversion.Add;
                return true;
            }
        }

        // A declared pair is never left to UCUM in the other direction either.
        foreach (var conversion in declared)
        {
            if (conversion.From == to && conversion.To == from)
            {
                converted = (value - conversion.Add) / conversion.Multiply;
                return true;
            }
        }

        if (IsUnity(from) || IsUnity(to))
        {
            return IsUnity(from) && IsUnity(to);
        }

        var factor = UcumFactors.GetOrAdd((from, to), static key => Factor(key.From, key.To));
        if (factor is null)
        {
            return false;
        }

        converted = (value * factor.Value.Scale) + factor.Value.Offset;
        return true;
    }

    private static (decimal, decimal)? Factor(string from, string to)
    {
        try
        {
            var service = FhirMetricService.Instance.Value;
            if (!service.TryConvertTo((0m, from, CodeSystems.Ucum), to, out var zero) || zero is null
                || !service.TryConvertTo((1m, from, CodeSystems.Ucum), to, out var one) || one is null)
            {
                return null;
            }

            var offset = zero.Value.Item1;
            return (one.Value.Item1 - offset, offset);
        }
        catch (Exception ex) when (ex is ArgumentException or InvalidOperationException or FormatException or KeyNotFoundException or OverflowException)
        {
            return null;
        }
    }

    /// <summary>
    /// Whether every value a comparator allows passes the test: "&lt;6.0" passes "&lt; 8"; "&gt;14" passes "&gt; 9"; "&lt;10" does not pass "&gt; 9".
    /// Returns null for a comparator the engine cannot judge ("ad").
    /// </summary>
    public static bool? Passes(decimal value, string? comparator, Comparison comparison, decimal threshold) => (comparator, comparison) switch
    {
        (null, Comparison.LessThan) => value < threshold,
        (null, Comparison.LessOrEqual) => value <= threshold,
        (null, Comparison.GreaterThan) => value > threshold,
        (null, Comparison.GreaterOrEqual) => value >= threshold,
        ("<", Comparison.LessThan or Comparison.LessOrEqual) => value <= threshold,
        ("<=", Comparison.LessThan) => value < threshold,
        ("<=", Comparison.LessOrEqual) => value <= threshold,
        (">", Comparison.GreaterThan or Comparison.GreaterOrEqual) => value >= threshold,
        (">=", Comparison.GreaterThan) => value > threshold,
        (">=", Comparison.GreaterOrEqual) => value >= threshold,
        ("<" or "<=", Comparison.GreaterThan or Comparison.GreaterOrEqual) => false,
        (">" or ">=", Comparison.LessThan or Comparison.LessOrEqual) => false,
        _ => null,
    };
}
