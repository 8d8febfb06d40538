using LaneBaseline.Vision.Stages;
using Xunit;

namespace LaneBaseline.Vision.Tests.Stages;

/// <summary>
/// The colour stage's row kernel: the eight-pixel path (AVX2) and the four-pixel prefix sums must give exactly what the
/// per-pixel definitions give (the ridge, yellowness and lightness tests of docs/detect.md, stage `color`), on seeded
/// random rows with random gains and thresholds. Reference: the per-pixel loop itself (an identity check, common practice
/// for vectorised code).
/// </summary>
public sealed class ColorRowKernelTests
{
    [Theory]
    [InlineData(1)]
    [InlineData(2)]
    [InlineData(3)]
    [InlineData(4)]
    public unsafe void VectorPath_AndPrefixSums_MatchThePerPixelDefinition(int seed)
    {
        var rng = new Random(seed);
        const int W = 1280;
        byte[] colour = new byte[3 * W];
        byte[] grey = new byte[W];
        rng.NextBytes(colour);
        rng.NextBytes(grey);

        // Runs of bright "paint" on a darker road so that the ridge passes somewhere, not only at random.
        for (int x = 0; x < W; x++)
        {
            grey[x] = (byte)((x / 37) % 3 == 0 ? 180 + (grey[x] % 60) : 40 + (grey[x] % 50));
        }

        int[] pre = new int[W + 1];
        int[] naive = new int[W + 1];
        int a0 = rng.Next(0, 40), a1 = W - 1 - rng.Next(0, 40);
        fixed (byte* g = grey)
        {
            ColorThresholdStage.PrefixSums(g, pre, a0, a1);
        }

        naive[a0] = 0;
        for (int x = a0; x <= a1; x++)
        {
            naive[x + 1] = naive[x] + grey[x];
        }

        Assert.Equal(naive.AsSpan(a0, a1 - a0 + 2).ToArray(), pre.AsSpan(a0, a1 - a0 + 2).ToArray());

        for (int trial = 0; trial < 20; trial++)
        {
            int d = rng.Next(2, 33), c = Math.Max(1, d / 4), nc = (2 * c) + 1, ns = d + 1;
            long thr = rng.Next(0, 40) * nc * ns;
            int gainB = rng.Next(64, 1025), gainG = rng.Next(64, 1025), gainR = rng.Next(64, 1025);
            int yellowMin = rng.Next(1, 60);
            double whiteThr = rng.Next(40, 200), yellowL = rng.Next(20, 150);
            int xs = a0 + (2 * d), xe = a1 - (2 * d);
            byte[] evVector = new byte[W], evScalar = new byte[W];
            fixed (byte* row = colour)
            fixed (byte* ev1 = evVector)
            fixed (byte* ev2 = evScalar)
            {
                var vectorKernel = new ColorThresholdStage.RowKernel(row, ev1, pre, c, d, nc, ns, thr, gainB, gainG, gainR, yellowMin, whiteThr, yellowL);
                int rest = System.Runtime.Intrinsics.X86.Avx2.IsSupported ? vectorKernel.Vector(xs, xe) : xs;
                vectorKernel.Scalar(rest, xe);
                new ColorThresholdStage.RowKernel(row, ev2, pre, c, d, nc, ns, thr, gainB, gainG, gainR, yellowMin, whiteThr, yellowL).Scalar(xs, xe);
            }

            Assert.Equal(evScalar, evVector);
            Assert.Contains(evScalar, v => v != 0); // the rows exercise the tests (some evidence is set)
        }
    }
}
