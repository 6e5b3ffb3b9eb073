using MeasureEval.Core.Partitions;

namespace MeasureEval.Cluster.Tests.Partitions;

public sealed class PatientPartitionerTests
{
    [Theory]
    // FNV-1a 32-bit test vectors from the FNV reference test suite (isthe.com/chongo/tech/comp/fnv, "test_fnv.c").
    [InlineData("", 0x811c9dc5u)]
    [InlineData("a", 0xe40c292cu)]
    [InlineData("foobar", 0xbf9cf968u)]
    public void Fnv1a_PublishedVectors(string value, uint expected) => Assert.Equal(expected, PatientPartitioner.Fnv1a(value));

    [Theory]
    // The FNV-1a vectors above times 0x9E3779B9 (⌊2³²/φ⌋, Knuth TAOCP vol. 3 §6.4) modulo 2³², computed by hand (Python).
    [InlineData("a", 0x8cb38cccu)]
    [InlineData("foobar", 0x6faa6428u)]
    public void PartitionKey_IsFnv1aTimesGoldenRatio(string value, uint expected) => Assert.Equal(expected, PatientPartitioner.PartitionKey(value));

    [Theory]
    [InlineData("patient-{0}")]
    [InlineData("{0:D5}")]
    public void PartitionOf_SpreadsIdsOverEveryPartition(string format)
    {
        var counts = new int[64];
        for (var i = 0; i < 6400; i++)
        {
            counts[PatientPartitioner.PartitionOf(string.Format(System.Globalization.CultureInfo.InvariantCulture, format, i), 64)]++;
        }

        // Uniform would be 100 each (binomial σ ≈ 9.9, so 50..150 is five σ); a hash that clumps leaves partitions empty or doubles them.
        // FNV-1a alone, partitioned by its high bits, gave 154 for sequential "patient-N" ids: the reason for the golden-ratio step.
        Assert.All(counts, c => Assert.InRange(c, 50, 150));
    }

    [Theory]
    [InlineData(1)]
    [InlineData(3)]
    [InlineData(64)]
    [InlineData(4096)]
    public void KeyRange_TilesTheKeysAndAgreesWithPartitionOf(int partitionCount)
    {
        Assert.Equal(0, PatientPartitioner.KeyRange(0, partitionCount).From);
        Assert.Equal(1L << 32, PatientPartitioner.KeyRange(partitionCount - 1, partitionCount).Until);
        for (var p = 1; p < partitionCount; p++)
        {
            Assert.Equal(PatientPartitioner.KeyRange(p - 1, partitionCount).Until, PatientPartitioner.KeyRange(p, partitionCount).From);
        }

        for (var i = 0; i < 2000; i++)
        {
            var id = $"id-{i}";
            var (from, until) = PatientPartitioner.KeyRange(PatientPartitioner.PartitionOf(id, partitionCount), partitionCount);
            Assert.InRange(PatientPartitioner.PartitionKey(id), from, until - 1);
        }
    }
}
