using LaneBaseline.Core.Options;
using LaneBaseline.Core.Results;
using LaneBaseline.Vision.Pipeline;

namespace LaneBaseline.Vision.Stages.Search;

/// <summary>
/// Steps (5) to (7) of the <c>search</c> stage: duplicates dropped, slots by lane-width and parallelism consistency,
/// each reported lane sampled back into the image with its marking kind and agreement features.
/// </summary>
internal sealed class SlotAssigner
{
    private readonly SearchOptions search;
    private readonly FitOptions fit;
    private readonly ConfidenceOptions confidence;
    private readonly int[] order = new int[FrameWorkspace.MaxCandidates];
    private readonly int[] accepted = new int[FrameWorkspace.MaxCandidates];
    private readonly int[] chosen = new int[6];
    private readonly LaneEstimate[] saved = new LaneEstimate[6];
    private readonly int[] savedIndex = new int[6];
    private readonly JointBoundaryModel joint;

    /// <summary>Creates the slot assigner.</summary>
    public SlotAssigner(SearchOptions search, FitOptions fit, ConfidenceOptions confidence)
    {
        this.search = search;
        this.fit = fit;
        this.confidence = confidence;
        joint = new JointBoundaryModel(search, fit, confidence);
    }

    /// <summary>
    /// Two kept candidates whose mean separation over their shared rows is below the smallest plausible lane width
    /// (<see cref="LaneWidthLimits"/>) cannot both be boundaries. When one of them has at most one inlier window in the
    /// near half of the rows (a position there but no direction: its bottom end is extrapolated from far evidence) and
    /// the other has two or more there, the extrapolated one is dropped; otherwise both stay (a dashed boundary with one
    /// dash, two windows, in its near half is measured there). The score does not decide here: support and coverage saturate in it, so a short fit through
    /// a few far specks can have a smaller residual, and a higher score, than a long continuous line beside it, and as
    /// the boundary nearer the centre it would take the slot and hide the line. Returns the new count of kept candidates.
    /// </summary>
    private int DropNearPairs(FrameWorkspace ws, int kept)
    {
        double yb = ws.Warp.BirdsEyeHeight - 1;
        double limit = LaneWidthLimits.Of(search, ws).MinPx;
        Span<bool> drop = stackalloc bool[FrameWorkspace.MaxCandidates];
        for (int a = 0; a < kept; a++)
        {
            for (int c = a + 1; c < kept; c++)
            {
                int i = accepted[a], j = accepted[c];
                double top = Math.Max(ws.Search.CandidateTopY[i], ws.Search.CandidateTopY[j]);
                double sum = 0;
                for (int s = 0; s <= 4; s++)
                {
                    double y = yb - ((yb - top) * s / 4);
                    sum += Math.Abs(ws.Search.CandidateFits[i].Fit.At(y) - ws.Search.CandidateFits[j].Fit.At(y));
                }

                if (sum / 5 >= limit)
                {
                    continue;
                }

                // Only a fit whose near half is extrapolated (at most one window there: a position, no direction) gives
                // way to one measured there (two windows or more).
                int ni = NearInliers(ws, i), nj = NearInliers(ws, j);
                if (ni < 2 && nj >= 2)
                {
                    drop[a] = true;
                }
                else if (nj < 2 && ni >= 2)
                {
                    drop[c] = true;
                }
            }
        }

        int n = 0;
        for (int a = 0; a < kept; a++)
        {
            if (!drop[a])
            {
                accepted[n++] = accepted[a];
            }
        }

        return n;
    }

    /// <summary>
    /// Whether a boundary the joint model recovered between a nearest pair read as several lanes confirms that reading.
    /// In the metric view any recovered boundary does (the pair's spacing alone already exceeds one lane). In the
    /// trapezoid the spacing proves nothing, so the recovered boundary must be measured where a veiled road still shows
    /// its paint, near the camera: two or more inlier windows in the near half of the rows (the veil washes out the far
    /// part first). A fit through far windows only does not confirm.
    /// </summary>
    private static bool Confirms(FrameWorkspace ws, int candidate) =>
        candidate >= 0 && (ws.Warp.MetresPerPixel > 0 || NearInliers(ws, candidate) >= 2);

    /// <summary>Inlier windows of a candidate in the near half of the rows (windows are counted from the bottom).</summary>
    private static int NearInliers(FrameWorkspace ws, int candidate)
    {
        SearchWindow[] windows = ws.Search.CandidateWindows[candidate];
        int count = 0;
        for (int k = 0; k < ws.Search.WindowCount / 2; k++)
        {
            if (windows[k].Inlier)
            {
                count++;
            }
        }

        return count;
    }

    /// <summary>The slots of <see cref="chosen"/>, outermost left to outermost right.</summary>
    private static ReadOnlySpan<int> Slots => [-3, -2, -1, +1, +2, +3];

    /// <summary>Chooses the reported lanes among the fitted candidates and gives them slots.</summary>
    public void Assign(FrameWorkspace ws)
    {
        int n = ws.Search.CandidateCount, bh = ws.Warp.BirdsEyeHeight;
        double yb = bh - 1;

        // Candidates by score (descending; index breaks ties so the order is deterministic).
        int count = 0;
        for (int i = 0; i < n; i++)
        {
            if (ws.Search.CandidateFits[i].Score >= confidence.MinScore)
            {
                int pos = count++;
                while (pos > 0 && ws.Search.CandidateFits[order[pos - 1]].Score < ws.Search.CandidateFits[i].Score)
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
                double top = Math.Max(ws.Search.CandidateTopY[i], ws.Search.CandidateTopY[j]);
                double sum = 0;
                for (int s = 0; s <= 4; s++)
                {
                    double y = yb - ((yb - top) * s / 4);
                    sum += Math.Abs(ws.Search.CandidateFits[i].Fit.At(y) - ws.Search.CandidateFits[j].Fit.At(y));
                }

                duplicate = sum / 5 < search.MinSeparationPx / 2.0 || Crosses(ws, i, j);
            }

            if (!duplicate)
            {
                accepted[kept++] = i;
            }
        }

        // The ambiguity feature counts the distinct candidates of the duplicate test above (as calibrated).
        int distinct = kept;
        kept = DropNearPairs(ws, kept);

        // Metric view (or a veiled road in the trapezoid): when the nearest boundaries left and right are two or three
        // plausible lane widths apart (the ego boundaries between them unseen, as under a low sun that veils the dashes
        // ahead), read them as ±1/±2 or −2/+2;
        // keep that reading only when the joint model then finds an unseen boundary between them along the joint curve,
        // else undo it and choose as usual (the stronger of the two kept alone).
        int candidates = ws.Search.CandidateCount;
        int gap = Choose(ws, kept, true);
        if (gap >= 0)
        {
            for (int s = 0; s < chosen.Length; s++)
            {
                savedIndex[s] = chosen[s];
                saved[s] = chosen[s] >= 0 ? ws.Search.CandidateFits[chosen[s]] : default;
            }

            Refine(ws);

            // Found: the unseen boundary (for three lanes, either ego boundary) was recovered along the joint curve.
            bool found = Confirms(ws, chosen[gap]) || (savedIndex[2] < 0 && savedIndex[3] < 0 && Confirms(ws, chosen[3]));
            if (!found)
            {
                RestoreBefore(ws, candidates);
                Choose(ws, kept, false);
                Refine(ws);
            }
        }
        else
        {
            Refine(ws);
        }

        ws.LaneCount = 0;
        for (int s = 0; s < chosen.Length; s++)
        {
            Emit(ws, chosen[s], Slots[s], true);
        }

        AddAgreementFeatures(ws, Math.Max(0, distinct - ws.LaneCount));
    }

    /// <summary>
    /// Fills <see cref="chosen"/> from the candidates that survived the duplicate test: the nearest boundaries left and
    /// right of the vehicle centre (bird's-eye centre column) as −1 and +1 when their spacing is a plausible lane width,
    /// then their neighbours outwards. With <paramref name="wider"/>, in the metric view, a nearest pair two plausible
    /// lane widths apart is read as ±1 and ±2 (the ego boundary on the side of their midpoint unseen), and a pair three
    /// widths apart around the camera as −2 and +2 (both ego boundaries unseen; see <see cref="LanesSpanned"/>);
    /// returns the index in <see cref="chosen"/> of the unseen boundary (the −1 for three lanes), or −1 for the usual
    /// reading.
    /// </summary>
    private int Choose(FrameWorkspace ws, int kept, bool wider)
    {
        double centre = (ws.Warp.BirdsEyeWidth - 1) / 2.0;
        int l1 = Nearest(ws, kept, centre, -1, double.NegativeInfinity);
        int r1 = Nearest(ws, kept, centre, +1, double.PositiveInfinity);
        (double minW, double maxW) = LaneWidthLimits.Of(search, ws);
        int l2 = -1, r2 = -1, gap = -1;
        double egoWidth = double.NaN;
        int spanned = wider && l1 >= 0 && r1 >= 0 ? LanesSpanned(ws, l1, r1, centre, minW, maxW) : 0;
        if (spanned == 3)
        {
            egoWidth = (Xb(ws, r1) - Xb(ws, l1)) / 3;
            (l2, r2, l1, r1, gap) = (l1, r1, -1, -1, 2);
        }
        else if (spanned == 2)
        {
            egoWidth = (Xb(ws, r1) - Xb(ws, l1)) / 2;
            if (Xb(ws, l1) + egoWidth > centre)
            {
                (r2, r1, gap) = (r1, -1, 3);
            }
            else
            {
                (l2, l1, gap) = (l1, -1, 2);
            }
        }
        else if (l1 >= 0 && r1 >= 0)
        {
            double width = Xb(ws, r1) - Xb(ws, l1);
            if (width < minW || width > maxW || !Parallel(ws, l1, r1))
            {
                // Implausible ego lane (width, or boundaries not parallel on the ground): keep the stronger boundary only.
                if (ws.Search.CandidateFits[l1].Score >= ws.Search.CandidateFits[r1].Score)
                {
                    r1 = -1;
                }
                else
                {
                    l1 = -1;
                }
            }

            egoWidth = l1 >= 0 && r1 >= 0 ? Xb(ws, r1) - Xb(ws, l1) : double.NaN;
        }

        if (l1 >= 0 && l2 < 0)
        {
            l2 = Neighbour(ws, kept, l1, -1, egoWidth, minW, maxW);
        }

        if (r1 >= 0 && r2 < 0)
        {
            r2 = Neighbour(ws, kept, r1, +1, egoWidth, minW, maxW);
        }

        int l3 = l2 >= 0 && search.MaxLanes >= 5 ? Neighbour(ws, kept, l2, -1, egoWidth, minW, maxW) : -1;
        int r3 = r2 >= 0 && search.MaxLanes >= 6 ? Neighbour(ws, kept, r2, +1, egoWidth, minW, maxW) : -1;

        // One side only, two parallel boundaries there: their spacing is a lane width, and an ego boundary lies within
        // one lane width of the camera's column. A nearest boundary farther out than that (with the width tolerance) is
        // an outer one, the ego boundary between unseen (a low sun veiling the dashes ahead): shift the side outwards.
        if (gap < 0 && r1 < 0 && l1 >= 0 && l2 >= 0 && OutwardsByOne(ws, l1, l2, centre))
        {
            (l3, l2, l1) = (l2, l1, -1);
        }
        else if (gap < 0 && l1 < 0 && r1 >= 0 && r2 >= 0 && OutwardsByOne(ws, r1, r2, centre))
        {
            (r3, r2, r1) = (r2, r1, -1);
        }

        int max = search.MaxLanes;
        chosen[0] = max >= 5 ? l3 : -1;
        chosen[1] = max >= 3 ? l2 : -1;
        chosen[2] = l1;
        chosen[3] = max >= 2 ? r1 : -1;
        chosen[4] = max >= 4 ? r2 : -1;
        chosen[5] = max >= 6 ? r3 : -1;
        return gap;
    }

    /// <summary>The joint multi-boundary model over <see cref="chosen"/> (when on): refit, drop, recover.</summary>
    private void Refine(FrameWorkspace ws)
    {
        if (fit.JointModel)
        {
            joint.Refine(ws, chosen);
            joint.Recover(ws, chosen, search.MaxLanes);
            joint.GuardHeadings(ws, chosen);
            joint.GuardExtrapolation(ws, chosen);
        }
    }

    /// <summary>Undoes a rejected reading: the fits the joint model changed and the candidates it added.</summary>
    private void RestoreBefore(FrameWorkspace ws, int candidates)
    {
        for (int s = 0; s < chosen.Length; s++)
        {
            if (savedIndex[s] >= 0)
            {
                ws.Search.CandidateFits[savedIndex[s]] = saved[s];
            }
        }

        ws.Search.CandidateCount = candidates;
    }

    /// <summary>
    /// Evidence features of the reported lanes that see the conditions (see <see cref="LaneEstimate"/>): the frame's
    /// share of evidence kept by reflection suppression, the heading at the bottom row against the bird's-eye vertical
    /// (agreement with the vanishing point), and the smallest spacing change against another reported lane
    /// (agreement with the other boundaries), and how many distinct fitted candidates were not reported (ambiguity).
    /// </summary>
    private static void AddAgreementFeatures(FrameWorkspace ws, int unused)
    {
        double yb = ws.Warp.BirdsEyeHeight - 1;
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
                EvidenceKeptShare = ws.Color.EvidenceKeptShare,
                HeadingDeviationDeg = Math.Atan(Math.Abs(slope)) * 180 / Math.PI,
                ParallelDeviationPx = parallel,
                UnusedCandidates = unused,
            };
        }
    }

    private static bool Crosses(FrameWorkspace ws, int i, int j)
    {
        double top = Math.Max(ws.Search.CandidateTopY[i], ws.Search.CandidateTopY[j]);
        double yb = ws.Warp.BirdsEyeHeight - 1;
        double d0 = ws.Search.CandidateFits[i].Fit.At(yb) - ws.Search.CandidateFits[j].Fit.At(yb);
        double d1 = ws.Search.CandidateFits[i].Fit.At(top) - ws.Search.CandidateFits[j].Fit.At(top);
        return d0 * d1 < 0;
    }

    /// <summary>
    /// In the metric view of a camera file, how many lanes the nearest boundaries left and right of the camera's
    /// column span when that is more than one: 2 or 3 when their spacing at the bottom row is above the largest
    /// plausible lane width and splits into that many plausible widths (the count whose width is nearest the middle of
    /// the plausible range; 3 only with the camera inside the middle one), and they stay parallel; otherwise 0. In the
    /// vanishing-point trapezoid, whose widths are relative, only on a veiled road (<see cref="TrapezoidSpan"/>); always 0
    /// when fewer than four boundaries are reported.
    /// </summary>
    private int LanesSpanned(FrameWorkspace ws, int left, int right, double centre, double minW, double maxW)
    {
        double xl = Xb(ws, left), xr = Xb(ws, right), width = xr - xl;
        if (search.MaxLanes < 4 || xl >= centre || xr <= centre || !Parallel(ws, left, right))
        {
            return 0;
        }

        if (ws.Warp.MetresPerPixel <= 0)
        {
            return ws.Color.Veiled ? TrapezoidSpan(xl, xr, centre, minW) : 0;
        }

        if (width <= maxW)
        {
            return 0;
        }

        double typical = (minW + maxW) / 2;
        int best = 0;
        for (int k = 2; k <= 3; k++)
        {
            double w = width / k;
            bool fits = w >= minW && w <= maxW && (k == 2 || (xl + w <= centre && xr - w >= centre));
            if (fits && (best == 0 || Math.Abs(w - typical) < Math.Abs((width / best) - typical)))
            {
                best = k;
            }
        }

        return best;
    }

    /// <summary>
    /// In the vanishing-point trapezoid on a veiled road (<see cref="Pipeline.Workspace.ColorSection.Veiled"/>: a low sun ahead washes out
    /// the ego lane's dashes, while the outer lines, long or nearer the frame's edge, stay visible), whose lane widths are
    /// relative (no metric maximum to exceed), the hypothesis
    /// that the nearest pair left and right of the camera's column spans more than one lane: 3 when a third of their
    /// spacing is a plausible lane width and the camera's column lies in the middle third, else 2 when half of it is
    /// (the smallest plausible width, <see cref="LaneWidthLimits"/>, then keeps a single lane from being split); 0
    /// otherwise. It is only a hypothesis: <see cref="Assign"/> keeps it when the joint model finds an unseen boundary
    /// between them, else the usual reading stands.
    /// </summary>
    internal static int TrapezoidSpan(double xl, double xr, double centre, double minW)
    {
        double width = xr - xl;
        if (width / 3 >= minW && xl + (width / 3) <= centre && xr - (width / 3) >= centre)
        {
            return 3;
        }

        return width / 2 >= minW ? 2 : 0;
    }

    /// <summary>
    /// Whether the nearest boundary on one side, <paramref name="near"/>, lies more than one lane width (the spacing to
    /// its outer neighbour <paramref name="outer"/>, widened by <see cref="SearchOptions.WidthTolerance"/>) from the
    /// camera's column <paramref name="centre"/>: then it cannot bound the lane the camera is in.
    /// </summary>
    private bool OutwardsByOne(FrameWorkspace ws, int near, int outer, double centre)
    {
        double width = Math.Abs(Xb(ws, near) - Xb(ws, outer));
        return Math.Abs(Xb(ws, near) - centre) > (1 + search.WidthTolerance) * width;
    }

    private static double Xb(FrameWorkspace ws, int i) => ws.Search.CandidateFits[i].Fit.At(ws.Warp.BirdsEyeHeight - 1);

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
        double yb = ws.Warp.BirdsEyeHeight - 1;
        double top = Math.Max(ws.Search.CandidateTopY[a], ws.Search.CandidateTopY[b]);
        double w0 = Math.Abs(ws.Search.CandidateFits[a].Fit.At(yb) - ws.Search.CandidateFits[b].Fit.At(yb));
        double w1 = Math.Abs(ws.Search.CandidateFits[a].Fit.At(top) - ws.Search.CandidateFits[b].Fit.At(top));
        return Math.Abs(w1 - w0) <= search.WidthTolerance * w0;
    }

    private void Emit(FrameWorkspace ws, int candidate, int slot, bool allowed)
    {
        if (candidate < 0 || !allowed)
        {
            return;
        }

        LaneEstimate e = ws.Search.CandidateFits[candidate];
        int lane = ws.LaneCount;
        int points = LaneSampler.Sample(ws, fit, e.Fit, fit.ExtendToFarEdge ? 0 : ws.Search.CandidateTopY[candidate], ws.LanePoints[lane]);
        if (points < 2)
        {
            return;
        }

        ws.Lanes[lane] = e with { Slot = slot, PointCount = points, Kind = search.EstimateKind ? MarkingKind.Estimate(ws, candidate, e.Fit) : null };
        ws.LaneCandidate[lane] = candidate;
        ws.LaneCount = lane + 1;
    }
}
