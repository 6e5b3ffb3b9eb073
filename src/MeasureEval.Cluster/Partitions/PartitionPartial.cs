using MeasureEval.Core.Security;
using MeasureEval.Engine;

namespace MeasureEval.Cluster.Partitions;

/// <summary>What a cluster evaluation asks for; the same for every partition.</summary>
[GenerateSerializer, Immutable]
public sealed record ClusterEvaluationRequest(
    [property: Id(0)] IReadOnlyList<string> MeasureIds,
    [property: Id(1)] DateOnly PeriodStart,
    [property: Id(2)] DateOnly PeriodEnd,
    [property: Id(3)] IReadOnlyList<string>? PatientIds,
    [property: Id(4)] string? Practitioner,
    [property: Id(5)] bool KeepSubjects,
    [property: Id(6)] int Partitions,
    [property: Id(7)] string? PayerOrganizationId = null)
{
    /// <summary>The caller's scope: a payer's members during the period, or everyone.</summary>
    public DataScope Scope => PayerOrganizationId is null ? DataScope.Unrestricted : DataScope.ForPayer(PayerOrganizationId).During(PeriodStart, PeriodEnd);
}

/// <summary>One measure's aggregate over some patients, in a form that ships between nodes and adds up exactly.</summary>
[GenerateSerializer]
public sealed class MeasurePartial
{
    [Id(0)] public required string MeasureId { get; init; }

    [Id(1)] public int PatientsEvaluated { get; set; }

    [Id(2)] public int[] Counts { get; set; } = new int[PopulationKinds.All.Count];

    /// <summary>Stratifier id → stratum code → counts.</summary>
    [Id(3)] public Dictionary<string, Dictionary<string, int[]>> Strata { get; init; } = new(StringComparer.Ordinal);

    [Id(4)] public Dictionary<string, int> Findings { get; init; } = new(StringComparer.Ordinal);

    [Id(5)] public Dictionary<PopulationKind, List<string>>? Subjects { get; set; }

    public static MeasurePartial From(PopulationSummary summary)
    {
        ArgumentNullException.ThrowIfNull(summary);
        var partial = new MeasurePartial { MeasureId = summary.Measure.Id, PatientsEvaluated = summary.PatientsEvaluated, Counts = summary.Counts.ToCounts() };
        foreach (var (stratifier, strata) in summary.Strata)
        {
            partial.Strata[stratifier] = strata.ToDictionary(s => s.Key, s => s.Value.ToCounts(), StringComparer.Ordinal);
        }

        foreach (var (code, count) in summary.FindingCounts)
        {
            partial.Findings[code] = count;
        }

        partial.Subjects = summary.Subjects?.ToDictionary(s => s.Key, s => new List<string>(s.Value));
        return partial;
    }

    /// <summary>Adds another partition's aggregate of the same measure (disjoint patients).</summary>
    public void Merge(MeasurePartial other)
    {
        ArgumentNullException.ThrowIfNull(other);
        PatientsEvaluated += other.PatientsEvaluated;
        Add(Counts, other.Counts);
        foreach (var (stratifier, strata) in other.Strata)
        {
            var mine = Strata.TryGetValue(stratifier, out var found) ? found : Strata[stratifier] = new Dictionary<string, int[]>(StringComparer.Ordinal);
            foreach (var (code, counts) in strata)
            {
                if (mine.TryGetValue(code, out var existing))
                {
                    Add(existing, counts);
                }
                else
                {
                    mine[code] = [.. counts];
                }
            }
        }

        foreach (var (code, count) in other.Findings)
        {
            Findings[code] = Findings.GetValueOrDefault(code) + count;
        }

        if (other.Subjects is not null)
        {
            Subjects ??= [];
            foreach (var (population, ids) in other.Subjects)
            {
                (Subjects.TryGetValue(population, out var list) ? list : Subjects[population] = []).AddRange(ids);
            }
        }
    }

    public PopulationSummary ToSummary(MeasureDefinition measure, MeasurementPeriod period, bool keepSubjects)
    {
        var summary = new PopulationSummary(measure, period, keepSubjects);
        summary.AddPartial(PatientsEvaluated, Counts, Strata, Findings, Subjects);
        return summary;
    }

    private static void Add(int[] into, int[] counts)
    {
        for (var i = 0; i < into.Length; i++)
        {
            into[i] += counts[i];
        }
    }
}

/// <summary>A partition's result and the node that computed it.</summary>
[GenerateSerializer]
public sealed record PartitionResult(
    [property: Id(0)] int Partition,
    [property: Id(1)] string Silo,
    [property: Id(2)] IReadOnlyList<MeasurePartial> Measures);

/// <summary>The merged result of every partition, with which node ran which partition.</summary>
[GenerateSerializer]
public sealed record ClusterRunResult(
    [property: Id(0)] IReadOnlyList<MeasurePartial> Measures,
    [property: Id(1)] IReadOnlyDictionary<int, string> PartitionSilos,
    [property: Id(2)] int Retries);
