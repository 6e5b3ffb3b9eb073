using System.Collections.Concurrent;
using System.Text.Json;

namespace MeasureEval.Engine.Gaps;

/// <summary>A value set's title and listed codes, read once from the ValueSet resource the measure loaded.</summary>
internal sealed record ValueSetInfo(string Url, string Title, IReadOnlyList<GapCode> Codes)
{
    private static readonly ConcurrentDictionary<ValueSetIndex, ValueSetInfo> Cache = new(ReferenceEqualityComparer.Instance);

    public static ValueSetInfo Of(ValueSetIndex valueSet) => Cache.GetOrAdd(valueSet, Read);

    private static ValueSetInfo Read(ValueSetIndex valueSet)
    {
        using var document = JsonDocument.Parse(valueSet.Content);
        var root = document.RootElement;
        var title = root.TryGetProperty("title", out var t) && t.ValueKind == JsonValueKind.String ? t.GetString()! : valueSet.Id;
        var codes = new List<GapCode>();
        if (root.TryGetProperty("compose", out var compose) && compose.TryGetProperty("include", out var includes))
        {
            foreach (var include in includes.EnumerateArray())
            {
                var system = include.TryGetProperty("system", out var s) ? s.GetString() : null;
                if (system is null || !include.TryGetProperty("concept", out var concepts))
                {
                    continue;
                }

                foreach (var concept in concepts.EnumerateArray())
                {
                    if (concept.TryGetProperty("code", out var code) && code.GetString() is { } value)
                    {
                        codes.Add(new GapCode(system, value));
                    }
                }
            }
        }

        return new ValueSetInfo(valueSet.Url, title, codes);
    }
}
