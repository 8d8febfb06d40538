using LaneBaseline.Core.Options;
using LaneBaseline.Vision.Pipeline;
using System.Runtime.CompilerServices;
using System.Runtime.Intrinsics.X86;
using OpenCvSharp;

namespace LaneBaseline.Vision.Stages;

/// <summary>
/// Marking evidence inside the region of interest: white and yellow paint relative to the road's own lightness,
/// gated by a paired horizontal-gradient (ridge) test whose scale follows the perspective.
/// </summary>
/// <remarks>
/// Step (0), when <see cref="ColorOptions.GreyWorld"/> is on: grey-world colour constancy (Buchsbaum 1980), the
/// mean B, G, R of the road wedge below give per-channel gains that make the road grey, applied to every pixel's colour
/// before the lightness and yellowness tests, so a sodium or dusk cast neither pushes white paint out of the white
/// band nor makes the whole road yellow. Then steps, one pass per image row below <see cref="Pipeline.Workspace.RegionSection.RoiTop"/> (and below the Hough search band's top)
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
/// PAMI 8(6), 1986, DOI 10.1109/TPAMI.1986.4767851 (step edges as gradient extrema). [3] G. Buchsbaum, "A spatial
/// processor model for object colour perception", J. Franklin Inst. 310(1):1–26, 1980 (grey world).</para>
/// </remarks>
public sealed partial class ColorThresholdStage : IFrameStage
{
    private readonly ColorOptions color;

    private readonly GradientOptions gradient;

    private readonly Mat equalisedBlur = new();

    private CLAHE? clahe;

    private int writtenTop; // rows at and below it may hold last frame's evidence (0: the whole buffer, first frame)

    /// <summary>Creates the stage.</summary>
    public ColorThresholdStage(ColorOptions color, GradientOptions gradient)
    {
        this.color = color;
        this.gradient = gradient;
    }

    /// <inheritdoc />
    public string Name => "color";

    /// <inheritdoc />
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public unsafe void Process(FrameWorkspace workspace)
    {
        ArgumentNullException.ThrowIfNull(workspace);
        Mat frame = workspace.Frame;
        Mat evidence = workspace.Color.Evidence;
        int w = workspace.Width, h = workspace.Height;
        double vy = workspace.Region.VanishingY;
        int top = Math.Clamp((int)Math.Floor(workspace.Region.RoiTop) - 1, workspace.BandTop, h - 1);

        // Only rows this stage wrote before can hold evidence: clear those (the rows above stay zero).
        using (Mat written = evidence.RowRange(Math.Min(writtenTop, h - 1), h))
        {
            written.SetTo(Scalar.All(0));
        }

        writtenTop = top;
        double[] q = workspace.Region.Trapezoid;
        byte* frameBase = (byte*)frame.DataPointer;
        long frameStep = frame.Step();
        byte* evBase = (byte*)evidence.DataPointer;
        byte* blurBase = (byte*)workspace.Gradient.Blurred.DataPointer;
        long blurStep = workspace.Gradient.Blurred.Step();
        long evStep = evidence.Step();

        // (1) Road statistics inside the road sample: a narrow wedge from the bottom centre towards the vanishing point.
        int[] hist = workspace.Color.Histogram;
        Array.Clear(hist);
        int stride = color.StatisticsStridePx;
        long total = 0;
        double vx = workspace.Region.VanishingX, halfBottom = color.StatisticsHalfWidthFraction * w;
        // (0) Grey-world colour constancy on the same wedge (Buchsbaum 1980): per-channel gains that make the road's
        // mean colour grey, in 1/256 fixed point, clamped to [1/4, 4]; 256 (no change) when switched off.
        int gainB = 256, gainG = 256, gainR = 256;
        if (color.GreyWorld)
        {
            GreyWorldGains(frameBase, frameStep, top, w, h, vx, vy, halfBottom, stride, out gainB, out gainG, out gainR);
        }

        workspace.Color.GreyWorldGains = (gainB / 256.0, gainG / 256.0, gainR / 256.0);
        for (int y = top; y < h; y += stride)
        {
            double t = (y - vy) / (h - 1 - vy);
            double xc = vx + ((((w - 1) / 2.0) - vx) * t);
            int x0 = Math.Max(0, (int)(xc - (halfBottom * t))), x1 = Math.Min(w - 1, (int)(xc + (halfBottom * t)));
            byte* row = frameBase + (y * frameStep);
            for (int x = x0; x <= x1; x += stride)
            {
                byte* p = row + (3 * x);
                int pb = Math.Min(255, (p[0] * gainB) >> 8), pg = Math.Min(255, (p[1] * gainG) >> 8), pr = Math.Min(255, (p[2] * gainR) >> 8);
                int mx = Math.Max(pb, Math.Max(pg, pr)), mn = Math.Min(pb, Math.Min(pg, pr));
                hist[(mx + mn) >> 1]++;
                total++;
            }
        }

        double median = Percentile(hist, total, 0.5);
        double spread = Math.Max(1.0, (Percentile(hist, total, 0.75) - Percentile(hist, total, 0.25)) / 1.349);
        workspace.Color.RoadMedian = median;
        workspace.Color.RoadSpread = spread;

        // (1b) Low light: the ridge runs on a CLAHE copy of the grey band (Zuiderveld 1994) when the road is dark.
        byte* ridgeBase = blurBase;
        long ridgeStep = blurStep;
        workspace.Color.Veiled = color.ClaheMinVeilLightness < 255 && median >= color.ClaheMinVeilLightness;
        workspace.Color.Equalised = median < color.ClaheMaxRoadLightness || workspace.Color.Veiled;
        if (workspace.Color.Equalised)
        {
            Equalise(workspace);
            ridgeBase = (byte*)equalisedBlur.DataPointer;
            ridgeStep = equalisedBlur.Step();
        }

        double whiteThr = Math.Max(color.WhiteMinLightness, median + Math.Max(color.WhiteMinContrast, color.WhiteSpreadFactor * spread));
        double yellowL = median + color.YellowMinContrast;
        double yellowC = color.YellowMinChroma;
        int yellowMin = (int)Math.Ceiling(yellowC); // integer yellowness >= yellowC  <=>  >= ceil(yellowC)
        double texture = WedgeTexture(workspace, ridgeBase, ridgeStep, top, vx, vy, halfBottom);
        double ridgeThr = Math.Max(gradient.RidgeMinStep, gradient.RidgeSpreadFactor * texture);
        double widthBottom = gradient.MarkingWidthFraction * w;
        int[] pre = workspace.Color.Prefix;

        // (1e) Veiled road: a second ridge test on the plain grey, relative to the headroom below white (VeilScale).
        double veilScale = VeilScale(workspace, blurBase, blurStep, top, vx, vy, halfBottom);
        int[] veilPre = workspace.Color.VeilPrefix;

        // (1c) Mirror columns (dark scenes only): where a light source is, its reflection on a wet road lies below it.
        bool mirror = color.LightSourceLightness < 255 && median < color.MirrorMaxRoadLightness;
        if (mirror)
        {
            mirror = FindLightColumns(workspace);
        }

        // (1d) Saturated blobs need a blurred pixel at the limit: one look at the rows' maximum skips the per-row scan.
        bool blobs = color.SaturatedBlobLightness < 255;
        if (blobs)
        {
            using Mat rows = workspace.Gradient.Blurred.RowRange(top - workspace.BandTop, h - workspace.BandTop);
            Cv2.MinMaxLoc(rows, out double _, out double brightest);
            blobs = brightest >= (int)color.SaturatedBlobLightness;
        }

        long evidenceBefore = 0, evidenceCleared = 0;

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
            byte* ridgeRow = ridgeBase + ((y - workspace.BandTop) * ridgeStep);
            double scale = (y - vy) / (h - 1 - vy);
            int d = Math.Max(2, (int)Math.Round(widthBottom * scale));
            int c = Math.Max(1, d / 4);

            // Prefix sums of the blurred grey over the row span widened by the ridge reach.
            int a0 = Math.Max(0, x0 - (2 * d)), a1 = Math.Min(w - 1, x1 + (2 * d));
            PrefixSums(ridgeRow, pre, a0, a1);

            // Ridge in integers: centreMean - sideMean >= thr  <=>  centreSum*ns - sideSum*nc >= thr*nc*ns.
            int nc = (2 * c) + 1, ns = d + 1;
            long thrScaled = (long)Math.Ceiling(ridgeThr * nc * ns);
            int xs = Math.Max(x0, a0 + (2 * d)), xe = Math.Min(x1, a1 - (2 * d));
            var kernel = new RowKernel(row, ev, pre, c, d, nc, ns, thrScaled, gainB, gainG, gainR, yellowMin, whiteThr, yellowL);
            int rest = xs;
            if (Avx2.IsSupported && thrScaled <= int.MaxValue)
            {
                rest = kernel.Vector(xs, xe);
            }

            kernel.Scalar(rest, xe);
            if (blobs)
            {
                SuppressNearSaturatedBlobs(smooth, ev, x0, x1, d, w);
            }

            if (veilScale > 0 && VeilRowMayPass(smooth, a0, a1))
            {
                // (3b) Veiled road: the veil-headroom ridge on the plain grey, after the blob suppression (VeilRidge).
                PrefixSums(smooth, veilPre, a0, a1);
                VeilRidge(kernel, ev, veilPre, xs, xe, c, d, veilScale, color.VeilRidgeMinStep, color.VeilRidgeMinBackground);
            }

            if (gradient.OrientationToleranceDeg < 90 || mirror)
            {
                // One pass over the row's evidence runs: counted, then cleared below a light source or off the axis.
                evidenceCleared += ClearRuns(workspace, ev, y, x0, x1, d, mirror ? workspace.Color.LightRow : null, out int seen);
                evidenceBefore += seen;
            }
        }

        workspace.Color.EvidenceKeptShare = evidenceBefore > 0 ? 1 - ((double)evidenceCleared / evidenceBefore) : 1;
    }

    /// <inheritdoc />
    public void Dispose()
    {
        clahe?.Dispose();
        equalisedBlur.Dispose();
    }
}
