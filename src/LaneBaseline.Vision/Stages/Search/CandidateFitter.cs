using LaneBaseline.Core.Geometry;
using LaneBaseline.Core.Options;
using LaneBaseline.Core.Random;
using LaneBaseline.Core.Results;
using LaneBaseline.Vision.Pipeline;

namespace LaneBaseline.Vision.Stages.Search;

/// <summary>
/// Steps (3) and (4) of the <c>search</c> stage: RANSAC over one candidate's window centroids (Fischler &amp; Bolles
/// 1981), a weighted least-squares refit of the consensus set, and the raw confidence
/// support · coverage · exp(−rms / scale).
/// </summary>
internal sealed class CandidateFitter
{
    private const int MaxHypotheses = 400;
    private readonly SearchOptions search;
    private readonly FitOptions fit;
    private readonly ConfidenceOptions confidence;

    /// <summary>Creates the candidate fitter.</summary>
    public CandidateFitter(SearchOptions search, FitOptions fit, ConfidenceOptions confidence)
    {
        this.search = search;
        this.fit = fit;
        this.confidence = confidence;
    }

    /// <summary>Fits one candidate's window centroids and scores it (an empty estimate when too few windows agree).</summary>
    public void Fit(FrameWorkspace ws, int candidate)
    {
        SearchWindow[] windows = ws.Search.CandidateWindows[candidate];
        int n = ws.Search.WindowCount;
        double[] xs = ws.Search.FitX, ys = ws.Search.FitY, wts = ws.Search.FitW;
        bool[] use = ws.Search.FitUse, best = ws.Search.FitBest;
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

        ws.Search.CandidateFits[candidate] = default;
        if (m < fit.MinInlierWindows)
        {
            return;
        }

        double scale = ws.Warp.BirdsEyeHeight;
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
        double fanOut = FanOut(ws, current, Math.Max(0, topY));
        if (double.IsFinite(fanOut))
        {
            score *= 1 - (fit.FanOutPenalty * fanOut);
        }

        ws.Search.CandidateFits[candidate] = new LaneEstimate(0, score, current, inlierMass, coverage, rms, 0, FanOut: fanOut);
        ws.Search.CandidateTopY[candidate] = Math.Max(0, topY);
    }

    /// <summary>
    /// Fan-out of a fit in the bird's-eye view (see <see cref="LaneEstimate.FanOut"/>): image-vertical streaks (lamp
    /// and headlight reflections on a wet road) map to rays from the image of the point at infinity straight down,
    /// the camera's ground point, while painted boundaries run parallel to the bird's-eye vertical. The fit's mean
    /// slope between the bottom row and its top window is placed between the vertical (0) and the ray from that point
    /// through its bottom end (1); NaN when the two directions differ by less than 0.05 (near the camera's column) or
    /// the fit spans less than a fifth of the rows.
    /// </summary>
    internal static double FanOut(FrameWorkspace ws, Quadratic curve, double topY)
    {
        PlaneHomography h = ws.Region.ImageToBirdsEye;
        double yb = ws.Warp.BirdsEyeHeight - 1;
        if (Math.Abs(h.M21) < 1e-12 || yb - topY < 0.2 * ws.Warp.BirdsEyeHeight)
        {
            return double.NaN;
        }

        double fx = h.M01 / h.M21, fy = h.M11 / h.M21;
        double xb = curve.At(yb);
        if (Math.Abs(yb - fy) < 1)
        {
            return double.NaN;
        }

        double rayslope = (xb - fx) / (yb - fy);
        double slope = (curve.At(topY) - xb) / (topY - yb);
        return Math.Abs(rayslope) < 0.05 ? double.NaN : Math.Clamp(slope / rayslope, 0, 1);
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
}
