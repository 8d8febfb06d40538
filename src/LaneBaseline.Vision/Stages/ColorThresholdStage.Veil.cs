using LaneBaseline.Vision.Pipeline;
using System.Runtime.CompilerServices;

namespace LaneBaseline.Vision.Stages;

/// <summary>The veil-headroom ridge: faint paint under a low sun's veil, on veiled roads only.</summary>
public sealed partial class ColorThresholdStage
{

    /// <summary>
    /// The scale s of the veil-headroom ridge test, or 0 when the road is not veiled
    /// (<see cref="Pipeline.Workspace.ColorSection.Veiled"/>) or the test is off (<see cref="LaneBaseline.Core.Options.ColorOptions.VeilRidgeMinStep"/> 255).
    /// Koschmieder's law (H. Koschmieder, "Theorie der horizontalen Sichtweite", Beitr. Phys. freien Atm. 12, 1924;
    /// the same model as the airlight term of He, Sun and Tang, CVPR 2009) writes a veiled pixel as I = J·t + A·(1 − t):
    /// the scene J attenuated by t plus a veil of luminance A. A marking's step over its background then shrinks to
    /// t·ΔJ, and the background's distance below the veil to t·(A − J_b), so ΔI / (A − I_b) = ΔJ / (A − J_b) does not
    /// depend on t. With A = 255 (the sensor's white: the veil of a low sun plus its road reflection approaches it)
    /// the plain ridge threshold T0 = max(ridgeMinStep, ridgeSpreadFactor × texture), both measured on the plain
    /// blurred grey in the road wedge, holds at the road's median grey m, and at background b the threshold is
    /// s·(255 − b) with s = T0 / (255 − m): where the veil is locally stronger than on the median road (the sun's
    /// reflection on the ego lane), the threshold shrinks with the contrast it leaves.
    /// </summary>
    private unsafe double VeilScale(FrameWorkspace workspace, byte* blurBase, long blurStep, int top, double vx, double vy, double halfBottom)
    {
        if (!workspace.Color.Veiled || color.VeilRidgeMinStep >= 255)
        {
            return 0;
        }

        int w = workspace.Width, h = workspace.Height, stride = color.StatisticsStridePx;
        int[] hist = workspace.Color.Histogram;
        Array.Clear(hist);
        long n = 0;
        for (int y = top; y < h; y += stride)
        {
            double t = (y - vy) / (h - 1 - vy);
            double xc = vx + ((((w - 1) / 2.0) - vx) * t);
            int x0 = Math.Max(0, (int)(xc - (halfBottom * t))), x1 = Math.Min(w - 1, (int)(xc + (halfBottom * t)));
            byte* s = blurBase + ((y - workspace.BandTop) * blurStep);
            for (int x = x0; x <= x1; x += stride)
            {
                hist[s[x]]++;
                n++;
            }
        }

        double median = Percentile(hist, n, 0.5);
        double texture = WedgeTexture(workspace, blurBase, blurStep, top, vx, vy, halfBottom);
        double t0 = Math.Max(gradient.RidgeMinStep, gradient.RidgeSpreadFactor * texture);
        return t0 / Math.Max(1.0, 255 - median);
    }

    /// <summary>
    /// Whether any pixel of the row's plain blurred grey over [a0, a1] reaches veilRidgeMinBackground + veilRidgeMinStep:
    /// a centre mean can only exceed a side of at least the minimum background by the minimum step if some pixel does,
    /// so a row without one is skipped exactly (one vectorised scan instead of prefix sums and a per-pixel test).
    /// </summary>
    private unsafe bool VeilRowMayPass(byte* smooth, int a0, int a1)
    {
        double need = color.VeilRidgeMinBackground + color.VeilRidgeMinStep;
        if (need > 255)
        {
            return false;
        }

        var row = new ReadOnlySpan<byte>(smooth + a0, a1 - a0 + 1);
        return row.IndexOfAnyInRange((byte)Math.Ceiling(need), (byte)255) >= 0;
    }

    /// <summary>
    /// The veil-headroom ridge over [from, to] of one row, on the prefix sums <paramref name="pre"/> of the plain blurred
    /// grey: a pixel not already a ridge, whose two side means are both at least <paramref name="minBackground"/> (a
    /// strong local veil, the sun's reflection on the road; elsewhere the equalised ridge is in charge), passes when its
    /// centre mean exceeds each side's mean by at least max(<paramref name="minStep"/>, <paramref name="scale"/> ×
    /// (255 − side mean)) (see <see cref="VeilScale"/>); it then gets the same colour tests and evidence value as a
    /// ridge of the main test. It runs after the saturated-blob suppression: that clears the rims CLAHE lifts around a
    /// clipped blob, while here a clipped plateau gives no ridge (its centre cannot exceed a clipped side), so the faint
    /// dashes beside the sun's reflection are kept.
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private static unsafe void VeilRidge(in RowKernel kernel, byte* ev, int[] pre, int from, int to, int c, int d, double scale, double minStep, double minBackground)
    {
        double nc = (2 * c) + 1, ns = d + 1;
        for (int x = from; x <= to; x++)
        {
            if (ev[x] >= 160)
            {
                continue;
            }

            int leftSum = pre[x - d + 1] - pre[x - (2 * d)];
            if (leftSum < minBackground * ns)
            {
                continue; // most pixels: the left side is not veiled enough (integer test first)
            }

            double centre = (pre[x + c + 1] - pre[x - c]) / nc;
            double left = leftSum / ns;
            double right = (pre[x + (2 * d) + 1] - pre[x + d]) / ns;
            double stepL = centre - left, stepR = centre - right;
            if (stepL < minStep || stepR < minStep || right < minBackground)
            {
                continue;
            }

            if (stepL >= scale * (255 - left) && stepR >= scale * (255 - right))
            {
                kernel.Evidence(x, true);
            }
        }
    }

    /// <summary>
    /// Texture spread of a grey band in the road wedge: the median absolute difference of pixels a stride apart, as a
    /// Gaussian sigma (MAD × 1.4826, divided by √2 for a difference; common practice); smooth lighting gradients barely
    /// move it. Rows and columns sampled every <c>color.statisticsStridePx</c>.
    /// </summary>
    private unsafe double WedgeTexture(FrameWorkspace workspace, byte* bandBase, long bandStep, int top, double vx, double vy, double halfBottom)
    {
        int w = workspace.Width, h = workspace.Height, stride = color.StatisticsStridePx;
        int[] diffHist = workspace.Color.DiffHistogram;
        Array.Clear(diffHist);
        long diffs = 0;
        for (int y = top; y < h; y += stride)
        {
            double t = (y - vy) / (h - 1 - vy);
            double xc = vx + ((((w - 1) / 2.0) - vx) * t);
            int x0 = Math.Max(0, (int)(xc - (halfBottom * t))), x1 = Math.Min(w - 1, (int)(xc + (halfBottom * t)));
            byte* s = bandBase + ((y - workspace.BandTop) * bandStep);
            for (int x = x0; x <= x1 && x + stride < w; x += stride)
            {
                diffHist[Math.Abs(s[x + stride] - s[x])]++;
                diffs++;
            }
        }

        return Math.Max(1.0, Percentile(diffHist, diffs, 0.5) * 1.4826 / Math.Sqrt(2));
    }
}
