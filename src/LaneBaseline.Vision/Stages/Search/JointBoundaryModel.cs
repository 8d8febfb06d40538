using LaneBaseline.Core.Geometry;
using LaneBaseline.Core.Options;
using LaneBaseline.Core.Random;
using LaneBaseline.Core.Results;
using LaneBaseline.Vision.Pipeline;

namespace LaneBaseline.Vision.Stages.Search;

/// <summary>
/// Joint multi-boundary model of the <c>search</c> stage: the boundaries of one road share heading and curvature on the
/// ground, so the chosen boundaries are refitted together as x_i(y) = A·y² + B·y + C_i (bird's-eye pixels) by
/// hypothesise-and-verify over all their window centroids (RANSAC, Fischler &amp; Bolles 1981) and a joint weighted
/// least-squares refit of the consensus set (<see cref="JointQuadraticFit"/>). A boundary whose windows the joint curve
/// does not explain (less than <see cref="FitOptions.JointMinShare"/> of the mass its own fit took) is dropped, so one
/// outlier (a reflection, a tar seam) can neither bend the others nor stay reported beside them. Adjacent offsets C_i
/// keep the lane-width spacing the slot assignment checked (relative to the ego lane).
/// </summary>
internal sealed class JointBoundaryModel
{
    private const int RandomHypotheses = 48;
    private const int MaxPoints = FrameWorkspace.MaxLanes * FrameWorkspace.MaxWindows;
    private readonly SearchOptions search;
    private readonly FitOptions fit;
    private readonly double[] xs = new double[MaxPoints];
    private readonly double[] ys = new double[MaxPoints];
    private readonly double[] ws = new double[MaxPoints];
    private readonly int[] groups = new int[MaxPoints];
    private readonly int[] windowOf = new int[MaxPoints];
    private readonly bool[] ownInlier = new bool[MaxPoints];
    private readonly bool[] jointInlier = new bool[MaxPoints];
    private readonly int[] laneOfSlot = new int[6];
    private readonly double[] adjusted = new double[FrameWorkspace.MaxWindows];
    private readonly bool[] select = new bool[FrameWorkspace.MaxWindows];
    private readonly bool[] use = new bool[MaxPoints];
    private readonly int[] start = new int[FrameWorkspace.MaxLanes + 1];
    private readonly double[] residual = new double[FrameWorkspace.MaxWindows];
    private readonly int[] byResidual = new int[FrameWorkspace.MaxWindows];
    private readonly Quadratic[] fits = new Quadratic[FrameWorkspace.MaxLanes];
    private readonly double[] offsets = new double[6];
    private readonly double[] fanHeading = new double[6];
    private readonly double[] fanPosition = new double[6];
    private readonly double[] fanSpan = new double[6];
    private readonly double[] fanDepart = new double[6];
    private readonly double[] fanDepartOwn = new double[6];
    private readonly double[] fanOwnSpan = new double[6];
    private readonly int[] fanNear = new int[6];
    private readonly Quadratic[] fanCurve = new Quadratic[6];
    private readonly ConfidenceOptions confidence;
    private double shapeA, shapeB;
    private bool shapeValid;

    /// <summary>Creates the model.</summary>
    public JointBoundaryModel(SearchOptions search, FitOptions fit, ConfidenceOptions confidence)
    {
        this.search = search;
        this.fit = fit;
        this.confidence = confidence;
    }

    /// <summary>Boundary index of each entry of the chosen array (slots −3, −2, −1, +1, +2, +3): lanes between them.</summary>
    private static ReadOnlySpan<int> BoundaryIndex => [-2, -1, 0, 1, 2, 3];

    /// <summary>
    /// Refits the chosen candidates (indices in <paramref name="chosen"/>, −1 = none) jointly: replaces each kept
    /// candidate's curve by its joint curve, records its <see cref="LaneEstimate.JointShare"/>, and sets a disagreeing
    /// candidate's index to −1. Fewer than two candidates: nothing changes.
    /// </summary>
    public void Refine(FrameWorkspace frame, Span<int> chosen)
    {
        shapeValid = false;
        Array.Fill(offsets, double.NaN);
        int lanes = 0, points = 0;
        for (int s = 0; s < chosen.Length; s++)
        {
            laneOfSlot[s] = -1;
            if (chosen[s] < 0)
            {
                continue;
            }

            laneOfSlot[s] = lanes;
            start[lanes] = points;
            SearchWindow[] windows = frame.Search.CandidateWindows[chosen[s]];
            for (int k = 0; k < frame.Search.WindowCount; k++)
            {
                if (windows[k].Mass >= search.MinWindowMass)
                {
                    xs[points] = windows[k].X;
                    ys[points] = windows[k].Y;
                    ws[points] = windows[k].Mass;
                    groups[points] = lanes;
                    windowOf[points] = k;
                    ownInlier[points] = windows[k].Inlier;
                    points++;
                }
            }

            lanes++;
        }

        start[lanes] = points;
        if (lanes < 2)
        {
            return;
        }

        double tol = fit.InlierTolerancePx, scale = frame.Warp.BirdsEyeHeight;

        // Hypotheses for the shared (A, B): each boundary's own curve and its line, then seeded random triples of one
        // boundary's windows; each boundary's offset C_i is the weighted median offset of its windows.
        double bestMass = -1;
        double bestA = 0, bestB = 0;
        for (int s = 0; s < chosen.Length; s++)
        {
            if (chosen[s] < 0)
            {
                continue;
            }

            Quadratic own = frame.Search.CandidateFits[chosen[s]].Fit;
            Consider(own.A, own.B, lanes, tol, ref bestMass, ref bestA, ref bestB);
        }

        var rng = new SplitMix64(0x5EED_0002UL);
        Span<double> x3 = stackalloc double[3];
        Span<double> y3 = stackalloc double[3];
        Span<double> w3 = stackalloc double[3];
        for (int h = 0; h < RandomHypotheses; h++)
        {
            int g = rng.NextInt(lanes);
            int n = start[g + 1] - start[g];
            if (n < 3)
            {
                continue;
            }

            int i = start[g] + rng.NextInt(n), j = start[g] + rng.NextInt(n), k = start[g] + rng.NextInt(n);
            if (i == j || j == k || i == k)
            {
                continue;
            }

            x3[0] = xs[i]; x3[1] = xs[j]; x3[2] = xs[k];
            y3[0] = ys[i]; y3[1] = ys[j]; y3[2] = ys[k];
            w3[0] = 1; w3[1] = 1; w3[2] = 1;
            if (QuadraticFit.TryFit(x3, y3, w3, default, scale, out Quadratic q) && Math.Abs(q.A) <= fit.MaxCurvature)
            {
                Consider(q.A, q.B, lanes, tol, ref bestMass, ref bestA, ref bestB);
            }

            if (QuadraticFit.TryFitLine(x3, y3, w3, default, scale, out Quadratic l))
            {
                Consider(0, l.B, lanes, tol, ref bestMass, ref bestA, ref bestB);
            }
        }

        if (bestMass <= 0)
        {
            return;
        }

        // Consensus set of the best hypothesis, refitted jointly (twice, re-marking the inliers).
        for (int g = 0; g < lanes; g++)
        {
            fits[g] = new Quadratic(bestA, bestB, MedianOffset(g, bestA, bestB));
        }

        Span<Quadratic> next = stackalloc Quadratic[FrameWorkspace.MaxLanes];
        for (int iteration = 0; iteration < 2; iteration++)
        {
            MarkInliers(points, tol);
            if (JointQuadraticFit.TryFit(xs.AsSpan(0, points), ys.AsSpan(0, points), ws.AsSpan(0, points), groups.AsSpan(0, points), use.AsSpan(0, points), lanes, false, scale, next)
                && Math.Abs(next[0].A) <= fit.MaxCurvature)
            {
                next[..lanes].CopyTo(fits);
            }
            else if (JointQuadraticFit.TryFit(xs.AsSpan(0, points), ys.AsSpan(0, points), ws.AsSpan(0, points), groups.AsSpan(0, points), use.AsSpan(0, points), lanes, true, scale, next))
            {
                next[..lanes].CopyTo(fits);
            }
        }

        // Keep a boundary when its joint curve explains enough of what its own fit explained.
        int lane = 0;
        for (int s = 0; s < chosen.Length; s++)
        {
            if (chosen[s] < 0)
            {
                continue;
            }

            int c = chosen[s];
            LaneEstimate own = frame.Search.CandidateFits[c];
            double kept = 0;
            int count = 0;
            for (int p = start[lane]; p < start[lane + 1]; p++)
            {
                if (Math.Abs(fits[lane].At(ys[p]) - xs[p]) <= tol)
                {
                    kept += ws[p];
                    count++;
                }
            }

            double share = own.InlierMass > 0 ? Math.Min(1, kept / own.InlierMass) : 0;
            if (count < fit.MinInlierWindows || share < fit.JointMinShare)
            {
                chosen[s] = -1;
            }
            else
            {
                frame.Search.CandidateFits[c] = own with { Fit = fit.JointRefit ? fits[lane] : own.Fit, JointShare = share };
                offsets[s] = fits[lane].C;
            }

            lane++;
        }

        GuardShapes(frame, chosen, tol, scale);
        shapeA = fits[0].A;
        shapeB = fits[0].B;
        shapeValid = true;
    }

    /// <summary>
    /// Model-guided search for missing boundaries next to the kept ones (after <see cref="Refine"/>): the joint shape
    /// with the offset the kept boundaries' spacing predicts is followed through the bird's-eye evidence, and a
    /// boundary with at least <see cref="FitOptions.JointRecoverMinWindows"/> windows on it is added as a new candidate
    /// (a faint or sparsely dashed line that could not be fitted alone: the shape comes from the others, only its
    /// offset from its own windows). Needs two kept boundaries; a new boundary goes into <paramref name="chosen"/>.
    /// </summary>
    public void Recover(FrameWorkspace frame, Span<int> chosen, int maxLanes)
    {
        if (!shapeValid || fit.JointRecoverMinWindows <= 0)
        {
            return;
        }

        // Lane width and the offset of boundary 0 from the kept boundaries (least squares of offset on index).
        double n = 0, si = 0, sc = 0, sii = 0, sic = 0;
        for (int s = 0; s < 6; s++)
        {
            if (chosen[s] >= 0 && double.IsFinite(offsets[s]))
            {
                double i = BoundaryIndex[s];
                n++; si += i; sc += offsets[s]; sii += i * i; sic += i * offsets[s];
            }
        }

        double den = (n * sii) - (si * si);
        if (n < 2 || den <= 0)
        {
            return;
        }

        double width = ((n * sic) - (si * sc)) / den, c0 = (sc - (width * si)) / n;
        (double minW, double maxW) = LaneWidthLimits.Of(search, frame);
        if (width < minW || width > maxW)
        {
            return;
        }

        for (int s = 0; s < 6; s++)
        {
            bool allowed = s switch { 0 => maxLanes >= 5, 1 => maxLanes >= 3, 2 => true, 3 => maxLanes >= 2, 4 => maxLanes >= 4, _ => maxLanes >= 6 };
            bool nextToKept = (s > 0 && chosen[s - 1] >= 0) || (s < 5 && chosen[s + 1] >= 0);
            if (chosen[s] >= 0 || !allowed || !nextToKept || frame.Search.CandidateCount >= FrameWorkspace.MaxCandidates)
            {
                continue;
            }

            double predicted = c0 + (width * BoundaryIndex[s]);
            int candidate = frame.Search.CandidateCount;
            if (Follow(frame, candidate, predicted, width))
            {
                frame.Search.CandidateCount++;
                chosen[s] = candidate;
                offsets[s] = frame.Search.CandidateFits[candidate].Fit.C;
            }
        }
    }

    /// <summary>
    /// Follows the joint shape at about <paramref name="predicted"/> through the evidence: windows at the search's
    /// rows, a wide pass (±a quarter lane) for the offset, then a pass at the window half width around it.
    /// </summary>
    private unsafe bool Follow(FrameWorkspace frame, int candidate, double predicted, double width)
    {
        int bw = frame.Warp.BirdsEyeWidth, bh = frame.Warp.BirdsEyeHeight;
        int n = frame.Search.WindowCount;
        double wh = (double)bh / n;
        byte* b = (byte*)frame.Warp.BirdsEye.DataPointer;
        long step = frame.Warp.BirdsEye.Step();
        SearchWindow[] windows = frame.Search.CandidateWindows[candidate];
        double offset = predicted;
        for (int pass = 0; pass < 2; pass++)
        {
            int hw = pass == 0 ? Math.Max(search.WindowHalfWidthPx, (int)Math.Round(0.25 * width)) : search.WindowHalfWidthPx;
            int m = 0;
            for (int k = 0; k < n; k++)
            {
                int bottom = (int)Math.Round(bh - (k * wh));
                int top = (int)Math.Round(bh - ((k + 1) * wh));
                double yc0 = (top + bottom) / 2.0;
                double cx = (((shapeA * yc0) + shapeB) * yc0) + offset;
                int x0 = Math.Max(0, (int)Math.Round(cx) - hw), x1 = Math.Min(bw - 1, (int)Math.Round(cx) + hw);
                double mass = 0, sx = 0, sy = 0;
                for (int y = Math.Max(0, top); y < bottom && x1 >= x0; y++)
                {
                    byte* row = b + (y * step);
                    for (int x = x0; x <= x1; x++)
                    {
                        int v = row[x];
                        if (v != 0)
                        {
                            mass += v;
                            sx += v * x;
                            sy += v * y;
                        }
                    }
                }

                double windowMass = mass / 255.0;
                bool has = windowMass >= search.MinWindowMass && x1 >= x0;
                windows[k] = has
                    ? new SearchWindow(sx / mass, sy / mass, windowMass, x0, top, x1, bottom, false)
                    : new SearchWindow(cx, yc0, 0, x0, top, x1, bottom, false);
                if (has)
                {
                    xs[m] = windows[k].X;
                    ys[m] = windows[k].Y;
                    ws[m] = windowMass;
                    m++;
                }
            }

            if (m < fit.JointRecoverMinWindows)
            {
                return false;
            }

            start[0] = 0;
            start[1] = m;
            offset = MedianOffset(0, shapeA, shapeB);
        }

        if (Math.Abs(offset - predicted) > search.WidthTolerance * width)
        {
            return false;
        }

        var curve = new Quadratic(shapeA, shapeB, offset);
        double inlierMass = 0, sq = 0, topY = double.MaxValue;
        int count = 0;
        for (int k = 0; k < n; k++)
        {
            if (windows[k].Mass > 0 && Math.Abs(curve.At(windows[k].Y) - windows[k].X) <= fit.InlierTolerancePx)
            {
                windows[k].Inlier = true;
                double r = curve.At(windows[k].Y) - windows[k].X;
                inlierMass += windows[k].Mass;
                sq += windows[k].Mass * r * r;
                topY = Math.Min(topY, windows[k].Top);
                count++;
            }
        }

        double xb = curve.At(bh - 1);
        if (count < fit.JointRecoverMinWindows || xb < 0 || xb > bw - 1)
        {
            return false;
        }

        double rms = Math.Sqrt(sq / inlierMass);
        double coverage = (double)count / n;
        double score = Math.Min(1, inlierMass / confidence.FullSupportMass)
            * Math.Min(1, coverage / confidence.FullCoverage)
            * Math.Exp(-rms / confidence.ResidualScalePx);
        frame.Search.CandidateFits[candidate] = new LaneEstimate(0, score, curve, inlierMass, coverage, rms, 0);
        frame.Search.CandidateTopY[candidate] = Math.Max(0, topY);
        return score >= confidence.MinScore;
    }

    /// <summary>
    /// Keeps a boundary that bends unlike the others from being reported bent (after the keep test of
    /// <see cref="Refine"/>, with own curves reported). A kept boundary whose own curvature departs from the joint
    /// curvature and from every other kept boundary's own curvature (<see cref="CurvatureOutlier"/>), while another kept
    /// boundary agrees with the joint curvature, and whose own fit took windows that lie off its joint curve while its
    /// nearest window lies on it, is refitted with the joint curvature A and its own heading B and offset C from its
    /// joint inliers (<see cref="TryFixedCurvature"/>): the shape is the consensus of the boundaries (RANSAC,
    /// Fischler &amp; Bolles 1981: the model is estimated from the consensus set, not from every centroid), the heading
    /// stays the boundary's own because the per-frame bird's-eye view is not exactly metric and real boundaries fan
    /// slightly. Its support, RMS, coverage, raw confidence and fan-out are recomputed for the new curve (its windows'
    /// inlier marks and far end are left as the candidate fitter set them). The nearest window must agree
    /// because near the camera a bird's-eye pixel is a small patch of road and far away a large one: the near part is
    /// the better measured, and a boundary whose near windows disagree with the joint curve is left as it is.
    /// </summary>
    private void GuardShapes(FrameWorkspace frame, Span<int> chosen, double tol, double scale)
    {

        if (fit.JointRefit)
        {
            return;
        }

        int kept = 0;
        for (int s = 0; s < chosen.Length; s++)
        {
            if (chosen[s] < 0 || laneOfSlot[s] < 0)
            {
                continue;
            }

            kept++;
            int g = laneOfSlot[s];
            for (int p = start[g]; p < start[g + 1]; p++)
            {
                jointInlier[p] = Math.Abs(fits[g].At(ys[p]) - xs[p]) <= tol;
            }
        }

        if (kept < 2)
        {
            return;
        }

        for (int s = 0; s < chosen.Length; s++)
        {
            if (chosen[s] < 0 || laneOfSlot[s] < 0)
            {
                continue;
            }

            int g = laneOfSlot[s], c = chosen[s];
            // Windows of its own fit off the joint curve, while its nearest own window is on it.
            bool offJoint = false, nearOnJoint = false;
            double nearest = double.MinValue;
            for (int p = start[g]; p < start[g + 1]; p++)
            {
                offJoint |= ownInlier[p] && !jointInlier[p];
                if (ownInlier[p] && ys[p] > nearest)
                {
                    nearest = ys[p];
                    nearOnJoint = jointInlier[p];
                }
            }

            if (!offJoint || !nearOnJoint || !CurvatureOutlier(frame, chosen, s, tol) || !TryFixedCurvature(g, fits[g].A, jointInlier, tol, scale, out Quadratic curve))
            {
                continue;
            }

            Rescore(frame, c, g, curve, tol);
        }

    }

    /// <summary>
    /// Replaces candidate <paramref name="c"/>'s curve by <paramref name="curve"/> with its support, coverage, RMS,
    /// raw confidence and fan-out recomputed over the windows of group <paramref name="g"/> within the tolerance; fewer
    /// than <see cref="FitOptions.MinInlierWindows"/> such windows: nothing changes.
    /// </summary>
    private void Rescore(FrameWorkspace frame, int c, int g, Quadratic curve, double tol)
    {
        int n = frame.Search.WindowCount;
        double inlierMass = 0, sq = 0, topY = double.MaxValue;
        int count = 0;
        SearchWindow[] windows = frame.Search.CandidateWindows[c];
        for (int p = start[g]; p < start[g + 1]; p++)
        {
            double r = curve.At(ys[p]) - xs[p];
            if (Math.Abs(r) <= tol)
            {
                inlierMass += ws[p];
                sq += ws[p] * r * r;
                topY = Math.Min(topY, windows[windowOf[p]].Top);
                count++;
            }
        }

        if (count < fit.MinInlierWindows)
        {
            return;
        }

        LaneEstimate own = frame.Search.CandidateFits[c];
        double rms = Math.Sqrt(sq / inlierMass);
        double coverage = (double)count / n;
        double score = Math.Min(1, inlierMass / confidence.FullSupportMass)
            * Math.Min(1, coverage / confidence.FullCoverage)
            * Math.Exp(-rms / confidence.ResidualScalePx);
        double fanOut = CandidateFitter.FanOut(frame, curve, Math.Max(0, topY));
        if (double.IsFinite(fanOut))
        {
            score *= 1 - (fit.FanOutPenalty * fanOut);
        }

        frame.Search.CandidateFits[c] = own with { Fit = curve, Score = score, InlierMass = inlierMass, Coverage = coverage, RmsPx = rms, FanOut = fanOut };
    }

    /// <summary>
    /// Refits one boundary with the joint curvature <paramref name="a"/> and its own heading and offset: a weighted
    /// line fit of x − A·y² against y over the windows marked in <paramref name="initial"/> (its joint inliers, or its
    /// own inliers for the heading guard's estimate), then twice over its windows within the tolerance of the new curve.
    /// </summary>
    private bool TryFixedCurvature(int g, double a, bool[] initial, double tol, double scale, out Quadratic curve)
    {
        curve = default;
        int s0 = start[g], len = start[g + 1] - s0;
        for (int k = 0; k < len; k++)
        {
            adjusted[k] = xs[s0 + k] - (a * ys[s0 + k] * ys[s0 + k]);
            select[k] = initial[s0 + k];
        }

        for (int iteration = 0; iteration < 3; iteration++)
        {
            if (!QuadraticFit.TryFitLine(adjusted.AsSpan(0, len), ys.AsSpan(s0, len), ws.AsSpan(s0, len), select.AsSpan(0, len), scale, out Quadratic line))
            {
                return false;
            }

            curve = new Quadratic(a, line.B, line.C);
            if (iteration == 2)
            {
                break;
            }

            int count = 0;
            for (int k = 0; k < len; k++)
            {
                select[k] = Math.Abs(curve.At(ys[s0 + k]) - xs[s0 + k]) <= tol;
                count += select[k] ? 1 : 0;
            }

            if (count < 2)
            {
                return false;
            }
        }

        return true;
    }

    /// <summary>
    /// Keeps a boundary that is tilted unlike the others, or whose own curve runs off where it has no windows, from
    /// being reported so (after <see cref="Refine"/> and <see cref="Recover"/>, with own curves reported).
    /// <para>The fan: a bird's-eye view built from a slightly wrong horizon maps parallel ground lines to lines whose
    /// headings vary linearly with their sideways position, B_i ≈ b + k·X_i. To first order the error is a perspective
    /// term of the plane homography, ground x maps to x / (1 + e·y) ≈ x − e·x·y, so the line x = b·y + X gets the
    /// heading b − e·X (plus terms of order e·b·y): common practice for a small perspective error. Each boundary's
    /// heading is measured with the joint curvature from its own inliers (<see cref="TryFixedCurvature"/>), its position
    /// X at the middle row; with at least three boundaries the fan is fitted by hypothesise-and-verify over every pair
    /// (RANSAC, Fischler &amp; Bolles 1981): the pair most boundaries agree with wins (agreeing: heading within the
    /// tolerance of the fan's over its own windows' vertical span), ties to the pair whose agreeing boundaries span more
    /// rows, then to the most parallel pair; all but at most one
    /// boundary must agree.</para>
    /// <para>Each boundary's fan curve has the joint curvature, the fan's heading and its offset from its joint inliers
    /// (<see cref="FixedShapeOffset"/>). A boundary whose reported curve stays within the tolerance of its fan curve over
    /// all bird's-eye rows confirms the model; with at least one such boundary, a boundary whose reported curve leaves
    /// its fan curve is reported on the fan curve (support, coverage, RMS, raw confidence and fan-out recomputed,
    /// <see cref="Rescore"/>) when (1) it departs where its own windows are, and none of them lies in the near half of
    /// the rows (a far-only boundary whose heading the fan contradicts), or (2) it departs only outside its own windows,
    /// and either none of them lies in the near half or they span less than half the rows (its own curvature, not
    /// measured there, runs it off); in both cases every own window in the near half must lie on the fan curve. Near the
    /// camera a bird's-eye pixel is a small patch of road and far away a large one, so the near part is the better
    /// measured: a boundary whose near windows set its heading is left as it is.</para>
    /// </summary>
    public void GuardHeadings(FrameWorkspace frame, Span<int> chosen)
    {
        if (!shapeValid || fit.JointRefit)
        {
            return;
        }

        // The kept and recovered boundaries' windows again (the recovery search reused the point buffers); each one's
        // joint curve is the joint shape at its offset.
        double tol = fit.InlierTolerancePx, scale = frame.Warp.BirdsEyeHeight, yRef = scale / 2;
        int lanes = 0, points = 0, m = 0;
        for (int s = 0; s < chosen.Length; s++)
        {
            laneOfSlot[s] = -1;
            fanHeading[s] = double.NaN;
            if (chosen[s] < 0 || !double.IsFinite(offsets[s]))
            {
                continue;
            }

            laneOfSlot[s] = lanes;
            start[lanes] = points;
            var joint = new Quadratic(shapeA, shapeB, offsets[s]);
            SearchWindow[] windows = frame.Search.CandidateWindows[chosen[s]];
            for (int k = 0; k < frame.Search.WindowCount; k++)
            {
                if (windows[k].Mass >= search.MinWindowMass)
                {
                    xs[points] = windows[k].X;
                    ys[points] = windows[k].Y;
                    ws[points] = windows[k].Mass;
                    windowOf[points] = k;
                    ownInlier[points] = windows[k].Inlier;
                    jointInlier[points] = Math.Abs(joint.At(windows[k].Y) - windows[k].X) <= tol;
                    points++;
                }
            }

            start[++lanes] = points;
            if (TryFixedCurvature(lanes - 1, shapeA, ownInlier, tol, scale, out Quadratic q))
            {
                fanHeading[s] = q.B;
                fanPosition[s] = q.At(yRef);
                fanSpan[s] = Span(lanes - 1);
                m++;
            }
        }

        if (m < 3 || !TryFan(chosen.Length, tol, m, out double b0, out double k0))
        {
            return;
        }

        // Each boundary's fan curve and how far its reported curve leaves it: over all rows, and over its own windows.
        bool confirmed = false;
        for (int s = 0; s < chosen.Length; s++)
        {
            if (!double.IsFinite(fanHeading[s]))
            {
                continue;
            }

            int g = laneOfSlot[s];
            double heading = b0 + (k0 * fanPosition[s]);
            fanCurve[s] = new Quadratic(shapeA, heading, FixedShapeOffset(g, shapeA, heading, tol));
            Quadratic reported = frame.Search.CandidateFits[chosen[s]].Fit;
            double lo = double.MaxValue, hi = double.MinValue;
            fanNear[s] = 0;
            for (int p = start[g]; p < start[g + 1]; p++)
            {
                if (ownInlier[p])
                {
                    lo = Math.Min(lo, ys[p]);
                    hi = Math.Max(hi, ys[p]);
                    fanNear[s] += ys[p] > yRef ? 1 : 0;
                }
            }

            fanDepart[s] = 0;
            fanDepartOwn[s] = 0;
            const int Rows = 32;
            for (int r = 0; r <= Rows; r++)
            {
                double y = (scale - 1) * r / Rows;
                double d = Math.Abs(reported.At(y) - fanCurve[s].At(y));
                fanDepart[s] = Math.Max(fanDepart[s], d);
                fanDepartOwn[s] = y >= lo && y <= hi ? Math.Max(fanDepartOwn[s], d) : fanDepartOwn[s];
            }

            fanOwnSpan[s] = hi >= lo ? hi - lo : 0;
            confirmed |= fanDepart[s] <= tol;
        }

        if (!confirmed)
        {
            return;
        }

        for (int s = 0; s < chosen.Length; s++)
        {
            if (!double.IsFinite(fanHeading[s]) || fanDepart[s] <= tol)
            {
                continue;
            }

            bool allowed = fanDepartOwn[s] > tol ? fanNear[s] == 0 : fanNear[s] == 0 || fanOwnSpan[s] < yRef;
            int g = laneOfSlot[s];
            for (int p = start[g]; p < start[g + 1] && allowed; p++)
            {
                allowed = !(ownInlier[p] && ys[p] > yRef && Math.Abs(fanCurve[s].At(ys[p]) - xs[p]) > tol);
            }

            if (allowed)
            {
                Rescore(frame, chosen[s], g, fanCurve[s], tol);
            }
        }
    }

    /// <summary>
    /// The fan of headings over the measured boundaries (slots with a finite <see cref="fanHeading"/>): the line
    /// through the (position, heading) pair most boundaries agree with, ties to the larger summed vertical span of the
    /// agreeing boundaries (the better measured), then to the smallest |k|; false when fewer than
    /// <paramref name="m"/> − 1 of the <paramref name="m"/> boundaries agree.
    /// </summary>
    private bool TryFan(int slots, double tol, int m, out double b0, out double k0)
    {
        int bestCount = 0;
        double bestSpan = 0;
        b0 = 0;
        k0 = double.MaxValue;
        for (int i = 0; i < slots; i++)
        {
            for (int j = i + 1; j < slots && double.IsFinite(fanHeading[i]); j++)
            {
                if (!double.IsFinite(fanHeading[j]) || Math.Abs(fanPosition[j] - fanPosition[i]) < 1)
                {
                    continue;
                }

                double k = (fanHeading[j] - fanHeading[i]) / (fanPosition[j] - fanPosition[i]);
                double b = fanHeading[i] - (k * fanPosition[i]);
                int count = 0;
                double span = 0;
                for (int s = 0; s < slots; s++)
                {
                    if (double.IsFinite(fanHeading[s]) && Math.Abs(fanHeading[s] - (b + (k * fanPosition[s]))) * fanSpan[s] <= tol)
                    {
                        count++;
                        span += fanSpan[s];
                    }
                }

                if (count > bestCount || (count == bestCount && (span > bestSpan || (span == bestSpan && Math.Abs(k) < Math.Abs(k0)))))
                {
                    bestCount = count;
                    bestSpan = span;
                    k0 = k;
                    b0 = b;
                }
            }
        }

        return bestCount >= m - 1;
    }

    /// <summary>
    /// Offset of group <paramref name="g"/> for the fixed shape (A, B): the weighted mean of x − A·y² − B·y over its
    /// joint inliers (its weighted median when it has none), then twice over its windows within the tolerance.
    /// </summary>
    private double FixedShapeOffset(int g, double a, double b, double tol)
    {
        double offset = double.NaN;
        for (int iteration = 0; iteration < 3; iteration++)
        {
            double sw = 0, sr = 0;
            for (int p = start[g]; p < start[g + 1]; p++)
            {
                double r = xs[p] - (((a * ys[p]) + b) * ys[p]);
                if (double.IsNaN(offset) ? jointInlier[p] : Math.Abs(r - offset) <= tol)
                {
                    sw += ws[p];
                    sr += ws[p] * r;
                }
            }

            if (sw <= 0)
            {
                return double.IsNaN(offset) ? MedianOffset(g, a, b) : offset;
            }

            offset = sr / sw;
        }

        return offset;
    }

    /// <summary>
    /// Whether the boundary in <paramref name="slot"/> bends unlike the others: over its own windows' vertical span L
    /// its own curvature departs by more than the tolerance (sagitta |ΔA|·L²/4) from the joint curvature and from every
    /// other kept boundary's own curvature, and at least one other kept boundary agrees with the joint curvature (over
    /// that boundary's own span) — the joint shape is then confirmed by another boundary, not only by this one.
    /// </summary>
    private bool CurvatureOutlier(FrameWorkspace frame, Span<int> chosen, int slot, double tol)
    {
        int g = laneOfSlot[slot];
        double a = frame.Search.CandidateFits[chosen[slot]].Fit.A, jointA = fits[g].A;
        double span = Span(g);
        if (Math.Abs(a - jointA) * span * span / 4 <= tol)
        {
            return false;
        }

        bool confirmed = false;
        for (int s = 0; s < chosen.Length; s++)
        {
            if (s == slot || chosen[s] < 0 || laneOfSlot[s] < 0)
            {
                continue;
            }

            double other = frame.Search.CandidateFits[chosen[s]].Fit.A;
            if (Math.Abs(a - other) * span * span / 4 <= tol)
            {
                return false;
            }

            double otherSpan = Span(laneOfSlot[s]);
            confirmed |= Math.Abs(other - jointA) * otherSpan * otherSpan / 4 <= tol;
        }

        return confirmed;
    }

    /// <summary>Vertical span of one boundary's windows, in bird's-eye pixels.</summary>
    private double Span(int g)
    {
        double lo = double.MaxValue, hi = double.MinValue;
        for (int p = start[g]; p < start[g + 1]; p++)
        {
            lo = Math.Min(lo, ys[p]);
            hi = Math.Max(hi, ys[p]);
        }

        return hi > lo ? hi - lo : 0;
    }

    private void Consider(double a, double b, int lanes, double tol, ref double bestMass, ref double bestA, ref double bestB)
    {
        double mass = 0;
        for (int g = 0; g < lanes; g++)
        {
            double c = MedianOffset(g, a, b);
            for (int p = start[g]; p < start[g + 1]; p++)
            {
                if (Math.Abs((((a * ys[p]) + b) * ys[p]) + c - xs[p]) <= tol)
                {
                    mass += ws[p];
                }
            }
        }

        if (mass > bestMass)
        {
            bestMass = mass;
            bestA = a;
            bestB = b;
        }
    }

    /// <summary>Weighted median of x − A·y² − B·y over one group's windows (robust to its outlier windows).</summary>
    private double MedianOffset(int g, double a, double b)
    {
        int n = start[g + 1] - start[g];
        double total = 0;
        for (int k = 0; k < n; k++)
        {
            int p = start[g] + k;
            residual[k] = xs[p] - (((a * ys[p]) + b) * ys[p]);
            byResidual[k] = k;
            total += ws[p];
        }

        // Insertion sort by residual (at most 64 windows; index order breaks ties).
        for (int k = 1; k < n; k++)
        {
            int v = byResidual[k];
            int pos = k;
            while (pos > 0 && residual[byResidual[pos - 1]] > residual[v])
            {
                byResidual[pos] = byResidual[pos - 1];
                pos--;
            }

            byResidual[pos] = v;
        }

        double half = total / 2, acc = 0;
        for (int k = 0; k < n; k++)
        {
            acc += ws[start[g] + byResidual[k]];
            if (acc >= half)
            {
                return residual[byResidual[k]];
            }
        }

        return n > 0 ? residual[byResidual[n - 1]] : 0;
    }

    private void MarkInliers(int points, double tol)
    {
        for (int p = 0; p < points; p++)
        {
            use[p] = Math.Abs(fits[groups[p]].At(ys[p]) - xs[p]) <= tol;
        }
    }
}
