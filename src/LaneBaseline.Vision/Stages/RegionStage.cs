using LaneBaseline.Core.Options;
using LaneBaseline.Core.Results;
using LaneBaseline.Vision.Pipeline;
using OpenCvSharp;

namespace LaneBaseline.Vision.Stages;

/// <summary>
/// Vanishing point, horizon, region of interest and the bird's-eye homography of the frame.
/// </summary>
/// <remarks>
/// With a camera file the vanishing point is the image of the point at infinity straight ahead on the road and steps
/// (1)–(4) are skipped. Otherwise: (0) voters: segments within <see cref="RegionOptions.VerticalToleranceDeg"/> of the
/// image vertical, and in a dark frame segments whose upper end touches a light source (within
/// <see cref="RegionOptions.LightReachFraction"/> above it: the rims of headlights and the tops of their specular
/// reflections on a wet road, which lie on the vertical through the light, law of reflection), take no part in
/// (1)–(3); a light far above the end, such as a street lamp over a real far dash, does not count; (1) hypotheses:
/// every pair of Hough segments with opposite lean (one left boundary going up-right,
/// one right boundary going up-left) is intersected; an intersection outside the plausible band (horizon within
/// [<see cref="RegionOptions.MinHorizonFraction"/>, <see cref="RegionOptions.MaxHorizonFraction"/>] of the height,
/// column within <see cref="RegionOptions.MaxVanishingOffsetFraction"/> of the width from the centre) is dropped;
/// (2) verification: a hypothesis scores the summed length of segments whose line passes within
/// <see cref="RegionOptions.VanishingToleranceFraction"/> × width of it (hypothesise-and-verify as in RANSAC,
/// enumerating all pairs so the result is deterministic); (3) refinement: weighted least-squares point closest to
/// the inlier lines (weights = length), kept only when inliers lean both ways; (4) on sequences (tracking on) the
/// point is smoothed exponentially with weight <see cref="RegionOptions.Smoothing"/> on the previous one; without
/// evidence the preset point is the last resort; (5) the region is the trapezoid whose sides meet at the vanishing
/// point, from the row <see cref="WarpOptions.FarRowFraction"/> of the way from the horizon to the bottom row, down
/// to the bottom row, <see cref="WarpOptions.BottomSpanFraction"/> × width wide at the bottom and centred on the
/// frame centre; (6) its homography to the bird's-eye rectangle maps lines through the vanishing point (road lines
/// parallel to the vehicle) to vertical columns. Pixel (x, y), origin top-left, y down.
/// With a camera file and a metric view (<see cref="MetricViewOptions"/>), steps (5)–(6) use the camera's
/// plane-induced homography instead (<see cref="Core.Geometry.MetricBirdsEye"/>, built once per stream by
/// <see cref="LanePipeline"/>): the bird's-eye view is a metric top view of the ground, one pixel
/// <see cref="MetricViewOptions.MetresPerPx"/> metres along both axes, and the region is the image of that ground
/// rectangle.
/// <para>References: [1] M. A. Fischler, R. C. Bolles, "Random Sample Consensus", Communications of the ACM
/// 24(6):381–395, 1981, DOI 10.1145/358669.358692. [2] R. Hartley, A. Zisserman, Multiple View Geometry in Computer
/// Vision, 2nd ed., 2004, Sec. 8.6 (vanishing points and lines).</para>
/// </remarks>
public sealed class RegionStage : IFrameStage
{
    private readonly RegionOptions region;
    private readonly WarpOptions warp;
    private readonly bool smooth;
    private readonly (double X, double Y)? fixedPoint;
    private readonly PlaneHomography? metric;
    private HoughSegment[] voters = [];
    private bool[] litColumn = [];
    private int lightLastRow;
    private byte lightLimit = 255;

    /// <summary>Creates the stage.</summary>
    /// <param name="region">Region options.</param>
    /// <param name="warp">Warp options.</param>
    /// <param name="smoothOverSequence">Whether to smooth the vanishing point over a sequence.</param>
    /// <param name="cameraVanishingPoint">The vanishing point from a camera file (image pixels), used instead of estimation.</param>
    /// <param name="metricImageToBirdsEye">The camera's image-to-metric-bird's-eye homography (working pixels), used instead of the trapezoid; null without a camera.</param>
    public RegionStage(RegionOptions region, WarpOptions warp, bool smoothOverSequence, (double X, double Y)? cameraVanishingPoint = null, PlaneHomography? metricImageToBirdsEye = null)
    {
        metric = metricImageToBirdsEye;
        this.region = region;
        this.warp = warp;
        smooth = smoothOverSequence;
        fixedPoint = cameraVanishingPoint;
    }

    /// <inheritdoc />
    public string Name => "region";

    /// <inheritdoc />
    public void Process(FrameWorkspace workspace)
    {
        ArgumentNullException.ThrowIfNull(workspace);
        if (fixedPoint is (double cxFixed, double cyFixed))
        {
            workspace.Region.VanishingX = cxFixed;
            workspace.Region.VanishingY = cyFixed;
            workspace.Region.VanishingSource = VanishingSource.Camera;
            SetGeometry(workspace, cxFixed, cyFixed);
            return;
        }

        int w = workspace.Width, h = workspace.Height;
        double vx = region.DefaultVanishingXFraction * w;
        double vy = region.DefaultHorizonFraction * h;
        VanishingSource source = VanishingSource.Preset;
        if (region.EstimateVanishingPoint && TryEstimate(workspace, out double ex, out double ey))
        {
            vx = ex;
            vy = ey;
            source = VanishingSource.Estimated;
        }

        if (smooth && workspace.Region.HasPreviousVanishing)
        {
            double a = region.Smoothing;
            if (source == VanishingSource.Estimated)
            {
                vx = (a * workspace.Region.VanishingX) + ((1 - a) * vx);
                vy = (a * workspace.Region.VanishingY) + ((1 - a) * vy);
                source = VanishingSource.Smoothed;
            }
            else
            {
                vx = workspace.Region.VanishingX;
                vy = workspace.Region.VanishingY;
                source = workspace.Region.VanishingSource;
            }
        }

        workspace.Region.VanishingX = vx;
        workspace.Region.VanishingY = vy;
        workspace.Region.VanishingSource = source;
        workspace.Region.HasPreviousVanishing = source != VanishingSource.Preset || workspace.Region.HasPreviousVanishing;
        SetGeometry(workspace, vx, vy);
    }

    private void SetGeometry(FrameWorkspace ws, double vx, double vy)
    {
        if (metric is PlaneHomography camera)
        {
            SetMetricGeometry(ws, camera);
            return;
        }

        int w = ws.Width, h = ws.Height;
        double yb = h - 1;
        double yt = vy + (warp.FarRowFraction * (yb - vy));
        double half = warp.BottomSpanFraction * w / 2;
        double cx = (w - 1) / 2.0;
        double t = (yt - vy) / (yb - vy);
        double xlb = cx - half, xrb = cx + half;
        double xlt = vx + ((xlb - vx) * t), xrt = vx + ((xrb - vx) * t);
        double[] q = ws.Region.Trapezoid;
        q[0] = xlt; q[1] = yt; q[2] = xrt; q[3] = yt; q[4] = xrb; q[5] = yb; q[6] = xlb; q[7] = yb;
        double bw = ws.Warp.BirdsEyeWidth - 1, bh = ws.Warp.BirdsEyeHeight - 1;
        Span<double> dst = [0, 0, bw, 0, bw, bh, 0, bh];
        if (!PlaneHomography.TryFromPoints(q, dst, out PlaneHomography hm))
        {
            throw new InvalidOperationException("degenerate region trapezoid");
        }

        ws.Region.RoiTop = yt;
        SetHomography(ws, hm);
    }

    // The region is the image of the metric view's ground rectangle: its corners mapped back through the inverse.
    private static void SetMetricGeometry(FrameWorkspace ws, PlaneHomography hm)
    {
        PlaneHomography inv = hm.Inverse();
        double bw = ws.Warp.BirdsEyeWidth - 1, bh = ws.Warp.BirdsEyeHeight - 1;
        ReadOnlySpan<double> corners = [0, 0, bw, 0, bw, bh, 0, bh];
        double[] q = ws.Region.Trapezoid;
        for (int k = 0; k < 4; k++)
        {
            if (!inv.TryMap(corners[2 * k], corners[(2 * k) + 1], out q[2 * k], out q[(2 * k) + 1]))
            {
                throw new InvalidOperationException("degenerate metric bird's-eye view");
            }
        }

        ws.Region.RoiTop = Math.Min(q[1], q[3]);
        SetHomography(ws, hm);
    }

    private static void SetHomography(FrameWorkspace ws, PlaneHomography hm)
    {
        ws.Region.ImageToBirdsEye = hm;
        ws.Region.BirdsEyeToImage = hm.Inverse();
        var m = ws.Region.HomographyMat;
        m.Set(0, 0, hm.M00); m.Set(0, 1, hm.M01); m.Set(0, 2, hm.M02);
        m.Set(1, 0, hm.M10); m.Set(1, 1, hm.M11); m.Set(1, 2, hm.M12);
        m.Set(2, 0, hm.M20); m.Set(2, 1, hm.M21); m.Set(2, 2, hm.M22);
    }

    private bool TryEstimate(FrameWorkspace ws, out double bestX, out double bestY)
    {
        int n = SelectVoters(ws);
        HoughSegment[] s = voters;
        int w = ws.Width, h = ws.Height;
        double tol = region.VanishingToleranceFraction * w;
        double minY = region.MinHorizonFraction * h, maxY = region.MaxHorizonFraction * h;
        double maxOff = region.MaxVanishingOffsetFraction * w, cx = (w - 1) / 2.0;
        double bestScore = 0;
        bestX = bestY = 0;
        for (int i = 0; i < n; i++)
        {
            double li = Lean(s[i]);
            for (int j = i + 1; j < n; j++)
            {
                if (li * Lean(s[j]) >= 0)
                {
                    continue;
                }

                if (!Intersect(s[i], s[j], out double px, out double py) || py < minY || py > maxY || Math.Abs(px - cx) > maxOff)
                {
                    continue;
                }

                double score = 0;
                for (int k = 0; k < n; k++)
                {
                    if (Distance(s[k], px, py) <= tol)
                    {
                        score += s[k].Length;
                    }
                }

                if (score > bestScore)
                {
                    bestScore = score;
                    bestX = px;
                    bestY = py;
                }
            }
        }

        if (bestScore <= 0)
        {
            return false;
        }

        // Weighted least squares: minimise sum of w_k (n_k . p - c_k)^2 over inlier lines (unit normals n_k).
        double a11 = 0, a12 = 0, a22 = 0, b1 = 0, b2 = 0;
        bool left = false, right = false;
        for (int k = 0; k < n; k++)
        {
            HoughSegment g = s[k];
            if (Distance(g, bestX, bestY) > tol)
            {
                continue;
            }

            double dx = g.X2 - g.X1, dy = g.Y2 - g.Y1, len = g.Length;
            double nx = -dy / len, ny = dx / len, c = (nx * g.X1) + (ny * g.Y1), wt = len;
            a11 += wt * nx * nx; a12 += wt * nx * ny; a22 += wt * ny * ny; b1 += wt * nx * c; b2 += wt * ny * c;
            if (Lean(g) < 0)
            {
                left = true;
            }
            else
            {
                right = true;
            }
        }

        double det = (a11 * a22) - (a12 * a12);
        if (!left || !right || Math.Abs(det) < 1e-9)
        {
            return false;
        }

        double rx = ((b1 * a22) - (a12 * b2)) / det, ry = ((a11 * b2) - (a12 * b1)) / det;
        if (ry >= minY && ry <= maxY && Math.Abs(rx - cx) <= maxOff)
        {
            bestX = rx;
            bestY = ry;
        }

        return true;
    }

    /// <summary>
    /// Copies the frame's Hough segments that may vote for the vanishing point into <see cref="voters"/> (in their
    /// order) and returns their count. Dropped: (a) segments within <see cref="RegionOptions.VerticalToleranceDeg"/> of
    /// the image vertical; (b) in a dark frame, segments whose upper end touches a light source: a pixel of grey level
    /// at least <see cref="RegionOptions.LightSourceLightness"/>, no lower than
    /// <see cref="RegionOptions.MaxHorizonFraction"/> × height, in a column within m of the end's column and a row
    /// from r above the end to m below it (m = half the vanishing tolerance, r =
    /// <see cref="RegionOptions.LightReachFraction"/> × width). Such segments are the rims of headlights near the
    /// horizon and the tapering tops of their streaks on a wet road (a flat wet road mirrors a light onto the vertical
    /// through it, law of reflection, camera without roll), which would otherwise vote for a point above the streak. A
    /// light far above the end (a street lamp over a real far dash) does not count.
    /// </summary>
    internal int SelectVoters(FrameWorkspace ws)
    {
        int n = ws.Hough.SegmentCount;
        HoughSegment[] s = ws.Hough.Segments;
        if (voters.Length < s.Length)
        {
            voters = new HoughSegment[s.Length];
        }

        double maxLean = Math.Tan(region.VerticalToleranceDeg * Math.PI / 180);
        bool lights = region.LightSourceLightness < 255 && n > 0 && FindLights(ws);
        int margin = Math.Max(1, (int)(region.VanishingToleranceFraction * ws.Width / 2));
        int reach = (int)Math.Round(region.LightReachFraction * ws.Width);
        int m = 0;
        for (int i = 0; i < n; i++)
        {
            HoughSegment g = s[i];
            if (Math.Abs(g.X2 - g.X1) < maxLean * Math.Abs(g.Y2 - g.Y1))
            {
                continue;
            }

            if (lights)
            {
                (double xt, double yt) = g.Y1 <= g.Y2 ? (g.X1, g.Y1) : (g.X2, g.Y2);
                int x = (int)Math.Round(xt), y = (int)Math.Round(yt);
                if (TouchesLight(ws, x - margin, x + margin, y - reach, y + margin))
                {
                    continue;
                }
            }

            voters[m++] = g;
        }

        return m;
    }

    /// <summary>
    /// Whether the frame is dark (median grey of the bottom quarter of the centre half below
    /// <see cref="RegionOptions.DarkRoadLightness"/>) and holds small lights: pixels of grey level at least
    /// <see cref="RegionOptions.LightSourceLightness"/> above <see cref="RegionOptions.MaxHorizonFraction"/> × height
    /// in at least one column but no more than a quarter of them (more: the sky itself is bright and the test is not
    /// applied). Sets <see cref="lightLimit"/> and <see cref="lightLastRow"/> for <see cref="TouchesLight"/>.
    /// </summary>
    /// <returns>Whether the light-source test applies to this frame.</returns>
    private unsafe bool FindLights(FrameWorkspace ws)
    {
        int w = ws.Width, h = ws.Height;
        Mat band = ws.Gradient.Blurred;
        int bandTop = ws.BandTop;
        int y0 = Math.Max(bandTop, h - (h / 4)), x0 = w / 4, x1 = w - (w / 4);
        Span<int> hist = stackalloc int[256];
        hist.Clear();
        int count = 0;
        byte* bandBase = (byte*)band.DataPointer;
        long bandStep = band.Step();
        for (int y = y0; y < h; y += 4)
        {
            byte* row = bandBase + ((y - bandTop) * bandStep);
            for (int x = x0; x < x1; x += 4)
            {
                hist[row[x]]++;
                count++;
            }
        }

        int median = 0, acc = hist[0];
        while (median < 255 && acc * 2 < count)
        {
            acc += hist[++median];
        }

        if (count == 0 || median >= region.DarkRoadLightness)
        {
            return false;
        }

        if (litColumn.Length != w)
        {
            litColumn = new bool[w];
        }

        Array.Fill(litColumn, false);
        lightLastRow = Math.Min(h - 1, (int)(region.MaxHorizonFraction * h));
        lightLimit = (byte)Math.Clamp(Math.Ceiling(region.LightSourceLightness), 0, 255);
        Mat gray = ws.Gradient.Gray;
        byte* grayBase = (byte*)gray.DataPointer;
        long grayStep = gray.Step();
        int lit = 0;
        for (int y = 0; y <= lightLastRow; y++)
        {
            ReadOnlySpan<byte> row = new(grayBase + (y * grayStep), w);
            if (row.IndexOfAnyInRange(lightLimit, (byte)255) < 0)
            {
                continue;
            }

            for (int x = 0; x < w; x++)
            {
                if (row[x] >= lightLimit && !litColumn[x])
                {
                    litColumn[x] = true;
                    lit++;
                }
            }
        }

        return lit > 0 && lit * 4 <= w;
    }

    /// <summary>Whether the grey frame holds a light-source pixel in columns [x0, x1] and rows [y0, y1] (clipped to the
    /// frame and to the rows searched for lights).</summary>
    private unsafe bool TouchesLight(FrameWorkspace ws, int x0, int x1, int y0, int y1)
    {
        x0 = Math.Max(0, x0);
        x1 = Math.Min(ws.Width - 1, x1);
        y0 = Math.Max(0, y0);
        y1 = Math.Min(lightLastRow, y1);
        if (x1 < x0)
        {
            return false;
        }

        Mat gray = ws.Gradient.Gray;
        byte* grayBase = (byte*)gray.DataPointer;
        long grayStep = gray.Step();
        for (int y = y0; y <= y1; y++)
        {
            ReadOnlySpan<byte> row = new(grayBase + (y * grayStep) + x0, x1 - x0 + 1);
            if (row.IndexOfAnyInRange(lightLimit, (byte)255) >= 0)
            {
                return true;
            }
        }

        return false;
    }

    /// <summary>dx/dy sign: negative for a left boundary (x grows as y shrinks), positive for a right one.</summary>
    private static double Lean(HoughSegment g)
    {
        double dy = g.Y2 - g.Y1;
        return dy == 0 ? 0 : (g.X2 - g.X1) / dy;
    }

    private static bool Intersect(HoughSegment a, HoughSegment b, out double x, out double y)
    {
        double d1x = a.X2 - a.X1, d1y = a.Y2 - a.Y1, d2x = b.X2 - b.X1, d2y = b.Y2 - b.Y1;
        double den = (d1x * d2y) - (d1y * d2x);
        if (Math.Abs(den) < 1e-9)
        {
            x = y = 0;
            return false;
        }

        double t = (((b.X1 - a.X1) * d2y) - ((b.Y1 - a.Y1) * d2x)) / den;
        x = a.X1 + (t * d1x);
        y = a.Y1 + (t * d1y);
        return true;
    }

    private static double Distance(HoughSegment g, double x, double y)
    {
        double dx = g.X2 - g.X1, dy = g.Y2 - g.Y1;
        return Math.Abs((dy * (x - g.X1)) - (dx * (y - g.Y1))) / g.Length;
    }

    /// <inheritdoc />
    public void Dispose()
    {
    }
}
