using MeasureEval.Core.Index;

namespace MeasureEval.Engine;

/// <summary>
/// Membership of one value set as hash lookups on (system, code). ICD-10-CM is-a entries also match every code below
/// them: a dotted code's ancestors are found by dropping characters after the dot (E11.65 → E11.6 → E11), so a lookup
/// costs a few hashes whatever the value set's size, and an undotted "E111" is never taken as below "E11".
/// </summary>
public sealed class ValueSetIndex
{
    // system → codes: a lookup hashes the code only, with no key string built per coding.
    private readonly Dictionary<string, HashSet<string>> _exact;
    private readonly HashSet<string> _icdIsA;

    public ValueSetIndex(string id, string url, string? version, IEnumerable<(string System, string Code)> exact, IEnumerable<string> icd10CmIsA, byte[] content)
    {
        Id = id;
        Url = url;
        Version = version;
        _exact = new Dictionary<string, HashSet<string>>(StringComparer.Ordinal);
        foreach (var (system, code) in exact)
        {
            if (!_exact.TryGetValue(system, out var codes))
            {
                codes = new HashSet<string>(StringComparer.Ordinal);
                _exact[system] = codes;
            }

            codes.Add(code);
        }

        ExactCount = _exact.Values.Sum(c => c.Count);
        _icdIsA = new HashSet<string>(icd10CmIsA, StringComparer.Ordinal);
        Content = content;
    }

    public string Id { get; }

    public string Url { get; }

    public string? Version { get; }

    /// <summary>The ValueSet resource exactly as read.</summary>
    public byte[] Content { get; }

    public int ExactCount { get; }

    public bool Contains(string? system, string? code)
    {
        if (system is null || code is null)
        {
            return false;
        }

        if (_exact.TryGetValue(system, out var codes) && codes.Contains(code))
        {
            return true;
        }

        if (_icdIsA.Count == 0 || system != CodeSystems.Icd10Cm)
        {
            return false;
        }

        if (_icdIsA.Contains(code))
        {
            return true;
        }

        var dot = code.IndexOf('.', StringComparison.Ordinal);
        if (dot < 0)
        {
            return false;
        }

        // Walk up: "E11.65" → "E11.6" → "E11".
        for (var length = code.Length - 1; length >= dot; length--)
        {
            var ancestor = length == dot ? code[..dot] : code[..length];
            if (_icdIsA.Contains(ancestor))
            {
                return true;
            }
        }

        return false;
    }

    public bool ContainsAny(IReadOnlyList<FactCoding> codings)
    {
        for (var i = 0; i < codings.Count; i++)
        {
            if (Contains(codings[i].System, codings[i].Code))
            {
                return true;
            }
        }

        return false;
    }
}
