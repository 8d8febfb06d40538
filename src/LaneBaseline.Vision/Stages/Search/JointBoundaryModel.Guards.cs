using LaneBaseline.Core.Geometry;
using LaneBaseline.Core.Options;
using LaneBaseline.Core.Results;
using LaneBaseline.Vision.Pipeline;

namespace LaneBaseline.Vision.Stages.Search;

/// <summary>The shape guards of the joint model: curvature against the joint curve, heading against the fan of headings.</summary>
internal sealed partial class JointBoundaryModel
{
    private readonly double[] fanHeading = new double[6];
    private readonly double[] fanPosition = new double[6];
    private readonly double[] fanSpan = new double[6];
    private readonly double[] fanDepart = new double[6];
    private readonly double[] fanDepartOwn = new double[6];
    private readonly double[] fanOwnSpan = new double[6];
    private readonly int[] fanNear = new int[6];
    private readonly int[] fanLow = new int[6];
    private readonly Quadratic[] fanCurve = new Quadratic[6];

    /// <summary>Smallest departure (bird's-eye pixels) from the fan curve that rule (3) of <see cref="GuardHeadings"/> corrects.</summary>
    private const double MinFanShiftPx = 1.0;

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
    /// <para>(3) A boundary with no own window in the near third of the rows whose fan curve explains every window its
    /// own fit took (all within the tolerance) is reported on the fan curve when the two differ by more than
    /// <see cref="MinFanShiftPx"/> somewhere, even by less than the tolerance, provided a boundary with windows in the
    /// near third confirms the fan. Both curves explain its windows, so the model of the consensus is kept (RANSAC,
    /// Fischler &amp; Bolles 1981) and its unmeasured near part follows the near-measured boundaries' fan: near the
    /// bottom row one bird's-eye pixel of the trapezoid view is about ten image pixels, so a tilt within the tolerance
    /// still moves the lane's near end off the marking in the image.</para>
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
                    AddWindowPoint(points, windows, k);
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
        bool confirmed = false, lowConfirmed = false;
        double lowRow = scale * 2 / 3;
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
            fanLow[s] = 0;
            for (int p = start[g]; p < start[g + 1]; p++)
            {
                if (ownInlier[p])
                {
                    lo = Math.Min(lo, ys[p]);
                    hi = Math.Max(hi, ys[p]);
                    fanNear[s] += ys[p] > yRef ? 1 : 0;
                    fanLow[s] += ys[p] > lowRow ? 1 : 0;
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
            lowConfirmed |= fanDepart[s] <= tol && fanLow[s] > 0;
        }

        if (!confirmed)
        {
            return;
        }

        for (int s = 0; s < chosen.Length; s++)
        {
            if (!double.IsFinite(fanHeading[s]) || fanDepart[s] <= MinFanShiftPx)
            {
                continue;
            }

            bool allowed = fanDepart[s] > tol && (fanDepartOwn[s] > tol ? fanNear[s] == 0 : fanNear[s] == 0 || fanOwnSpan[s] < yRef);
            int g = laneOfSlot[s];
            for (int p = start[g]; p < start[g + 1] && allowed; p++)
            {
                allowed = !(ownInlier[p] && ys[p] > yRef && Math.Abs(fanCurve[s].At(ys[p]) - xs[p]) > tol);
            }

            bool explains = true;
            for (int p = start[g]; p < start[g + 1] && explains; p++)
            {
                explains = !ownInlier[p] || Math.Abs(fanCurve[s].At(ys[p]) - xs[p]) <= tol;
            }

            allowed |= explains && lowConfirmed && fanLow[s] == 0;
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
}
