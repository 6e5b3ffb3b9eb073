using MeasureEval.Cluster.Partitions;

namespace MeasureEval.Cluster.Tests.Partitions;

public sealed class PatientPartitionerTests
{
    [Theory]
    // FNV-1a 32-bit test vectors from the FNV reference test suite (isthe.com/chongo/tech/comp/fnv, "test_fnv.c").
    [InlineData("", 0x811c9dc5u)]
    [InlineData("a", 0xe40c292cu)]
    [InlineData("foobar", 0xbf9cf968u)]
    public void Fnv1a_PublishedVectors(string value, uint expected) => Assert.Equal(expected, PatientPartitioner.Fnv1a(value));

    [Fact]
    public void PartitionOf_SpreadsIdsOverEveryPartition()
    {
        var counts = new int[64];
        for (var i = 0; i < 6400; i++)
        {
            counts[PatientPartitioner.PartitionOf($"patient-{i}", 64)]++;
        }

        // Uniform would be 100 each; a hash that clumps leaves partitions empty or doubles them.
        Assert.All(counts, c => Assert.InRange(c, 50, 150));
    }
}
