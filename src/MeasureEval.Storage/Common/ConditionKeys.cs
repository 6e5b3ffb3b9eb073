using System.Globalization;
using System.Text;
using MeasureEval.Core.Storage;

namespace MeasureEval.Storage.Common;

/// <summary>A stable 64-bit key of a search condition: equal conditions (in any parameter order) give equal keys.</summary>
internal static class ConditionKeys
{
    public static long Of(SearchQuery condition)
    {
        ArgumentNullException.ThrowIfNull(condition);
        var text = new StringBuilder(condition.ResourceType).Append('\n');
        foreach (var id in (condition.Ids ?? []).Order(StringComparer.Ordinal))
        {
            text.Append("id=").Append(id).Append('\n');
        }

        text.Append("patient=").Append(condition.PatientId).Append('\n');
        foreach (var token in (condition.Identifiers ?? []).Select(t => $"{t.System ?? "*"}|{t.Value}").Order(StringComparer.Ordinal))
        {
            text.Append("identifier=").Append(token).Append('\n');
        }

        foreach (var (name, ranges) in new[] { ("in", condition.LastUpdated), ("out", condition.LastUpdatedNotIn) })
        {
            foreach (var range in (ranges ?? []).Select(r => string.Create(CultureInfo.InvariantCulture, $"{r.From?.ToUnixTimeMilliseconds()}..{r.Until?.ToUnixTimeMilliseconds()}")).Order(StringComparer.Ordinal))
            {
                text.Append(name).Append('=').Append(range).Append('\n');
            }
        }

        return Fnv1a64(Encoding.UTF8.GetBytes(text.ToString()));
    }

    /// <summary>FNV-1a, 64-bit (offset basis 14695981039346656037, prime 1099511628211; Fowler/Noll/Vo, IETF draft-eastlake-fnv).</summary>
    internal static long Fnv1a64(ReadOnlySpan<byte> bytes)
    {
        var hash = 14695981039346656037UL;
        foreach (var b in bytes)
        {
            hash ^= b;
            hash *= 1099511628211UL;
        }

        return unchecked((long)hash);
    }
}
