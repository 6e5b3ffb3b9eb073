using MeasureEval.Synthetic.Random;

namespace MeasureEval.Synthetic.Tests.Random;

public class Pcg32Tests
{
    [Fact]
    public void NextUInt_Seed42Stream54_MatchesReferenceImplementation()
    {
        // First outputs of the PCG reference implementation (pcg-c, pcg32-demo, pcg32_srandom_r(42, 54)), from memory.
        var rng = new Pcg32(42, 54);
        uint[] expected = [0xa15c02b7, 0x7b47f409, 0xba1d3330, 0x83d2f293, 0xbfa4784b, 0xcbed606e];
        var actual = expected.Select(_ => rng.NextUInt()).ToArray();
        Assert.Equal(expected, actual);
    }

    [Fact]
    public void ForStream_DifferentStreams_GiveDifferentSequences()
    {
        var a = Pcg32.ForStream(7, 0);
        var b = Pcg32.ForStream(7, 1);
        Assert.NotEqual(Enumerable.Range(0, 8).Select(_ => a.NextUInt()), Enumerable.Range(0, 8).Select(_ => b.NextUInt()));
    }

    [Fact]
    public void NextInt_ManyDraws_StayInRangeAndCoverIt()
    {
        var rng = new Pcg32(1, 1);
        var seen = new int[7];
        for (var i = 0; i < 7000; i++)
        {
            seen[rng.NextInt(7)]++;
        }

        // Each of 7 values expected 1000 times; ±20 % is over 6 standard deviations (binomial, n = 7000, p = 1/7).
        Assert.All(seen, count => Assert.InRange(count, 800, 1200));
    }

    [Fact]
    public void StandardNormal_ManyDraws_HaveMeanZeroAndUnitVariance()
    {
        // Irwin–Hall of 12 uniforms minus 6: mean 0, variance 12 × 1/12 = 1.
        var rng = new Pcg32(3, 9);
        var values = Enumerable.Range(0, 20000).Select(_ => rng.StandardNormal()).ToArray();
        var mean = values.Average();
        var variance = values.Select(v => (v - mean) * (v - mean)).Average();
        Assert.InRange(mean, -0.03, 0.03);
        Assert.InRange(variance, 0.95, 1.05);
    }

    [Fact]
    public void LogNormal_ManyDraws_HaveTheGivenMedian()
    {
        var rng = new Pcg32(5, 5);
        var values = Enumerable.Range(0, 10001).Select(_ => rng.LogNormal(7.0, 0.2)).Order().ToArray();
        Assert.InRange(values[5000], 6.9, 7.1);
        // exp(0.2 × 1.645) = 1.390: the 95th percentile of a log-normal with σ = 0.2.
        Assert.InRange(values[9500], 7.0 * 1.35, 7.0 * 1.43);
    }

    [Fact]
    public void NextUuid_Always_HasVersion4AndRfcVariant()
    {
        var rng = new Pcg32(11, 2);
        for (var i = 0; i < 100; i++)
        {
            var uuid = rng.NextUuid();
            Assert.True(Guid.TryParse(uuid, out _), uuid);
            Assert.Equal('4', uuid[14]);
            Assert.Contains(uuid[19], "89ab");
        }
    }
}
