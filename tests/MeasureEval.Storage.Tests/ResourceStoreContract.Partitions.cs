using MeasureEval.Core.Partitions;
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
        var all = (await ToListAsync(store.StreamPatientFactsAsync(null, default))).Select(f => f.PatientId).ToList();

        var seen = new List<string>();
        for (var partition = 0; partition < partitionCount; partition++)
        {
            var ids = (await ToListAsync(store.StreamPartitionFactsAsync(partition, partitionCount, default))).Select(f => f.PatientId).ToList();
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
            ids.AddRange((await ToListAsync(store.StreamPartitionFactsAsync(partition, 4, default))).Select(f => f.PatientId));
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
        Assert.Empty(await ToListAsync(store.StreamPartitionFactsAsync(0, 1, default)));

        await ExecuteSqlAsync(PartitionKeyBackfill);

        // With 2³¹ − 1 partitions a partition is two or three keys wide, so finding each patient alone in its own partition
        // checks the backfilled key against PartitionKey to 31 of its 32 bits.
        const int fine = int.MaxValue;
        foreach (var id in PartitionedIds)
        {
            var found = await ToListAsync(store.StreamPartitionFactsAsync(PatientPartitioner.PartitionOf(id, fine), fine, default));
            Assert.Equal(id, Assert.Single(found).PatientId);
        }

        Assert.Equal(PartitionedIds.Length, (await ToListAsync(store.StreamPartitionFactsAsync(0, 1, default))).Count);
    }
}
