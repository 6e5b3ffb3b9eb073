namespace MeasureEval.Engine;

/// <summary>A record a retrieve accepted, with the quantity it is compared by (a component's value when the retrieve names one).</summary>
internal sealed record Candidate(PreparedRecord Record, Retrieve Source, int SourceIndex, MeasureEval.Core.Index.FactQuantity? Quantity, decimal? Value)
{
    public StatedTime Time => Record.Point!.Value;
}

/// <summary>What a then-branch sees: the record mostRecent chose, or the values sameDay picked.</summary>
internal sealed record Scope(Candidate? Record, IReadOnlyDictionary<string, Candidate>? Named)
{
    public static Scope Root { get; } = new(null, null);
}

/// <summary>
/// The mutable trace of one measure's evaluation for one patient. Evidence and met definitions are kept on the path
/// that made a criterion true: a failed branch is rolled back to its mark.
/// </summary>
internal sealed class EvaluationState
{
    private static readonly IReadOnlyList<DataQualityFinding> NoFindings = [];
    private static readonly IReadOnlyList<CountDetail> NoCounts = [];

    // Most patients have no finding and no count: allocated on first use.
    private HashSet<(string, string?)>? _findingKeys;
    private List<DataQualityFinding>? _findings;
    private List<CountDetail>? _counts;

    public EvaluationState(PreparedPatient patient, MeasurementPeriod period, MeasureDefinition measure, DefinitionCache cache, IRecordSource? records)
    {
        Patient = patient;
        Period = period;
        Measure = measure;
        Cache = cache;
        Records = records;
    }

    public PreparedPatient Patient { get; }

    public MeasurementPeriod Period { get; }

    public MeasureDefinition Measure { get; }

    public DefinitionCache Cache { get; }

    public IRecordSource? Records { get; }

    public List<string> Evidence { get; } = [];

    public List<string> Definitions { get; } = [];

    public IReadOnlyList<DataQualityFinding> Findings => _findings ?? NoFindings;

    public IReadOnlyList<CountDetail> Counts => _counts ?? NoCounts;

    public void AddCount(CountDetail count) => (_counts ??= []).Add(count);

    public void AddCounts(IReadOnlyList<CountDetail> counts)
    {
        if (counts.Count > 0)
        {
            (_counts ??= []).AddRange(counts);
        }
    }

    /// <summary>Gap reports: when set, every mostRecent and sameDay records the record(s) it chose, met or not.</summary>
    public List<(Criterion Criterion, Scope Scope)>? Chosen { get; init; }

    /// <summary>Gap reports: retrieves ignore their window start, so that records too old to count are still seen as evidence.</summary>
    public bool OpenWindowStart { get; init; }

    public (int Evidence, int Definitions) Mark() => (Evidence.Count, Definitions.Count);

    public void Rollback((int Evidence, int Definitions) mark)
    {
        Evidence.RemoveRange(mark.Evidence, Evidence.Count - mark.Evidence);
        Definitions.RemoveRange(mark.Definitions, Definitions.Count - mark.Definitions);
    }

    public void Find(string code, string message, string? resource)
    {
        if ((_findingKeys ??= []).Add((code, resource)))
        {
            (_findings ??= []).Add(new DataQualityFinding(code, message, resource));
        }
    }

    public void AddFindings(IReadOnlyList<DataQualityFinding> findings)
    {
        for (var i = 0; i < findings.Count; i++)
        {
            Find(findings[i].Code, findings[i].Message, findings[i].Resource);
        }
    }
}

/// <summary>Results of root-scope definitions for one patient and period, shared by the measures of one pass.</summary>
internal sealed class DefinitionCache
{
    private readonly Dictionary<NamedDefinition, Entry> _entries = new(ReferenceEqualityComparer.Instance);

    public bool TryGet(NamedDefinition definition, out Entry entry) => _entries.TryGetValue(definition, out entry!);

    public void Add(NamedDefinition definition, Entry entry) => _entries[definition] = entry;

    internal sealed record Entry(bool Result, string[] Evidence, string[] Definitions, DataQualityFinding[] Findings, CountDetail[] Counts);
}

/// <summary>Loads a record's full resource, for FHIRPath filters only. Null when it cannot be found.</summary>
public interface IRecordSource
{
    Hl7.Fhir.Model.Resource? Load(string resourceType, string id);
}
