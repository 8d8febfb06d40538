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
internal sealed partial class JointBoundaryModel
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
                    AddWindowPoint(points, windows, k);
                    groups[points] = lanes;
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

    /// <summary>Stores window <paramref name="k"/> of a candidate as point <paramref name="point"/> of the fit: its centroid, evidence mass, index and own-fit inlier flag.</summary>
    private void AddWindowPoint(int point, SearchWindow[] windows, int k)
    {
        xs[point] = windows[k].X;
        ys[point] = windows[k].Y;
        ws[point] = windows[k].Mass;
        windowOf[point] = k;
        ownInlier[point] = windows[k].Inlier;
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
