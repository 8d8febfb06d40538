using System.Runtime.CompilerServices;
using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;

namespace LaneBaseline.Vision.Stages;

/// <summary>Steps (2)–(4) row by row: the ridge and yellowness tests, scalar and eight pixels at a time, on prefix sums.</summary>
public sealed partial class ColorThresholdStage
{
    /// <summary>
    /// Steps (2)–(4) for one row: the ridge test on the row's prefix sums, the yellowness test on the grey-world
    /// corrected colour, and the evidence value where either passes. <see cref="Vector"/> tests eight pixels at a time
    /// (AVX2: the prefix-sum differences as 32-bit integers, the B, G, R bytes gathered by byte shuffles) and leaves
    /// the pixels that pass either test to the same per-pixel code as <see cref="Scalar"/>, so both give identical evidence.
    /// </summary>
    internal readonly unsafe ref struct RowKernel(byte* row, byte* ev, int[] pre, int c, int d, int nc, int ns, long thrScaled,
        int gainB, int gainG, int gainR, int yellowMin, double whiteThr, double yellowL)
    {
        /// <summary>Per-pixel tests over [from, to].</summary>
        [MethodImpl(MethodImplOptions.AggressiveOptimization)]
        public void Scalar(int from, int to)
        {
            for (int x = from; x <= to; x++)
            {
                long centre = (long)(pre[x + c + 1] - pre[x - c]) * ns;
                long left = (long)(pre[x - d + 1] - pre[x - (2 * d)]) * nc;
                long right = (long)(pre[x + (2 * d) + 1] - pre[x + d]) * nc;
                bool ridge = centre - left >= thrScaled && centre - right >= thrScaled;
                Evidence(x, ridge);
            }
        }

        /// <summary>Eight pixels at a time while they fit in [from, to]; returns the first pixel left for <see cref="Scalar"/>.</summary>
        [MethodImpl(MethodImplOptions.AggressiveOptimization)]
        public int Vector(int from, int to)
        {
            Vector128<byte> b0 = Vector128.Create((byte)0, 3, 6, 9, 12, 15, 0x80, 0x80, 0x80, 0x80, 0x80, 0x80, 0x80, 0x80, 0x80, 0x80);
            Vector128<byte> b1 = Vector128.Create(0x80, 0x80, 0x80, 0x80, 0x80, 0x80, (byte)10, 13, 0x80, 0x80, 0x80, 0x80, 0x80, 0x80, 0x80, 0x80);
            Vector128<byte> g0 = Vector128.Create((byte)1, 4, 7, 10, 13, 0x80, 0x80, 0x80, 0x80, 0x80, 0x80, 0x80, 0x80, 0x80, 0x80, 0x80);
            Vector128<byte> g1 = Vector128.Create(0x80, 0x80, 0x80, 0x80, 0x80, (byte)8, 11, 14, 0x80, 0x80, 0x80, 0x80, 0x80, 0x80, 0x80, 0x80);
            Vector128<byte> r0 = Vector128.Create((byte)2, 5, 8, 11, 14, 0x80, 0x80, 0x80, 0x80, 0x80, 0x80, 0x80, 0x80, 0x80, 0x80, 0x80);
            Vector128<byte> r1 = Vector128.Create(0x80, 0x80, 0x80, 0x80, 0x80, (byte)9, 12, 15, 0x80, 0x80, 0x80, 0x80, 0x80, 0x80, 0x80, 0x80);
            Vector256<int> vgB = Vector256.Create(gainB), vgG = Vector256.Create(gainG), vgR = Vector256.Create(gainR);
            Vector256<int> v255 = Vector256.Create(255), yMinus1 = Vector256.Create(yellowMin - 1);
            Vector256<int> thr1 = Vector256.Create((int)thrScaled - 1), vns = Vector256.Create(ns), vnc = Vector256.Create(nc);
            int x = from;
            fixed (int* p = pre)
            {
                for (; x + 7 <= to; x += 8)
                {
                    // Ridge: (centre - left) > thr - 1 and (centre - right) > thr - 1, eight pixels.
                    Vector256<int> centre = Avx2.MultiplyLow(Avx2.Subtract(Avx.LoadVector256(p + x + c + 1), Avx.LoadVector256(p + x - c)), vns);
                    Vector256<int> left = Avx2.MultiplyLow(Avx2.Subtract(Avx.LoadVector256(p + x - d + 1), Avx.LoadVector256(p + x - (2 * d))), vnc);
                    Vector256<int> right = Avx2.MultiplyLow(Avx2.Subtract(Avx.LoadVector256(p + x + (2 * d) + 1), Avx.LoadVector256(p + x + d)), vnc);
                    Vector256<int> ridge = Avx2.And(
                        Avx2.CompareGreaterThan(Avx2.Subtract(centre, left), thr1),
                        Avx2.CompareGreaterThan(Avx2.Subtract(centre, right), thr1));

                    // Yellowness min(R', G') - B' >= yellowMin on the gained colours (B, G, R bytes of eight pixels).
                    byte* px = row + (3 * x);
                    Vector128<byte> lo = Sse2.LoadVector128(px), hi = Sse2.LoadVector128(px + 8);
                    Vector128<byte> bb = Sse2.Or(Ssse3.Shuffle(lo, b0), Ssse3.Shuffle(hi, b1));
                    Vector128<byte> gg = Sse2.Or(Ssse3.Shuffle(lo, g0), Ssse3.Shuffle(hi, g1));
                    Vector128<byte> rr = Sse2.Or(Ssse3.Shuffle(lo, r0), Ssse3.Shuffle(hi, r1));
                    Vector256<int> vb = Avx2.Min(Avx2.ShiftRightLogical(Avx2.MultiplyLow(Avx2.ConvertToVector256Int32(bb), vgB), 8), v255);
                    Vector256<int> vg = Avx2.Min(Avx2.ShiftRightLogical(Avx2.MultiplyLow(Avx2.ConvertToVector256Int32(gg), vgG), 8), v255);
                    Vector256<int> vr = Avx2.Min(Avx2.ShiftRightLogical(Avx2.MultiplyLow(Avx2.ConvertToVector256Int32(rr), vgR), 8), v255);
                    Vector256<int> yellow = Avx2.CompareGreaterThan(Avx2.Subtract(Avx2.Min(vr, vg), vb), yMinus1);
                    int ridgeBits = Avx.MoveMask(ridge.AsSingle());
                    int anyBits = ridgeBits | Avx.MoveMask(yellow.AsSingle());
                    while (anyBits != 0)
                    {
                        int k = System.Numerics.BitOperations.TrailingZeroCount(anyBits);
                        anyBits &= anyBits - 1;
                        Evidence(x + k, (ridgeBits & (1 << k)) != 0);
                    }
                }
            }

            return x;
        }

        /// <summary>Step (4) at pixel x: the colour tests and the evidence value, given the ridge result.</summary>
        [MethodImpl(MethodImplOptions.AggressiveInlining)]
        internal void Evidence(int x, bool ridge)
        {
            byte* p = row + (3 * x);
            int b = Math.Min(255, (p[0] * gainB) >> 8), g = Math.Min(255, (p[1] * gainG) >> 8), r = Math.Min(255, (p[2] * gainR) >> 8);
            bool yellowish = Math.Min(r, g) - b >= yellowMin;
            if (!ridge && !yellowish)
            {
                return;
            }

            int l = (Math.Max(b, Math.Max(g, r)) + Math.Min(b, Math.Min(g, r))) >> 1;
            bool white = l >= whiteThr;
            bool yellow = yellowish && l >= yellowL;
            ev[x] = ridge ? (white || yellow ? (byte)255 : (byte)160) : (yellow ? (byte)100 : (byte)0);
        }
    }

    /// <summary>
    /// pre[a0] = 0 and pre[x + 1] = pre[x] + row[x] for x in [a0, a1]: the running sum of the row, four pixels at a time
    /// with an in-register scan where SSE4.1 is available (integer sums, so the same values either way).
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    internal static unsafe void PrefixSums(byte* row, int[] pre, int a0, int a1)
    {
        pre[a0] = 0;
        int x = a0;
        fixed (int* p = pre)
        {
            if (Sse41.IsSupported)
            {
                Vector128<int> carry = Vector128<int>.Zero;
                for (; x + 3 <= a1; x += 4)
                {
                    Vector128<int> v = Sse41.ConvertToVector128Int32(Vector128.CreateScalarUnsafe(*(uint*)(row + x)).AsByte());
                    v = Sse2.Add(v, Sse2.ShiftLeftLogical128BitLane(v, 4));
                    v = Sse2.Add(v, Sse2.ShiftLeftLogical128BitLane(v, 8));
                    v = Sse2.Add(v, carry);
                    Sse2.Store(p + x + 1, v);
                    carry = Sse2.Shuffle(v, 0xFF);
                }
            }

            for (; x <= a1; x++)
            {
                p[x + 1] = p[x] + row[x];
            }
        }
    }
}
