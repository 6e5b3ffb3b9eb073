namespace MeasureEval.Synthetic.Random;

/// <summary>
/// PCG32 (XSH-RR, O'Neill 2014): a small seeded generator whose output is fixed by its published
/// algorithm, so a seed gives the same population on every runtime (System.Random promises no such thing).
/// Only integer and IEEE double arithmetic is used — no library transcendental functions, whose last bits
/// may differ between platforms — so generated values are byte-identical everywhere.
/// </summary>
public sealed class Pcg32
{
    private const ulong Multiplier = 6364136223846793005UL;
    private readonly ulong _increment;
    private ulong _state;

    public Pcg32(ulong seed, ulong stream)
    {
        _increment = (stream << 1) | 1UL;
        _state = 0;
        NextUInt();
        _state = unchecked(_state + seed);
        NextUInt();
    }

    /// <summary>A generator for one numbered sub-stream of a seed (one patient, say), independent of the others.</summary>
    public static Pcg32 ForStream(ulong seed, ulong stream) => new(SplitMix64(seed ^ SplitMix64(stream)), stream);

    /// <summary>SplitMix64 finaliser (Steele, Lea, Flood 2014): spreads nearby seeds over the whole state space.</summary>
    public static ulong SplitMix64(ulong x)
    {
        unchecked
        {
            x += 0x9E3779B97F4A7C15UL;
            x = (x ^ (x >> 30)) * 0xBF58476D1CE4E5B9UL;
            x = (x ^ (x >> 27)) * 0x94D049BB133111EBUL;
            return x ^ (x >> 31);
        }
    }

    public uint NextUInt()
    {
        var old = _state;
        _state = unchecked((old * Multiplier) + _increment);
        var xorShifted = (uint)(((old >> 18) ^ old) >> 27);
        var rotation = (int)(old >> 59);
        return (xorShifted >> rotation) | (xorShifted << (-rotation & 31));
    }

    public ulong NextULong() => ((ulong)NextUInt() << 32) | NextUInt();

    /// <summary>Uniform in [0, 1) with 53 random bits.</summary>
    public double NextDouble() => (NextULong() >> 11) * (1.0 / (1UL << 53));

    /// <summary>Uniform integer in [0, maxExclusive), unbiased (rejection of the short last block).</summary>
    public int NextInt(int maxExclusive)
    {
        ArgumentOutOfRangeException.ThrowIfNegativeOrZero(maxExclusive);
        var bound = (uint)maxExclusive;
        var threshold = unchecked((uint)-bound) % bound;
        while (true)
        {
            var r = NextUInt();
            if (r >= threshold)
            {
                return (int)(r % bound);
            }
        }
    }

    /// <summary>Uniform integer in [min, max], both inclusive.</summary>
    public int Between(int min, int max) => min + NextInt(max - min + 1);

    public bool Chance(double probability) => NextDouble() < probability;

    /// <summary>
    /// Approximately standard normal: the Irwin–Hall sum of twelve uniforms minus six (mean 0, variance 1,
    /// range ±6). Close enough for synthetic vitals and labs, and free of platform-dependent math.
    /// </summary>
    public double StandardNormal()
    {
        var sum = 0.0;
        for (var i = 0; i < 12; i++)
        {
            sum += NextDouble();
        }

        return sum - 6.0;
    }

    public double Normal(double mean, double standardDeviation) => mean + (standardDeviation * StandardNormal());

    /// <summary>
    /// Log-normal with the given median: median × exp(σ·z), exp taken by its Taylor series to the 6th power on a
    /// z clamped to ±3 (|σ·z| ≤ 1 for σ ≤ 1/3: error below 0.03 %), again to stay platform-independent.
    /// </summary>
    public double LogNormal(double median, double sigma)
    {
        var x = sigma * Math.Clamp(StandardNormal(), -3.0, 3.0);
        var term = 1.0;
        var sum = 1.0;
        for (var n = 1; n <= 6; n++)
        {
            term *= x / n;
            sum += term;
        }

        return median * sum;
    }

    public T Pick<T>(IReadOnlyList<T> items)
    {
        ArgumentNullException.ThrowIfNull(items);
        return items[NextInt(items.Count)];
    }

    /// <summary>Picks by relative weight (weights need not sum to 1).</summary>
    public T PickWeighted<T>(IReadOnlyList<(T Item, double Weight)> items)
    {
        ArgumentNullException.ThrowIfNull(items);
        var total = 0.0;
        foreach (var (_, weight) in items)
        {
            total += weight;
        }

        var target = NextDouble() * total;
        foreach (var (item, weight) in items)
        {
            target -= weight;
            if (target < 0)
            {
                return item;
            }
        }

        return items[^1].Item;
    }

    /// <summary>A version-4-shaped UUID (RFC 9562 layout) from 122 generated bits, lower-case.</summary>
    public string NextUuid()
    {
        var high = NextULong();
        var low = NextULong();
        high = (high & 0xFFFFFFFFFFFF0FFFUL) | 0x0000000000004000UL;
        low = (low & 0x3FFFFFFFFFFFFFFFUL) | 0x8000000000000000UL;
        return string.Create(36, (high, low), static (span, v) =>
        {
            const string hex = "0123456789abcdef";
            var pos = 0;
            for (var i = 0; i < 32; i++)
            {
                if (i is 8 or 12 or 16 or 20)
                {
                    span[pos++] = '-';
                }

                var word = i < 16 ? v.high : v.low;
                var shift = 60 - ((i % 16) * 4);
                span[pos++] = hex[(int)((word >> shift) & 0xF)];
            }
        });
    }
}
