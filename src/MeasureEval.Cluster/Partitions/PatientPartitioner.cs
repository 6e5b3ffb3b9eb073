using System.Text;

namespace MeasureEval.Cluster.Partitions;

/// <summary>
/// Patient id → partition by 32-bit FNV-1a over the id's UTF-8 bytes: the same on every node and every run, unlike
/// string.GetHashCode, which is randomised per process.
/// </summary>
public static class PatientPartitioner
{
    // FNV-1a 32-bit parameters, from the FNV reference (Fowler/Noll/Vo, IETF draft-eastlake-fnv).
    private const uint OffsetBasis = 2166136261;
    private const uint Prime = 16777619;

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

    public static int PartitionOf(string patientId, int partitions) => (int)(Fnv1a(patientId) % (uint)partitions);
}
