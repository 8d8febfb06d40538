namespace LaneBaseline.Core.Random;

/// <summary>
/// The project's own small pseudo-random generator (SplitMix64), so that outputs depend only on the seed and
/// never on the runtime's <c>System.Random</c> sequence. A struct: copy it to fork a stream.
/// </summary>
/// <remarks>
/// <para>References: [1] G. L. Steele, D. Lea, C. H. Flood, "Fast splittable pseudorandom number generators",
/// OOPSLA 2014, DOI 10.1145/2660193.2660195. [2] S. Vigna, reference C code <c>splitmix64.c</c> (public domain).</para>
/// </remarks>
public struct SplitMix64
{
    private ulong state;

    /// <summary>Creates a generator from a seed.</summary>
    public SplitMix64(ulong seed)
    {
        state = seed;
    }

    /// <summary>Derives an independent generator for a sub-stream (e.g. one per frame) from a seed and an index.</summary>
    public static SplitMix64 ForStream(ulong seed, ulong streamIndex)
    {
        var mixer = new SplitMix64(seed ^ (0x9E3779B97F4A7C15UL * (streamIndex + 1)));
        return new SplitMix64(mixer.NextUInt64());
    }

    /// <summary>Next 64 random bits.</summary>
    public ulong NextUInt64()
    {
        ulong z = state += 0x9E3779B97F4A7C15UL;
        z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9UL;
        z = (z ^ (z >> 27)) * 0x94D049BB133111EBUL;
        return z ^ (z >> 31);
    }

    /// <summary>Uniform double in [0, 1) with 53 random bits.</summary>
    public double NextDouble() => (NextUInt64() >> 11) * (1.0 / 9007199254740992.0);

    /// <summary>Uniform double in [min, max).</summary>
    public double NextDouble(double min, double max) => min + ((max - min) * NextDouble());

    /// <summary>Uniform integer in [0, exclusiveMax) without modulo bias (Lemire's method).</summary>
    public int NextInt(int exclusiveMax)
    {
        ArgumentOutOfRangeException.ThrowIfNegativeOrZero(exclusiveMax);
        ulong m = (ulong)exclusiveMax;
        while (true)
        {
            ulong x = NextUInt64();
            UInt128 product = (UInt128)x * m;
            ulong low = (ulong)product;
            if (low >= m || low >= (0UL - m) % m)
            {
                return (int)(product >> 64);
            }
        }
    }

    /// <summary>Standard normal deviate (Box–Muller, one of the pair).</summary>
    public double NextGaussian()
    {
        double u1 = 1.0 - NextDouble();
        double u2 = NextDouble();
        return Math.Sqrt(-2.0 * Math.Log(u1)) * Math.Cos(2.0 * Math.PI * u2);
    }
}
