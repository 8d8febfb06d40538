using LaneBaseline.Core.Options;
using LaneBaseline.Core.Random;
using LaneBaseline.Core.Results;
using LaneBaseline.Vision.Pipeline;

namespace LaneBaseline.Vision.Stages;

/// <summary>
/// Finds up to four lane boundaries in the bird's-eye evidence: histogram and Hough seeds, sliding windows,
/// a RANSAC-verified weighted quadratic fit, a confidence per lane, slots by lane-width consistency, and
/// polylines sampled back into the image.
/// </summary>
/// <remarks>
/// Steps (bird's-eye pixels, x right, y down; bottom row = the frame's bottom row):
/// (1) column histogram of the bottom <see cref="SearchOptions.HistogramRowsFraction"/> of the rows, peaks at least
/// <see cref="SearchOptions.MinSeparationPx"/> apart with mass ≥ <see cref="SearchOptions.MinPeakMass"/>; Hough
/// segments that map to near-vertical bird's-eye lines add seeds where the histogram has none;
/// (2) <see cref="SearchOptions.WindowCount"/> windows of ±<see cref="SearchOptions.WindowHalfWidthPx"/> from the
/// bottom up, each re-centred on its evidence centroid when it holds ≥ <see cref="SearchOptions.MinWindowMass"/>, and
/// otherwise moved along the trend of the previous centroids (dashed lines, curves);
/// (3) hypothesise-and-verify (RANSAC) over the window centroids: every line through two and every quadratic
/// through three centroids (a fixed-seed sample when there are many) is scored by the evidence mass of the
/// centroids within <see cref="FitOptions.InlierTolerancePx"/>; the best consensus set is refitted by weighted least
/// squares (weights = window mass) as x = A·y² + B·y + C, or a line when |A| exceeds <see cref="FitOptions.MaxCurvature"/>;
/// (4) confidence = min(1, inlier mass / <see cref="ConfidenceOptions.FullSupportMass"/>) ·
/// min(1, coverage / <see cref="ConfidenceOptions.FullCoverage"/>) · exp(−rms / <see cref="ConfidenceOptions.ResidualScalePx"/>);
/// (5) duplicates (mean separation below half <see cref="SearchOptions.MinSeparationPx"/>) keep the higher score;
/// (6) slots: the nearest boundary left and right of the vehicle centre are −1 and +1 when their spacing is a
/// plausible lane width; the next boundaries out are −2 and +2 (then −3 and +3 when search.maxLanes allows) when
/// their spacing matches the ego lane within
/// <see cref="SearchOptions.WidthTolerance"/>; every pair must also stay parallel (spacing at the far end of their
/// common support within the same tolerance of the spacing at the bottom); (7) each lane is sampled every <see cref="FitOptions.PointSpacingPx"/>
/// image rows from the bottom row up to its farthest supported window (or the far edge of the warped area, see
/// <see cref="FitOptions.ExtendToFarEdge"/>) and mapped back with the inverse homography; points outside the frame are
/// dropped (the longest run inside is kept); (8) the far end is continued along its image tangent towards the horizon
/// over <see cref="FitOptions.HorizonExtensionFraction"/> of the remaining rows.
/// <para>References: [1] M. A. Fischler, R. C. Bolles, "Random Sample Consensus: A Paradigm for Model Fitting with
/// Applications to Image Analysis and Automated Cartography", Communications of the ACM 24(6):381–395, 1981,
/// DOI 10.1145/358669.358692. [2] J. Matas, C. Galambos, J. Kittler, CVIU 78(1):119–137, 2000 (Hough seeds).</para>
/// </remarks>
public sealed class SlidingWindowFitStage : IFrameStage
{
    private const int MaxHypotheses = 400;
    private readonly SearchOptions search;
    private readonly FitOptions fit;
    private readonly ConfidenceOptions confidence;
    private readonly int[] order = new int[FrameWorkspace.MaxCandidates];
    private readonly int[] accepted = new int[FrameWorkspace.MaxCandidates];

    /// <summary>Creates the stage.</summary>
    public SlidingWindowFitStage(SearchOptions search, FitOptions fit, ConfidenceOptions confidence)
    {
        this.search = search;
        this.fit = fit;
        this.confidence = confidence;
    }

    /// <inheritdoc />
    public string Name => "search";

    /// <inheritdoc />
    public void Process(FrameWorkspace workspace)
    {
        ArgumentNullException.ThrowIfNull(workspace);
        FindSeeds(workspace);
        AddSeeds(workspace, workspace.PriorSeedX, workspace.PriorSeedCount);
        AddHoughSeeds(workspace);
        int n = workspace.CandidateCount;
        for (int i = 0; i < n; i++)
        {
            Slide(workspace, i);
            FitCandidate(workspace, i);
        }

        AssignSlots(workspace);
    }

    private unsafe void FindSeeds(FrameWorkspace ws)
    {
        int bw = ws.BirdsEyeWidth, bh = ws.BirdsEyeHeight;
        double[] col = ws.ColumnMass;
        double[] sm = ws.Smoothed;
        Array.Clear(col);
        byte* b = (byte*)ws.BirdsEye.DataPointer;
        long step = ws.BirdsEye.Step();
        int r0 = bh - (int)Math.Round(search.HistogramRowsFraction * bh);
        for (int y = Math.Max(0, r0); y < bh; y++)
        {
            byte* row = b + (y * step);
            for (int x = 0; x < bw; x++)
            {
                col[x] += row[x];
            }
        }

        const int half = 3;
        for (int x = 0; x < bw; x++)
        {
            double s = 0;
            for (int k = Math.Max(0, x - half); k <= Math.Min(bw - 1, x + half); k++)
            {
                s += col[k];
            }

            sm[x] = s / 255.0;
        }

        int hw = search.WindowHalfWidthPx, sep = search.MinSeparationPx;
        int count = 0;
        while (count < FrameWorkspace.MaxCandidates)
        {
            int best = -1;
            double bestV = 0;
            for (int x = 0; x < bw; x++)
            {
                if (sm[x] > bestV)
                {
                    bestV = sm[x];
                    best = x;
                }
            }

            if (best < 0)
            {
                break;
            }

            double mass = 0;
            for (int x = Math.Max(0, best - hw); x <= Math.Min(bw - 1, best + hw); x++)
            {
                mass += col[x] / 255.0;
            }

            if (mass < search.MinPeakMass)
            {
                break;
            }

            ws.CandidateX[count] = best;
            ws.CandidateMass[count] = mass;
            count++;
            for (int x = Math.Max(0, best - sep); x <= Math.Min(bw - 1, best + sep); x++)
            {
                sm[x] = -1;
            }
        }

        ws.CandidateCount = count;
    }

    /// <summary>Adds seeds predicted by the tracker (search around the previous fits) where no seed is near.</summary>
    private void AddSeeds(FrameWorkspace ws, double[] seeds, int count)
    {
        for (int i = 0; i < count && ws.CandidateCount < FrameWorkspace.MaxCandidates; i++)
        {
            double xb = seeds[i];
            bool near = false;
            for (int c = 0; c < ws.CandidateCount; c++)
            {
                near |= Math.Abs(ws.CandidateX[c] - xb) < search.MinSeparationPx / 2.0;
            }

            if (!near && xb >= 0 && xb < ws.BirdsEyeWidth)
            {
                ws.CandidateX[ws.CandidateCount] = xb;
                ws.CandidateMass[ws.CandidateCount] = 0;
                ws.CandidateCount++;
            }
        }
    }

    private void AddHoughSeeds(FrameWorkspace ws)
    {
        int bw = ws.BirdsEyeWidth, bh = ws.BirdsEyeHeight;
        PlaneHomography hm = ws.ImageToBirdsEye;
        for (int i = 0; i < ws.SegmentCount && ws.CandidateCount < FrameWorkspace.MaxCandidates; i++)
        {
            HoughSegment s = ws.Segments[i];
            if (s.Y1 < ws.RoiTop || s.Y2 < ws.RoiTop
                || !hm.TryMap(s.X1, s.Y1, out double u1, out double v1) || !hm.TryMap(s.X2, s.Y2, out double u2, out double v2)
                || Math.Abs(v2 - v1) < 1)
            {
                continue;
            }

            double slope = (u2 - u1) / (v2 - v1);
            if (Math.Abs(slope) > 0.3)
            {
                continue;
            }

            double xb = u1 + (slope * (bh - 1 - v1));
            if (xb < 0 || xb >= bw)
            {
                continue;
            }

            bool near = false;
            for (int c = 0; c < ws.CandidateCount; c++)
            {
                if (Math.Abs(ws.CandidateX[c] - xb) < search.MinSeparationPx)
                {
                    near = true;
                    break;
                }
            }

            if (!near)
            {
                ws.CandidateX[ws.CandidateCount] = xb;
                ws.CandidateMass[ws.CandidateCount] = 0;
                ws.CandidateCount++;
            }
        }
    }

    private unsafe void Slide(FrameWorkspace ws, int candidate)
    {
        int bw = ws.BirdsEyeWidth, bh = ws.BirdsEyeHeight;
        int n = Math.Min(search.WindowCount, FrameWorkspace.MaxWindows);
        int hw = search.WindowHalfWidthPx;
        double wh = (double)bh / n;
        byte* b = (byte*)ws.BirdsEye.DataPointer;
        long step = ws.BirdsEye.Step();
        SearchWindow[] windows = ws.CandidateWindows[candidate];
        double cx = ws.CandidateX[candidate];
        double trend = 0;
        double lastX = double.NaN;
        int lastK = -1;
        for (int k = 0; k < n; k++)
        {
            int bottom = (int)Math.Round(bh - (k * wh));
            int top = (int)Math.Round(bh - ((k + 1) * wh));
            int x0 = Math.Max(0, (int)Math.Round(cx) - hw), x1 = Math.Min(bw - 1, (int)Math.Round(cx) + hw);
            double m = 0, sx = 0, sy = 0;
            for (int y = Math.Max(0, top); y < bottom; y++)
            {
                byte* row = b + (y * step);
                for (int x = x0; x <= x1; x++)
                {
                    int v = row[x];
                    if (v != 0)
                    {
                        m += v;
                        sx += v * x;
                        sy += v * y;
                    }
                }
            }

            double mass = m / 255.0;
            if (mass >= search.MinWindowMass && x1 >= x0)
            {
                double xc = sx / m, yc = sy / m;
                windows[k] = new SearchWindow(xc, yc, mass, x0, top, x1, bottom, false);
                if (lastK >= 0)
                {
                    double t = (xc - lastX) / (k - lastK);
                    trend = double.IsNaN(trend) ? t : (0.5 * trend) + (0.5 * t);
                }

                lastX = xc;
                lastK = k;
                cx = xc + trend;
            }
            else
            {
                windows[k] = new SearchWindow(cx, (top + bottom) / 2.0, 0, x0, top, x1, bottom, false);
                cx += trend;
            }

            if (cx < -hw || cx > bw + hw)
            {
                for (int j = k + 1; j < n; j++)
                {
                    windows[j] = default;
                }

                break;
            }
        }

        ws.WindowCount = n;
    }

    private void FitCandidate(FrameWorkspace ws, int candidate)
    {
        SearchWindow[] windows = ws.CandidateWindows[candidate];
        int n = ws.WindowCount;
        double[] xs = ws.FitX, ys = ws.FitY, wts = ws.FitW;
        bool[] use = ws.FitUse, best = ws.FitBest;
        int m = 0;
        for (int k = 0; k < n; k++)
        {
            if (windows[k].Mass >= search.MinWindowMass)
            {
                xs[m] = windows[k].X;
                ys[m] = windows[k].Y;
                wts[m] = windows[k].Mass;
                m++;
            }
        }

        ws.CandidateFits[candidate] = default;
        if (m < fit.MinInlierWindows)
        {
            return;
        }

        double scale = ws.BirdsEyeHeight;
        double tol = fit.InlierTolerancePx;
        double bestMass = -1;
        Quadratic bestFit = default;
        var rng = new SplitMix64(0x5EED_0001UL + (ulong)candidate);
        long triples = (long)m * (m - 1) * (m - 2) / 6;
        bool enumerate = triples <= MaxHypotheses;
        int hypotheses = enumerate ? (int)triples : MaxHypotheses;
        int a = 0, bIdx = 1, c = 2;
        for (int h = 0; h < hypotheses; h++)
        {
            int i, j, k;
            if (enumerate)
            {
                (i, j, k) = (a, bIdx, c);
                c++;
                if (c >= m)
                {
                    bIdx++;
                    if (bIdx >= m - 1)
                    {
                        a++;
                        bIdx = a + 1;
                    }

                    c = bIdx + 1;
                }
            }
            else
            {
                i = rng.NextInt(m);
                j = rng.NextInt(m);
                k = rng.NextInt(m);
                if (i == j || j == k || i == k)
                {
                    continue;
                }
            }

            // A line through the outer two and a quadratic through all three.
            for (int model = 0; model < 2; model++)
            {
                if (!TryThroughPoints(xs, ys, i, j, k, model == 0, scale, out Quadratic q) || Math.Abs(q.A) > fit.MaxCurvature)
                {
                    continue;
                }

                double mass = 0;
                for (int p = 0; p < m; p++)
                {
                    if (Math.Abs(q.At(ys[p]) - xs[p]) <= tol)
                    {
                        mass += wts[p];
                    }
                }

                // Prefer the simpler line model unless the quadratic gains evidence (strictly more).
                if (mass > bestMass)
                {
                    bestMass = mass;
                    bestFit = q;
                }
            }
        }

        if (bestMass <= 0)
        {
            return;
        }

        Quadratic current = bestFit;
        for (int iteration = 0; iteration < 2; iteration++)
        {
            int inliers = MarkInliers(xs, ys, current, m, tol, best);
            if (inliers < fit.MinInlierWindows)
            {
                break;
            }

            Array.Copy(best, use, m);
            if (QuadraticFit.TryFit(xs.AsSpan(0, m), ys.AsSpan(0, m), wts.AsSpan(0, m), use.AsSpan(0, m), scale, out Quadratic q) && Math.Abs(q.A) <= fit.MaxCurvature)
            {
                current = q;
            }
            else if (QuadraticFit.TryFitLine(xs.AsSpan(0, m), ys.AsSpan(0, m), wts.AsSpan(0, m), use.AsSpan(0, m), scale, out Quadratic line))
            {
                current = line;
            }
        }

        int count = MarkInliers(xs, ys, current, m, tol, best);
        if (count < fit.MinInlierWindows)
        {
            return;
        }

        double inlierMass = 0, sq = 0, topY = double.MaxValue;
        int p2 = 0;
        for (int k = 0; k < n; k++)
        {
            if (windows[k].Mass < search.MinWindowMass)
            {
                continue;
            }

            if (best[p2])
            {
                windows[k].Inlier = true;
                double r = current.At(ys[p2]) - xs[p2];
                inlierMass += wts[p2];
                sq += wts[p2] * r * r;
                topY = Math.Min(topY, windows[k].Top);
            }

            p2++;
        }

        double rms = Math.Sqrt(sq / inlierMass);
        double coverage = (double)count / n;
        double score = Math.Min(1, inlierMass / confidence.FullSupportMass)
            * Math.Min(1, coverage / confidence.FullCoverage)
            * Math.Exp(-rms / confidence.ResidualScalePx);
        ws.CandidateFits[candidate] = new LaneEstimate(0, score, current, inlierMass, coverage, rms, 0);
        ws.CandidateTopY[candidate] = Math.Max(0, topY);
    }

    private static int MarkInliers(double[] xs, double[] ys, Quadratic q, int m, double tol, bool[] mark)
    {
        int count = 0;
        for (int p = 0; p < m; p++)
        {
            mark[p] = Math.Abs(q.At(ys[p]) - xs[p]) <= tol;
            if (mark[p])
            {
                count++;
            }
        }

        return count;
    }

    private static bool TryThroughPoints(double[] xs, double[] ys, int i, int j, int k, bool line, double scale, out Quadratic q)
    {
        q = default;
        if (line)
        {
            // Line through the two points farthest apart in y among the three.
            int lo = i, hi = i;
            if (ys[j] < ys[lo]) { lo = j; }
            if (ys[k] < ys[lo]) { lo = k; }
            if (ys[j] > ys[hi]) { hi = j; }
            if (ys[k] > ys[hi]) { hi = k; }
            double dy = ys[hi] - ys[lo];
            if (dy < 1)
            {
                return false;
            }

            double b = (xs[hi] - xs[lo]) / dy;
            q = new Quadratic(0, b, xs[lo] - (b * ys[lo]));
            return true;
        }

        Span<double> w = [1, 1, 1];
        Span<double> x3 = [xs[i], xs[j], xs[k]];
        Span<double> y3 = [ys[i], ys[j], ys[k]];
        return QuadraticFit.TryFit(x3, y3, w, default, scale, out q);
    }

    private void AssignSlots(FrameWorkspace ws)
    {
        int n = ws.CandidateCount, bw = ws.BirdsEyeWidth, bh = ws.BirdsEyeHeight;
        double yb = bh - 1;

        // Candidates by score (descending; index breaks ties so the order is deterministic).
        int count = 0;
        for (int i = 0; i < n; i++)
        {
            if (ws.CandidateFits[i].Score >= confidence.MinScore)
            {
                int pos = count++;
                while (pos > 0 && ws.CandidateFits[order[pos - 1]].Score < ws.CandidateFits[i].Score)
                {
                    order[pos] = order[pos - 1];
                    pos--;
                }

                order[pos] = i;
            }
        }

        // Drop duplicates: mean separation over the shared rows below half the minimum separation.
        int kept = 0;
        for (int o = 0; o < count; o++)
        {
            int i = order[o];
            bool duplicate = false;
            for (int a = 0; a < kept && !duplicate; a++)
            {
                int j = accepted[a];
                double top = Math.Max(ws.CandidateTopY[i], ws.CandidateTopY[j]);
                double sum = 0;
                for (int s = 0; s <= 4; s++)
                {
                    double y = yb - ((yb - top) * s / 4);
                    sum += Math.Abs(ws.CandidateFits[i].Fit.At(y) - ws.CandidateFits[j].Fit.At(y));
                }

                duplicate = sum / 5 < search.MinSeparationPx / 2.0 || Crosses(ws, i, j);
            }

            if (!duplicate)
            {
                accepted[kept++] = i;
            }
        }

        // Nearest left and right of the vehicle centre (bird's-eye centre column).
        double centre = (bw - 1) / 2.0;
        int l1 = Nearest(ws, kept, centre, -1, double.NegativeInfinity);
        int r1 = Nearest(ws, kept, centre, +1, double.PositiveInfinity);
        double minW = search.MinLaneWidthFraction * bw, maxW = search.MaxLaneWidthFraction * bw;
        if (l1 >= 0 && r1 >= 0)
        {
            double width = Xb(ws, r1) - Xb(ws, l1);
            if (width < minW || width > maxW || !Parallel(ws, l1, r1))
            {
                // Implausible ego lane (width, or boundaries not parallel on the ground): keep the stronger boundary only.
                if (ws.CandidateFits[l1].Score >= ws.CandidateFits[r1].Score)
                {
                    r1 = -1;
                }
                else
                {
                    l1 = -1;
                }
            }
        }

        double egoWidth = l1 >= 0 && r1 >= 0 ? Xb(ws, r1) - Xb(ws, l1) : double.NaN;
        int l2 = l1 >= 0 ? Neighbour(ws, kept, l1, -1, egoWidth, minW, maxW) : -1;
        int r2 = r1 >= 0 ? Neighbour(ws, kept, r1, +1, egoWidth, minW, maxW) : -1;
        int l3 = l2 >= 0 && search.MaxLanes >= 5 ? Neighbour(ws, kept, l2, -1, egoWidth, minW, maxW) : -1;
        int r3 = r2 >= 0 && search.MaxLanes >= 6 ? Neighbour(ws, kept, r2, +1, egoWidth, minW, maxW) : -1;

        ws.LaneCount = 0;
        int max = search.MaxLanes;
        Emit(ws, l3, -3, max >= 5);
        Emit(ws, l2, -2, max >= 3);
        Emit(ws, l1, -1, true);
        Emit(ws, r1, +1, max >= 2);
        Emit(ws, r2, +2, max >= 4);
        Emit(ws, r3, +3, max >= 6);
        AddAgreementFeatures(ws);
    }

    /// <summary>
    /// Evidence features of the reported lanes that see the conditions (see <see cref="LaneEstimate"/>): the frame's
    /// share of evidence kept by reflection suppression, the heading at the bottom row against the bird's-eye vertical
    /// (agreement with the vanishing point), and the smallest spacing change against another reported lane
    /// (agreement with the other boundaries).
    /// </summary>
    private static void AddAgreementFeatures(FrameWorkspace ws)
    {
        double yb = ws.BirdsEyeHeight - 1;
        for (int i = 0; i < ws.LaneCount; i++)
        {
            LaneEstimate e = ws.Lanes[i];
            double slope = (2 * e.Fit.A * yb) + e.Fit.B;
            double parallel = double.NaN;
            for (int j = 0; j < ws.LaneCount; j++)
            {
                if (j == i)
                {
                    continue;
                }

                Quadratic o = ws.Lanes[j].Fit;
                double w0 = e.Fit.At(yb) - o.At(yb), sum = 0;
                const int Samples = 8;
                for (int k = 1; k <= Samples; k++)
                {
                    double y = yb * (1 - (k / (Samples * 1.5)));
                    sum += Math.Abs(e.Fit.At(y) - o.At(y) - w0);
                }

                double mean = sum / Samples;
                parallel = double.IsNaN(parallel) ? mean : Math.Min(parallel, mean);
            }

            ws.Lanes[i] = e with
            {
                EvidenceKeptShare = ws.EvidenceKeptShare,
                HeadingDeviationDeg = Math.Atan(Math.Abs(slope)) * 180 / Math.PI,
                ParallelDeviationPx = parallel,
            };
        }
    }

    private static bool Crosses(FrameWorkspace ws, int i, int j)
    {
        double top = Math.Max(ws.CandidateTopY[i], ws.CandidateTopY[j]);
        double yb = ws.BirdsEyeHeight - 1;
        double d0 = ws.CandidateFits[i].Fit.At(yb) - ws.CandidateFits[j].Fit.At(yb);
        double d1 = ws.CandidateFits[i].Fit.At(top) - ws.CandidateFits[j].Fit.At(top);
        return d0 * d1 < 0;
    }

    private static double Xb(FrameWorkspace ws, int i) => ws.CandidateFits[i].Fit.At(ws.BirdsEyeHeight - 1);

    private int Nearest(FrameWorkspace ws, int kept, double from, int side, double limit)
    {
        int best = -1;
        double bestD = double.MaxValue;
        for (int a = 0; a < kept; a++)
        {
            int i = accepted[a];
            double d = (Xb(ws, i) - from) * side;
            if (d > 0 && d < bestD && (side < 0 ? Xb(ws, i) > limit : Xb(ws, i) < limit))
            {
                bestD = d;
                best = i;
            }
        }

        return best;
    }

    private int Neighbour(FrameWorkspace ws, int kept, int from, int side, double egoWidth, double minW, double maxW)
    {
        int next = Nearest(ws, kept, Xb(ws, from), side, side < 0 ? double.NegativeInfinity : double.PositiveInfinity);
        if (next < 0)
        {
            return -1;
        }

        double width = Math.Abs(Xb(ws, next) - Xb(ws, from));
        bool plausible = double.IsNaN(egoWidth)
            ? width >= minW && width <= maxW
            : Math.Abs(width - egoWidth) <= search.WidthTolerance * egoWidth;
        return plausible && Parallel(ws, from, next) ? next : -1;
    }

    /// <summary>
    /// Whether two boundaries stay parallel on the ground: their bird's-eye spacing at the far end of their common
    /// support differs from the spacing at the bottom row by at most <see cref="SearchOptions.WidthTolerance"/>.
    /// </summary>
    private bool Parallel(FrameWorkspace ws, int a, int b)
    {
        double yb = ws.BirdsEyeHeight - 1;
        double top = Math.Max(ws.CandidateTopY[a], ws.CandidateTopY[b]);
        double w0 = Math.Abs(ws.CandidateFits[a].Fit.At(yb) - ws.CandidateFits[b].Fit.At(yb));
        double w1 = Math.Abs(ws.CandidateFits[a].Fit.At(top) - ws.CandidateFits[b].Fit.At(top));
        return Math.Abs(w1 - w0) <= search.WidthTolerance * w0;
    }

    private void Emit(FrameWorkspace ws, int candidate, int slot, bool allowed)
    {
        if (candidate < 0 || !allowed)
        {
            return;
        }

        LaneEstimate e = ws.CandidateFits[candidate];
        int lane = ws.LaneCount;
        int points = LaneSampler.Sample(ws, fit, e.Fit, fit.ExtendToFarEdge ? 0 : ws.CandidateTopY[candidate], ws.LanePoints[lane]);
        if (points < 2)
        {
            return;
        }

        ws.Lanes[lane] = e with { Slot = slot, PointCount = points, Kind = search.EstimateKind ? EstimateKind(ws, candidate, e.Fit) : null };
        ws.LaneCandidate[lane] = candidate;
        ws.LaneCount = lane + 1;
    }

    /// <summary>
    /// Solid or dashed from the windows along the fit that lie inside the frame: a solid line holds evidence in at
    /// least 80 % of them, a dashed one in at most 60 % with at least two gaps; anything else is not estimated (null).
    /// </summary>
    private static string? EstimateKind(FrameWorkspace ws, int candidate, Core.Results.Quadratic curve)
    {
        SearchWindow[] windows = ws.CandidateWindows[candidate];
        int inside = 0, filled = 0, gaps = 0;
        bool previousFilled = true;
        for (int k = 0; k < ws.WindowCount; k++)
        {
            SearchWindow win = windows[k];
            double yc = (win.Top + win.Bottom) / 2.0;
            if (win.Bottom <= win.Top || !ws.BirdsEyeToImage.TryMap(curve.At(yc), yc, out double xi, out _) || xi < 0 || xi > ws.Width - 1)
            {
                continue;
            }

            inside++;
            bool has = win.Mass > 0 && Math.Abs(win.X - curve.At(win.Y)) <= 2 * (win.Right - win.Left);
            if (has)
            {
                filled++;
            }
            else if (previousFilled)
            {
                gaps++;
            }

            previousFilled = has;
        }

        if (inside < 4)
        {
            return null;
        }

        double share = (double)filled / inside;
        return share >= 0.8 ? "solid" : share <= 0.6 && gaps >= 2 ? "dashed" : null;
    }

    /// <inheritdoc />
    public void Dispose()
    {
    }
}
