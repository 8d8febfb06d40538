using LaneBaseline.Core.Results;
using LaneBaseline.Vision.Pipeline;

namespace LaneBaseline.Vision.Stages.Search;

/// <summary>The extrapolation guard of the joint model: a curvature that a boundary's own windows do not pin is not extrapolated.</summary>
internal sealed partial class JointBoundaryModel
{
    /// <summary>
    /// Keeps a boundary whose own curvature its windows do not determine from being extrapolated with it (after
    /// <see cref="GuardHeadings"/>, with own curves reported). A quadratic through a few windows, or through windows over a
    /// short run of rows, has a curvature that the windows hardly constrain; reported from the bottom row to the far end,
    /// that curvature moves the ends of the lane by many pixels where the boundary has no evidence (a dash under a
    /// reflection streak, a near half without paint). A kept boundary is refitted with the joint curvature A and its own
    /// heading and offset (<see cref="TryFixedCurvature"/> over its own inliers) when all of these hold:
    /// <list type="number">
    /// <item>its own curvature departs from the joint curvature, and from every other kept boundary's own curvature, by
    /// more than the tolerance as a sagitta over all bird's-eye rows H, |ΔA|·H²/4 (the rows it is reported over);</item>
    /// <item>another kept boundary confirms the joint curvature (its own A within that sagitta of the joint A) and is at
    /// least as well measured: its windows span at least as many rows and its raw confidence is at least as high;</item>
    /// <item>the refit explains every window the boundary's own fit took (all within the tolerance): the windows do not
    /// prefer the own curvature, so the simpler model with the shared curvature is kept, as a consensus model is kept
    /// in RANSAC (Fischler &amp; Bolles 1981);</item>
    /// <item>the refit leaves the reported curve by more than the tolerance somewhere on the rows.</item>
    /// </list>
    /// Support, coverage, RMS, raw confidence and fan-out are recomputed for the new curve (<see cref="Rescore"/>). The
    /// heading stays the boundary's own, measured with the shared curvature (the per-frame bird's-eye view is not exactly
    /// metric and real boundaries fan slightly, see <see cref="GuardHeadings"/>).
    /// </summary>
    public void GuardExtrapolation(FrameWorkspace frame, Span<int> chosen)
    {
        if (!shapeValid || fit.JointRefit)
        {
            return;
        }

        double tol = fit.InlierTolerancePx, scale = frame.Warp.BirdsEyeHeight, full = scale * scale / 4;
        int lanes = 0, points = 0;
        for (int s = 0; s < chosen.Length; s++)
        {
            laneOfSlot[s] = -1;
            if (chosen[s] < 0 || !double.IsFinite(offsets[s]))
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
                    points++;
                }
            }

            start[++lanes] = points;
        }

        if (lanes < 2)
        {
            return;
        }

        for (int s = 0; s < chosen.Length; s++)
        {
            if (laneOfSlot[s] < 0)
            {
                continue;
            }

            int g = laneOfSlot[s];
            LaneEstimate own = frame.Search.CandidateFits[chosen[s]];
            if (Math.Abs(own.Fit.A - shapeA) * full <= tol || !UnlikeOthersJointConfirmed(frame, chosen, s, full, tol)
                || !TryFixedCurvature(g, shapeA, ownInlier, tol, scale, out Quadratic curve))
            {
                continue;
            }

            bool explains = true;
            for (int p = start[g]; p < start[g + 1] && explains; p++)
            {
                explains = !ownInlier[p] || Math.Abs(curve.At(ys[p]) - xs[p]) <= tol;
            }

            double depart = 0;
            const int Rows = 32;
            for (int r = 0; r <= Rows; r++)
            {
                double y = (scale - 1) * r / Rows;
                depart = Math.Max(depart, Math.Abs(own.Fit.At(y) - curve.At(y)));
            }

            if (explains && depart > tol)
            {
                Rescore(frame, chosen[s], g, curve, tol);
            }
        }
    }

    /// <summary>
    /// Whether the boundary in <paramref name="slot"/> bends unlike every other kept boundary (sagitta over all rows,
    /// <paramref name="full"/> = H²/4, above the tolerance) while another kept boundary, spanning at least as many rows
    /// and at least as confident, agrees with the joint curvature.
    /// </summary>
    private bool UnlikeOthersJointConfirmed(FrameWorkspace frame, Span<int> chosen, int slot, double full, double tol)
    {
        LaneEstimate own = frame.Search.CandidateFits[chosen[slot]];
        double span = Span(laneOfSlot[slot]);
        bool confirmed = false;
        for (int o = 0; o < chosen.Length; o++)
        {
            if (o == slot || laneOfSlot[o] < 0)
            {
                continue;
            }

            LaneEstimate other = frame.Search.CandidateFits[chosen[o]];
            if (Math.Abs(own.Fit.A - other.Fit.A) * full <= tol)
            {
                return false;
            }

            confirmed |= Math.Abs(other.Fit.A - shapeA) * full <= tol && Span(laneOfSlot[o]) >= span && other.Score >= own.Score;
        }

        return confirmed;
    }
}
