using MeasureEval.Core.Partitions;
using MeasureEval.Core.Security;
using Task = System.Threading.Tasks.Task;

namespace MeasureEval.Storage.Tests;

public abstract partial class ResourceStoreContract
{
    /// <summary>The provider's SQL that fills a missing partition_key (the backfill of its schema script).</summary>
    protected abstract string PartitionKeyBackfill { get; }

    // Ids of varied length and shape; "pä-ü" and "p-中" have multi-byte UTF-8, so the hash must run over bytes, not characters.
    private static readonly string[] PartitionedIds =
        [.. Enumerable.Range(0, 150).Select(i => $"p{i}"), "a", "B", "a-1", "a.2", "0190a6f4c2b87d3e9f1a2b3c4d5e6f70", "pä-ü", "p-中"];

    [SkippableTheory]
    [InlineData(1)]
    [InlineData(3)]
    [InlineData(64)]
    public async Task StreamPartitionFactsAsync_AllPartitions_AreDisjointAndMakeTheFullStream(int partitionCount)
    {
        await using var store = await CreateStoreAsync();
        await WriteAllAsync(store, [.. PartitionedIds.Select(p => TestResources.ObservationOf($"obs-{Guid.NewGuid():N}", p)), TestResources.CedarValley()]);
        var all = (await ToListAsync(store.StreamPatientFactsAsync(null, DataScope.Unrestricted, default))).Select(f => f.PatientId).ToList();

        var seen = new List<string>();
        for (var partition = 0; partition < partitionCount; partition++)
        {
            var ids = (await ToListAsync(store.StreamPartitionFactsAsync(partition, partitionCount, DataScope.Unrestricted, default))).Select(f => f.PatientId).ToList();
            Assert.Equal(ids.Order(StringComparer.Ordinal), ids);
            Assert.All(ids, id => Assert.Equal(partition, PatientPartitioner.PartitionOf(id, partitionCount)));
            seen.AddRange(ids);
        }

        Assert.Equal(PartitionedIds.Length, all.Count);
        Assert.Equal(all.Count, seen.Distinct(StringComparer.Ordinal).Count());
        Assert.Equal(all.Order(StringComparer.Ordinal), seen.Order(StringComparer.Ordinal));
    }

    [SkippableFact]
    public async Task StreamPartitionFactsAsync_AfterUpdatesAndDeletes_FollowsTheEntries()
    {
        await using var store = await CreateStoreAsync();
        await WriteAllAsync(store, TestResources.ObservationOf("obs-1", "p1"), TestResources.ObservationOf("obs-2", "p2"));
        var moved = TestResources.ObservationOf("obs-1", "p3");
        await WriteAllAsync(store, moved);
        await WriteAsync(store, s => s.DeleteAsync("Observation", "obs-2", null, default));

        var ids = new List<string>();
        for (var partition = 0; partition < 4; partition++)
        {
            ids.AddRange((await ToListAsync(store.StreamPartitionFactsAsync(partition, 4, DataScope.Unrestricted, default))).Select(f => f.PatientId));
        }

        // p1 lost its only fact and p2's was deleted: their entries are gone (an empty entry is deleted), p3's is new.
        Assert.Equal(["p3"], ids);
    }

    [SkippableFact]
    public async Task PartitionKeyBackfill_EntriesWithoutKey_GetThePartitionersKey()
    {
        await using var store = await CreateStoreAsync();
        await WriteAllAsync(store, [.. PartitionedIds.Select(p => TestResources.ObservationOf($"obs-{Guid.NewGuid():N}", p))]);
        await ExecuteSqlAsync("UPDATE patient_index SET partition_key = NULL");
        Assert.Empty(await ToListAsync(store.StreamPartitionFactsAsync(0, 1, DataScope.Unrestricted, default)));

        await ExecuteSqlAsync(PartitionKeyBackfill);

        // With 2³¹ − 1 partitions a partition is two or three keys wide, so finding each patient alone in its own partition
        // checks the backfilled key against PartitionKey to 31 of its 32 bits.
        const int fine = int.MaxValue;
        foreach (var id in PartitionedIds)
        {
            var found = await ToListAsync(store.StreamPartitionFactsAsync(PatientPartitioner.PartitionOf(id, fine), fine, DataScope.Unrestricted, default));
            Assert.Equal(id, Assert.Single(found).PatientId);
        }

        Assert.Equal(PartitionedIds.Length, (await ToListAsync(store.StreamPartitionFactsAsync(0, 1, DataScope.Unrestricted, default))).Count);
    }

    [SkippableFact]
    public async Task StreamPartitionFactsAsync_PayerScope_YieldsOnlyItsMembersOfThePartition()
    {
        await using var store = await CreateStoreAsync();
        string[] members = [.. Enumerable.Range(0, 20).Select(i => $"pa{i}")];
        string[] others = [.. Enumerable.Range(0, 20).Select(i => $"pb{i}")];
        await WriteAllAsync(store, [
            .. members.Select(Person), .. members.Select(p => CoverageOf($"cov-{p}", p, "plan-a")), .. members.Select(p => CoverageOf($"cov2-{p}", p, "plan-b")),
            .. others.Select(Person), .. others.Select(p => CoverageOf($"cov-{p}", p, "plan-b")), Plan("plan-a"), Plan("plan-b")]);

        var seen = new List<string>();
        for (var partition = 0; partition < 4; partition++)
        {
            var facts = await ToListAsync(store.StreamPartitionFactsAsync(partition, 4, PlanA, default));
            Assert.All(facts, f => Assert.Equal(partition, PatientPartitioner.PartitionOf(f.PatientId, 4)));

            // As in the scoped full stream, a payer's entry keeps only that payer's Coverages (each member also has a plan-b one).
            Assert.All(facts, f => Assert.Equal(["cov-" + f.PatientId], f.Coverages.Select(c => c.Id)));
            seen.AddRange(facts.Select(f => f.PatientId));
        }

        Assert.Equal(members.Order(StringComparer.Ordinal), seen.Order(StringComparer.Ordinal));
    }
}
