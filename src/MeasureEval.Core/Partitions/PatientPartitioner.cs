using System.Text;

namespace MeasureEval.Core.Partitions;

/// <summary>
/// Patient id → partition, shared by the store (which keeps each index entry's <see cref="PartitionKey"/>) and the
/// cluster (which runs one grain per partition). The key is 32-bit FNV-1a over the id's UTF-8 bytes — the same on every
/// node and every run, unlike string.GetHashCode, which is randomised per process — times 2³²/φ modulo 2³²
/// (Fibonacci hashing, Knuth TAOCP vol. 3 §6.4), which spreads FNV's well-mixed low bits into the high bits that pick a
/// partition. A partition is a contiguous range of keys (partition = key × count / 2³²), so the store reads one
/// partition as one range of an index.
/// </summary>
public static class PatientPartitioner
{
    // FNV-1a 32-bit parameters, from the FNV reference (Fowler/Noll/Vo, IETF draft-eastlake-fnv).
    private const uint OffsetBasis = 2166136261;
    private const uint Prime = 16777619;

    /// <summary>⌊2³²/φ⌋ = 0x9E3779B9 (φ the golden ratio).</summary>
    private const uint Golden = 2654435769;

    /// <summary>Number of 32-bit keys: the partitions split [0, 2³²).</summary>
    private const ulong HashSpace = 1UL << 32;

    public static uint Fnv1a(string value)
    {
        ArgumentNullException.ThrowIfNull(value);
        var hash = OffsetBasis;
        foreach (var b in Encoding.UTF8.GetBytes(value))
        {
            hash ^= b;
            hash *= Prime;
        }

        return hash;
    }

    /// <summary>The patient's partition key, in [0, 2³²): what the store keeps beside the index entry.</summary>
    public static uint PartitionKey(string patientId) => unchecked(Fnv1a(patientId) * Golden);

    public static int PartitionOf(string patientId, int partitionCount)
    {
        ArgumentOutOfRangeException.ThrowIfNegativeOrZero(partitionCount);
        return (int)(PartitionKey(patientId) * (ulong)partitionCount >> 32);
    }

    /// <summary>
    /// The partition keys of one partition, [From, Until): exactly the ids whose <see cref="PartitionOf"/> is
    /// <paramref name="partition"/> (key × count / 2³² = p ⇔ ⌈p·2³²/count⌉ ≤ key &lt; ⌈(p+1)·2³²/count⌉).
    /// </summary>
    public static (long From, long Until) KeyRange(int partition, int partitionCount)
    {
        ArgumentOutOfRangeException.ThrowIfNegativeOrZero(partitionCount);
        ArgumentOutOfRangeException.ThrowIfNegative(partition);
        ArgumentOutOfRangeException.ThrowIfGreaterThanOrEqual(partition, partitionCount);
        return (CeilingBound(partition, partitionCount), CeilingBound(partition + 1, partitionCount));
    }

    private static long CeilingBound(int partition, int partitionCount) => (long)(((ulong)partition * HashSpace + (ulong)partitionCount - 1) / (ulong)partitionCount);
}
