using MeasureEval.Core.Index;

namespace MeasureEval.Storage.Common;

/// <summary>A patient's index entry while a write session changes it: contributions keyed by the resource they came from.</summary>
internal sealed class PatientIndexEntry
{
    private readonly Dictionary<(string ResourceType, string Id), ClinicalFact> _facts = [];
    private readonly Dictionary<string, CoverageFact> _coverages = new(StringComparer.Ordinal);

    public Demographics? Demographics { get; private set; }

    /// <summary>Facts and coverages held (what the entry costs in memory, roughly).</summary>
    public int Count => _facts.Count + _coverages.Count;

    public bool IsEmpty => Demographics is null && _facts.Count == 0 && _coverages.Count == 0;

    public static PatientIndexEntry From(PatientFacts? stored)
    {
        var entry = new PatientIndexEntry();
        if (stored is not null)
        {
            entry.Demographics = stored.Demographics;
            foreach (var fact in stored.Facts)
            {
                entry._facts[(fact.ResourceType, fact.Id)] = fact;
            }

            foreach (var coverage in stored.Coverages)
            {
                entry._coverages[coverage.Id] = coverage;
            }
        }

        return entry;
    }

    public void Add(IndexContribution contribution)
    {
        switch (contribution)
        {
            case DemographicsContribution d:
                Demographics = d.Demographics;
                break;
            case ClinicalContribution c:
                _facts[(c.Fact.ResourceType, c.Fact.Id)] = c.Fact;
                break;
            case CoverageContribution c:
                _coverages[c.Coverage.Id] = c.Coverage;
                break;
            default:
                throw new ArgumentException($"Unknown index contribution {contribution.GetType().Name}.", nameof(contribution));
        }
    }

    /// <summary>Removes what the resource contributed (nothing happens when it contributed nothing here).</summary>
    public void Remove(string resourceType, string id)
    {
        switch (resourceType)
        {
            case "Patient":
                Demographics = null;
                break;
            case "Coverage":
                _coverages.Remove(id);
                break;
            default:
                _facts.Remove((resourceType, id));
                break;
        }
    }

    /// <summary>The entry with facts and coverages in a stable order (type, then id; ordinal), so equal content encodes equally.</summary>
    public PatientFacts ToFacts(string patientId) => new()
    {
        PatientId = patientId,
        Demographics = Demographics,
        Facts = [.. _facts.Values.OrderBy(f => f.ResourceType, StringComparer.Ordinal).ThenBy(f => f.Id, StringComparer.Ordinal)],
        Coverages = [.. _coverages.Values.OrderBy(c => c.Id, StringComparer.Ordinal)],
    };
}
