using System.Globalization;
using MeasureEval.Core.Index;

namespace MeasureEval.Engine.Gaps;

/// <summary>Plain words for values and value tests, as gap reports print them.</summary>
internal static class Texts
{
    public static string Number(decimal? value) => value is { } v ? v.ToString("0.###", CultureInfo.InvariantCulture) : "?";

    /// <summary>The unit as printed: UCUM code, annotations such as {score} left out.</summary>
    public static string Unit(FactQuantity? quantity)
    {
        var unit = quantity?.Code ?? quantity?.Unit ?? "";
        return unit.StartsWith('{') || unit == "1" ? "" : unit;
    }

    /// <summary>"9.4 %", "64 mmol/mol (8.007 %)", "&lt;6 %": as recorded, with the converted value where the unit was converted.</summary>
    public static string? Quantity(FactQuantity? quantity, decimal? converted, string? convertedUnit)
    {
        if (quantity?.Value is not { } value)
        {
            return null;
        }

        var unit = Unit(quantity);
        var text = $"{quantity.Comparator}{Number(value)}{(unit.Length > 0 ? " " + unit : "")}";
        if (converted is { } c && c != value && convertedUnit is { Length: > 0 } to)
        {
            text += $" ({Number(c)} {to})";
        }

        return text;
    }

    /// <summary>A then-branch in words; <paramref name="negate"/> gives the result that undoes it.</summary>
    public static string? Condition(Criterion criterion, bool negate)
    {
        switch (criterion)
        {
            case ValueCriterion value:
                var comparison = negate ? Negate(value.Comparison) : value.Comparison;
                var of = value.Of is null ? "" : value.Of + " ";
                var unit = value.Threshold.Unit.Length > 0 ? " " + value.Threshold.Unit : "";
                return $"{of}{Word(comparison)} {Number(value.Threshold.Value)}{unit}";
            case AllCriterion all:
                return Join(all.Items, negate, negate ? " or " : " and ");
            case AnyCriterion any:
                return Join(any.Items, negate, negate ? " and " : " or ");
            case DefinitionCriterion { Target: { } target }:
                return criterion.Label ?? Condition(target.Body, negate);
            default:
                return criterion.Label is { } label ? (negate ? $"not: {label}" : label) : null;
        }
    }

    private static string? Join(IReadOnlyList<Criterion> items, bool negate, string separator)
    {
        var parts = items.Select(i => i.Label is { } l && !negate ? l : Condition(i, negate)).Where(p => p is not null).ToList();
        return parts.Count == 0 ? null : string.Join(separator, parts);
    }

    private static Comparison Negate(Comparison comparison) => comparison switch
    {
        Comparison.LessThan => Comparison.GreaterOrEqual,
        Comparison.LessOrEqual => Comparison.GreaterThan,
        Comparison.GreaterThan => Comparison.LessOrEqual,
        _ => Comparison.LessThan,
    };

    private static string Word(Comparison comparison) => comparison switch
    {
        Comparison.LessThan => "below",
        Comparison.LessOrEqual => "at most",
        Comparison.GreaterThan => "above",
        _ => "at least",
    };
}
