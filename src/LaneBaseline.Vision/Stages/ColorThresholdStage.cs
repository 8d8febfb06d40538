using LaneBaseline.Core.Options;
using LaneBaseline.Vision.Pipeline;
using System.Runtime.CompilerServices;
using System.Runtime.Intrinsics;
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
public sealed class ColorThresholdStage : IFrameStage
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
        int[] diffHist = workspace.Color.DiffHistogram;
        Array.Clear(hist);
        Array.Clear(diffHist);
        long diffs = 0;
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
        workspace.Color.Equalised = median < color.ClaheMaxRoadLightness || (color.ClaheMinVeilLightness < 255 && median >= color.ClaheMinVeilLightness);
        if (workspace.Color.Equalised)
        {
            Equalise(workspace);
            ridgeBase = (byte*)equalisedBlur.DataPointer;
            ridgeStep = equalisedBlur.Step();
        }

        for (int y = top; y < h; y += stride)
        {
            double t = (y - vy) / (h - 1 - vy);
            double xc = vx + ((((w - 1) / 2.0) - vx) * t);
            int x0 = Math.Max(0, (int)(xc - (halfBottom * t))), x1 = Math.Min(w - 1, (int)(xc + (halfBottom * t)));
            byte* s = ridgeBase + ((y - workspace.BandTop) * ridgeStep);
            for (int x = x0; x <= x1 && x + stride < w; x += stride)
            {
                diffHist[Math.Abs(s[x + stride] - s[x])]++;
                diffs++;
            }
        }
        double whiteThr = Math.Max(color.WhiteMinLightness, median + Math.Max(color.WhiteMinContrast, color.WhiteSpreadFactor * spread));
        double yellowL = median + color.YellowMinContrast;
        double yellowC = color.YellowMinChroma;
        int yellowMin = (int)Math.Ceiling(yellowC); // integer yellowness >= yellowC  <=>  >= ceil(yellowC)
        // Texture spread for the ridge: median absolute difference of blurred grey pixels a stride apart, as a
        // Gaussian sigma (MAD x 1.4826, divided by sqrt 2 for a difference); smooth lighting gradients barely move it.
        double texture = Math.Max(1.0, Percentile(diffHist, diffs, 0.5) * 1.4826 / Math.Sqrt(2));
        double ridgeThr = Math.Max(gradient.RidgeMinStep, gradient.RidgeSpreadFactor * texture);
        double widthBottom = gradient.MarkingWidthFraction * w;
        int[] pre = workspace.Color.Prefix;

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

            if (gradient.OrientationToleranceDeg < 90 || mirror)
            {
                // One pass over the row's evidence runs: counted, then cleared below a light source or off the axis.
                evidenceCleared += ClearRuns(workspace, ev, y, x0, x1, d, mirror ? workspace.Color.LightRow : null, out int seen);
                evidenceBefore += seen;
            }
        }

        workspace.Color.EvidenceKeptShare = evidenceBefore > 0 ? 1 - ((double)evidenceCleared / evidenceBefore) : 1;
    }

    /// <summary>
    /// For every column, the highest row (smallest y) between the top of the frame and
    /// <see cref="ColorOptions.LightSourceBelowHorizonFraction"/> × height below the horizon whose grey level is at least
    /// <see cref="ColorOptions.LightSourceLightness"/> (a street lamp, the moon, a vehicle's lights); int.MaxValue where
    /// there is none. Paint is never above the horizon and is not that bright at night, so these are light sources.
    /// Lights are small: when more than a quarter of the columns hold one, the sky itself is bright (a dark road under
    /// a daylight sky, e.g. in shadow) and the test is not applied.
    /// </summary>
    /// <returns>Whether the mirror test applies to this frame.</returns>
    private unsafe bool FindLightColumns(FrameWorkspace workspace)
    {
        int w = workspace.Width, h = workspace.Height;
        int[] lightRow = workspace.Color.LightRow;
        Array.Fill(lightRow, int.MaxValue);
        int last = Math.Min(h - 1, (int)(workspace.Region.VanishingY + (color.LightSourceBelowHorizonFraction * h)));
        byte limit = (byte)Math.Clamp(color.LightSourceLightness, 0, 255);
        Mat gray = workspace.Gradient.Gray;
        byte* grayBase = (byte*)gray.DataPointer;
        long grayStep = gray.Step();
        for (int y = 0; y <= last; y++)
        {
            byte* row = grayBase + (y * grayStep);
            for (int x = 0; x < w; x++)
            {
                if (row[x] >= limit && lightRow[x] == int.MaxValue)
                {
                    lightRow[x] = y;
                }
            }
        }

        int litColumns = 0;
        for (int x = 0; x < w; x++)
        {
            litColumns += lightRow[x] != int.MaxValue ? 1 : 0;
        }

        return litColumns * 4 <= w;
    }

    /// <summary>
    /// Whether an evidence run [start, end] of row <paramref name="y"/> lies below a light source: a column within
    /// max(2, d / 2) pixels of it has a light source (see <see cref="FindLightColumns"/>) above row y. A flat wet road is
    /// a horizontal mirror: the reflection of a light lies on the vertical through the light in a camera without roll
    /// (law of reflection), stretched into a streak by the road's roughness; a lane line crosses such a column in a few
    /// rows only, so it loses little.
    /// </summary>
    private static bool UnderLight(int[] lightRow, int y, int start, int end, int d, int w)
    {
        int margin = Math.Max(2, d / 2);
        for (int k = Math.Max(0, start - margin), kEnd = Math.Min(w - 1, end + margin); k <= kEnd; k++)
        {
            if (lightRow[k] < y)
            {
                return true;
            }
        }

        return false;
    }

    /// <summary>
    /// Grey-world gains (Buchsbaum 1980): the mean of each channel over the road wedge sample (the same pixels as the
    /// road statistics) against the mean of the three; gain = grey / channel mean, clamped to [1/4, 4], in 1/256 fixed
    /// point. A grey road gives gains of 1 (256); an empty or black sample leaves the frame unchanged.
    /// </summary>
    private static unsafe void GreyWorldGains(byte* frameBase, long frameStep, int top, int w, int h, double vx, double vy,
        double halfBottom, int stride, out int gainB, out int gainG, out int gainR)
    {
        gainB = gainG = gainR = 256;
        long sb = 0, sg = 0, sr = 0;
        for (int y = top; y < h; y += stride)
        {
            double t = (y - vy) / (h - 1 - vy);
            double xc = vx + ((((w - 1) / 2.0) - vx) * t);
            int x0 = Math.Max(0, (int)(xc - (halfBottom * t))), x1 = Math.Min(w - 1, (int)(xc + (halfBottom * t)));
            byte* row = frameBase + (y * frameStep);
            for (int x = x0; x <= x1; x += stride)
            {
                byte* p = row + (3 * x);
                sb += p[0];
                sg += p[1];
                sr += p[2];
            }
        }

        if (sb > 0 && sg > 0 && sr > 0)
        {
            double grey = (sb + sg + sr) / 3.0;
            gainB = (int)Math.Round(256 * Math.Clamp(grey / sb, 0.25, 4));
            gainG = (int)Math.Round(256 * Math.Clamp(grey / sg, 0.25, 4));
            gainR = (int)Math.Round(256 * Math.Clamp(grey / sr, 0.25, 4));
        }
    }

    /// <summary>
    /// Clears evidence in and around saturated blobs: runs of blurred grey at or above
    /// <see cref="ColorOptions.SaturatedBlobLightness"/> wider than two marking widths (the sun, its road reflection,
    /// a headlamp's core) are not paint, and their rims pass the ridge test; evidence within two marking widths of such a
    /// run is cleared. Paint is never wider than a marking, so a wider saturated run is light, not a line.
    /// </summary>
    private unsafe void SuppressNearSaturatedBlobs(byte* smooth, byte* ev, int x0, int x1, int d, int w)
    {
        int limit = (int)color.SaturatedBlobLightness;
        int x = x0;
        while (x <= x1)
        {
            if (smooth[x] < limit)
            {
                x++;
                continue;
            }

            int start = x;
            while (x <= x1 && smooth[x] >= limit)
            {
                x++;
            }

            if (x - start > 2 * d)
            {
                int a = Math.Max(0, start - (2 * d)), b = Math.Min(w - 1, x - 1 + (2 * d));
                for (int k = a; k <= b; k++)
                {
                    ev[k] = 0;
                }
            }
        }
    }

    /// <summary>
    /// One pass over the evidence runs of row <paramref name="y"/> (shared by both tests; <paramref name="seen"/> counts
    /// their pixels): a run below a light source is cleared (<see cref="UnderLight"/>, when <paramref name="lightRow"/> is
    /// given); otherwise a run whose local orientation does not point at the vanishing
    /// point is cleared: the structure tensor J = Σ ∇I ∇Iᵀ of the blurred grey image over a window of half size
    /// clamp(d / 2, 2, 6) rows around the row (at most 7 of its rows and 13 of its columns sampled), over the run and two
    /// pixels beyond each end, gives the dominant gradient direction 0.5·atan2(2Jxy, Jxx − Jyy);
    /// the marking runs perpendicular to it. When the coherence (λ1 − λ2) / (λ1 + λ2) is at least
    /// <see cref="GradientOptions.OrientationMinCoherence"/> and the angle to the line through the vanishing point
    /// exceeds <see cref="GradientOptions.OrientationToleranceDeg"/> + <see cref="GradientOptions.OrientationToleranceGrowthDeg"/>
    /// × (distance from the vanishing point / frame height) and the run is turned towards the image vertical, the run
    /// is cleared. Lane markings are straight lines
    /// on the ground, so their images converge on the vanishing point (the tolerance grows with distance for road
    /// curvature and vanishing-point error); specular streaks of lamps on a wet road are image-vertical and fail
    /// away from the vanishing point's column.
    /// </summary>
    /// <returns>The number of evidence pixels cleared.</returns>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private unsafe int ClearRuns(FrameWorkspace workspace, byte* ev, int y, int x0, int x1, int d, int[]? lightRow, out int seen)
    {
        int cleared = 0;
        seen = 0;
        bool orient = gradient.OrientationToleranceDeg < 90;
        int w = workspace.Width, h = workspace.Height, bandTop = workspace.BandTop;
        byte* blurBase = (byte*)workspace.Gradient.Blurred.DataPointer;
        long blurStep = workspace.Gradient.Blurred.Step();
        double vx = workspace.Region.VanishingX, vy = workspace.Region.VanishingY;
        int r = Math.Clamp(d / 2, 2, 6);
        int ya = Math.Max(bandTop + 1, y - r), yb = Math.Min(h - 2, y + r);
        double tolBase = gradient.OrientationToleranceDeg * Math.PI / 180, tolGrowth = gradient.OrientationToleranceGrowthDeg * Math.PI / 180;
        double minCoherence = gradient.OrientationMinCoherence;
        int x = x0;
        while (x <= x1)
        {
            if (ev[x] == 0)
            {
                x++;
                continue;
            }

            int start = x;
            while (x <= x1 && ev[x] != 0)
            {
                x++;
            }

            int end = x - 1, xm = (start + end) / 2;
            seen += end - start + 1;
            if (lightRow is not null && UnderLight(lightRow, y, start, end, d, w))
            {
                for (int k = start; k <= end; k++)
                {
                    ev[k] = 0;
                }

                cleared += end - start + 1;
                continue;
            }

            if (!orient)
            {
                continue;
            }

            // A run can only be cleared when it is turned towards the vertical by more than the tolerance, so its angle
            // to the vanishing-point direction is below twice that direction's angle from the vertical: skip the
            // tensor where even that cannot exceed the tolerance (the result is the same, only cheaper).
            double vpAngle = Math.Atan2(Math.Abs(xm - vx), Math.Max(1e-9, y - vy));
            double tolHere = tolBase + (tolGrowth * Math.Sqrt(((xm - vx) * (xm - vx)) + ((y - vy) * (y - vy))) / h);
            if (2 * vpAngle <= tolHere)
            {
                continue;
            }
            // The window spans the run and both its edges (where the gradients are), sampling at most ~13 columns.
            int xa = Math.Max(1, start - 2), xb = Math.Min(w - 2, end + 2), colStep = Math.Max(1, (xb - xa) / 12), rowStep = Math.Max(1, (yb - ya) / 6);
            // Integer sums (exact, so the same as summing in doubles), converted once.
            long ixx = 0, iyy = 0, ixy = 0;
            for (int yy = ya; yy <= yb; yy += rowStep)
            {
                byte* s = blurBase + ((yy - bandTop) * blurStep);
                byte* up = s - blurStep, down = s + blurStep;
                for (int xx = xa; xx <= xb; xx += colStep)
                {
                    int gx = s[xx + 1] - s[xx - 1], gy = down[xx] - up[xx];
                    ixx += gx * gx;
                    iyy += gy * gy;
                    ixy += gx * gy;
                }
            }

            double jxx = ixx, jyy = iyy, jxy = ixy;

            double trace = jxx + jyy;
            if (trace <= 0)
            {
                continue;
            }

            double diff = Math.Sqrt(((jxx - jyy) * (jxx - jyy)) + (4 * jxy * jxy));
            if (diff / trace < minCoherence)
            {
                continue;
            }

            // Line direction = gradient direction + 90°; compare with the direction to the vanishing point, modulo 180°.
            double line = (0.5 * Math.Atan2(2 * jxy, jxx - jyy)) + (Math.PI / 2);
            double toVp = Math.Atan2(vy - y, vx - xm);
            double delta = Math.Abs(Math.IEEERemainder(line - toVp, Math.PI));
            double dist = Math.Sqrt(((xm - vx) * (xm - vx)) + ((y - vy) * (y - vy))) / h;
            // Only runs turned towards the image vertical are cleared (the reflection signature); runs turned towards
            // the horizontal are ends of worn paint pieces or dashes and are kept.
            double fromVertical = Math.Abs(Math.IEEERemainder(line - (Math.PI / 2), Math.PI));
            double vpFromVertical = Math.Abs(Math.IEEERemainder(toVp - (Math.PI / 2), Math.PI));
            if (fromVertical < vpFromVertical && delta > tolBase + (tolGrowth * dist))
            {
                for (int k = start; k <= end; k++)
                {
                    ev[k] = 0;
                }

                cleared += end - start + 1;
            }
        }

        return cleared;
    }

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
        private void Evidence(int x, bool ridge)
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

    /// <summary>
    /// Contrast-limited adaptive histogram equalisation (Zuiderveld 1994) of the blurred grey band of
    /// <see cref="GradientStage"/>, into the stage's own buffer: each tile's lightness histogram, clipped at
    /// <see cref="ColorOptions.ClaheClipLimit"/> times its mean bin count, is equalised and the mappings of the four
    /// nearest tiles are interpolated bilinearly, which stretches the faint local contrast of paint in a dark scene
    /// without the noise blow-up of plain equalisation. It maps the already blurred band (a smooth, locally monotone
    /// mapping nearly commutes with the blur), so the band is neither copied nor blurred a second time.
    /// </summary>
    private void Equalise(FrameWorkspace workspace)
    {
        int bandHeight = workspace.Height - workspace.BandTop;
        int tilesAcross = color.ClaheTilesAcross;
        int tilesDown = Math.Max(1, (int)Math.Round(tilesAcross * (double)bandHeight / workspace.Width));
        clahe ??= Cv2.CreateCLAHE(color.ClaheClipLimit, new Size(tilesAcross, tilesDown));
        clahe.Apply(workspace.Gradient.Blurred, equalisedBlur);
    }

    /// <inheritdoc />
    public void Dispose()
    {
        clahe?.Dispose();
        equalisedBlur.Dispose();
    }
}
