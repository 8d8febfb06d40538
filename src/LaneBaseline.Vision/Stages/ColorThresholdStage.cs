using LaneBaseline.Core.Options;
using LaneBaseline.Vision.Pipeline;
using OpenCvSharp;

namespace LaneBaseline.Vision.Stages;

/// <summary>
/// Marking evidence inside the region of interest: white and yellow paint relative to the road's own lightness,
/// gated by a paired horizontal-gradient (ridge) test whose scale follows the perspective.
/// </summary>
/// <remarks>
/// Steps, one pass per image row below <see cref="FrameWorkspace.RoiTop"/> (and below the Hough search band's top)
/// inside the region trapezoid:
/// (1) road statistics: median and robust spread (interquartile range / 1.349) of the HLS lightness
/// L = (max(R,G,B) + min(R,G,B)) / 2 sampled every <see cref="ColorOptions.StatisticsStridePx"/> pixels inside a wedge
/// from the bottom centre (half width <see cref="ColorOptions.StatisticsHalfWidthFraction"/> × width) to the vanishing
/// point, so verges and sky do not inflate the spread; (2) white: L ≥ max(<see cref="ColorOptions.WhiteMinLightness"/>, median +
/// max(<see cref="ColorOptions.WhiteMinContrast"/>, <see cref="ColorOptions.WhiteSpreadFactor"/> × spread));
/// yellow: min(R,G) − B ≥ <see cref="ColorOptions.YellowMinChroma"/> and L ≥ median + <see cref="ColorOptions.YellowMinContrast"/>;
/// (3) ridge, on the Gaussian-blurred grey image of <see cref="GradientStage"/>: with d the expected marking width at
/// the row (<see cref="GradientOptions.MarkingWidthFraction"/> × width at the bottom row, shrinking linearly towards
/// the horizon, at least 2 px), the mean grey level over the centre must exceed the means over
/// [x − 2d, x − d] and [x + d, x + 2d] by max(<see cref="GradientOptions.RidgeMinStep"/>,
/// <see cref="GradientOptions.RidgeSpreadFactor"/> × texture) each, where texture is the robust sigma of differences of
/// blurred grey pixels <see cref="ColorOptions.StatisticsStridePx"/> apart in the road wedge (immune to the smooth
/// brightness gradients of headlights and glare): a rising step then a falling step in x (a Sobel-x
/// pair of opposite sign at the marking's scale), which rejects shadow edges, kerbs and bright areas wider than a
/// marking; (4) evidence = 255 for ridge and paint colour, 160 for ridge alone, 100 for yellow without a ridge,
/// 0 otherwise. Pixel (x, y), origin top-left, y down.
/// <para>References: [1] OpenCV documentation, "Color conversions" (RGB to HLS lightness). [2] J. Canny, IEEE Trans.
/// PAMI 8(6), 1986, DOI 10.1109/TPAMI.1986.4767851 (step edges as gradient extrema).</para>
/// </remarks>
public sealed class ColorThresholdStage : IFrameStage
{
    private readonly ColorOptions color;
    private readonly GradientOptions gradient;

    /// <summary>Creates the stage.</summary>
    public ColorThresholdStage(ColorOptions color, GradientOptions gradient)
    {
        this.color = color;
        this.gradient = gradient;
    }

    /// <inheritdoc />
    public string Name => "color";

    /// <inheritdoc />
    public unsafe void Process(FrameWorkspace workspace)
    {
        ArgumentNullException.ThrowIfNull(workspace);
        Mat frame = workspace.Frame;
        Mat evidence = workspace.Evidence;
        int w = workspace.Width, h = workspace.Height;
        evidence.SetTo(Scalar.All(0));
        double vy = workspace.VanishingY;
        int top = Math.Clamp((int)Math.Floor(workspace.RoiTop) - 1, workspace.BandTop, h - 1);
        double[] q = workspace.Trapezoid;
        byte* frameBase = (byte*)frame.DataPointer;
        long frameStep = frame.Step();
        byte* evBase = (byte*)evidence.DataPointer;
        byte* blurBase = (byte*)workspace.Blurred.DataPointer;
        long blurStep = workspace.Blurred.Step();
        long evStep = evidence.Step();

        // (1) Road statistics inside the road sample: a narrow wedge from the bottom centre towards the vanishing point.
        int[] hist = workspace.Histogram;
        int[] diffHist = workspace.DiffHistogram;
        Array.Clear(hist);
        Array.Clear(diffHist);
        long diffs = 0;
        int stride = color.StatisticsStridePx;
        long total = 0;
        double vx = workspace.VanishingX, halfBottom = color.StatisticsHalfWidthFraction * w;
        for (int y = top; y < h; y += stride)
        {
            double t = (y - vy) / (h - 1 - vy);
            double xc = vx + ((((w - 1) / 2.0) - vx) * t);
            int x0 = Math.Max(0, (int)(xc - (halfBottom * t))), x1 = Math.Min(w - 1, (int)(xc + (halfBottom * t)));
            byte* row = frameBase + (y * frameStep);
            for (int x = x0; x <= x1; x += stride)
            {
                byte* p = row + (3 * x);
                int mx = Math.Max(p[0], Math.Max(p[1], p[2])), mn = Math.Min(p[0], Math.Min(p[1], p[2]));
                hist[(mx + mn) >> 1]++;
                total++;
                if (x + stride < w)
                {
                    byte* s = blurBase + ((y - workspace.BandTop) * blurStep);
                    diffHist[Math.Abs(s[x + stride] - s[x])]++;
                    diffs++;
                }
            }
        }

        double median = Percentile(hist, total, 0.5);
        double spread = Math.Max(1.0, (Percentile(hist, total, 0.75) - Percentile(hist, total, 0.25)) / 1.349);
        workspace.RoadMedian = median;
        workspace.RoadSpread = spread;
        double whiteThr = Math.Max(color.WhiteMinLightness, median + Math.Max(color.WhiteMinContrast, color.WhiteSpreadFactor * spread));
        double yellowL = median + color.YellowMinContrast;
        double yellowC = color.YellowMinChroma;
        // Texture spread for the ridge: median absolute difference of blurred grey pixels a stride apart, as a
        // Gaussian sigma (MAD x 1.4826, divided by sqrt 2 for a difference); smooth lighting gradients barely move it.
        double texture = Math.Max(1.0, Percentile(diffHist, diffs, 0.5) * 1.4826 / Math.Sqrt(2));
        double ridgeThr = Math.Max(gradient.RidgeMinStep, gradient.RidgeSpreadFactor * texture);
        double widthBottom = gradient.MarkingWidthFraction * w;
        int[] pre = workspace.Prefix;

        for (int y = top; y < h; y++)
        {
            RowSpan(q, y, w, out int x0, out int x1);
            if (x1 < x0)
            {
                continue;
            }

            byte* row = frameBase + (y * frameStep);
            byte* ev = evBase + (y * evStep);
            byte* smooth = blurBase + ((y - workspace.BandTop) * blurStep);
            double scale = (y - vy) / (h - 1 - vy);
            int d = Math.Max(2, (int)Math.Round(widthBottom * scale));
            int c = Math.Max(1, d / 4);

            // Prefix sums of the blurred grey over the row span widened by the ridge reach.
            int a0 = Math.Max(0, x0 - (2 * d)), a1 = Math.Min(w - 1, x1 + (2 * d));
            pre[a0] = 0;
            for (int x = a0; x <= a1; x++)
            {
                pre[x + 1] = pre[x] + smooth[x];
            }

            // Ridge in integers: centreMean - sideMean >= thr  <=>  centreSum*ns - sideSum*nc >= thr*nc*ns.
            int nc = (2 * c) + 1, ns = d + 1;
            long thrScaled = (long)Math.Ceiling(ridgeThr * nc * ns);
            int xs = Math.Max(x0, a0 + (2 * d)), xe = Math.Min(x1, a1 - (2 * d));
            for (int x = xs; x <= xe; x++)
            {
                long centre = (long)(pre[x + c + 1] - pre[x - c]) * ns;
                long left = (long)(pre[x - d + 1] - pre[x - (2 * d)]) * nc;
                long right = (long)(pre[x + (2 * d) + 1] - pre[x + d]) * nc;
                byte* p = row + (3 * x);
                int b = p[0], g = p[1], r = p[2];
                bool yellowish = Math.Min(r, g) - b >= yellowC;
                bool ridge = centre - left >= thrScaled && centre - right >= thrScaled;
                if (!ridge && !yellowish)
                {
                    continue;
                }

                int l = (Math.Max(b, Math.Max(g, r)) + Math.Min(b, Math.Min(g, r))) >> 1;
                bool white = l >= whiteThr;
                bool yellow = yellowish && l >= yellowL;
                ev[x] = ridge ? (white || yellow ? (byte)255 : (byte)160) : (yellow ? (byte)100 : (byte)0);
            }
        }
    }

    /// <summary>Columns of row <paramref name="y"/> inside the trapezoid (top-left, top-right, bottom-right, bottom-left), clipped to the frame.</summary>
    private static void RowSpan(double[] q, int y, int w, out int x0, out int x1)
    {
        double t = (y - q[1]) / (q[5] - q[1]);
        double xl = q[0] + ((q[6] - q[0]) * t);
        double xr = q[2] + ((q[4] - q[2]) * t);
        x0 = Math.Max(0, (int)Math.Ceiling(xl));
        x1 = Math.Min(w - 1, (int)Math.Floor(xr));
    }

    private static double Percentile(int[] hist, long total, double p)
    {
        if (total == 0)
        {
            return 0;
        }

        long target = (long)Math.Ceiling(p * total);
        long acc = 0;
        for (int i = 0; i < hist.Length; i++)
        {
            acc += hist[i];
            if (acc >= Math.Max(1, target))
            {
                return i;
            }
        }

        return 255;
    }

    /// <inheritdoc />
    public void Dispose()
    {
    }
}
