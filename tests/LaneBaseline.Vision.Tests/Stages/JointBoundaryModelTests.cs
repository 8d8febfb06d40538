using LaneBaseline.Core.Options;
using LaneBaseline.Core.Results;
using LaneBaseline.Vision.Pipeline;
using LaneBaseline.Vision.Stages.Search;
using OpenCvSharp;
using Xunit;

namespace LaneBaseline.Vision.Tests.Stages;

/// <summary>
/// The joint multi-boundary model on constructed window centroids (bird's-eye 480x480, 16 windows of 30 rows).
/// Source: RANSAC consensus (Fischler &amp; Bolles, CACM 24(6), 1981): the hypothesis explaining the most evidence wins
/// and points outside the inlier distance do not influence the refit; the shared-shape model x_i = A·y² + B·y + C_i.
/// </summary>
public sealed class JointBoundaryModelTests
{
    private const double A = 1e-4, B = -0.1;

    private static double Road(double y, double c) => (A * y * y) + (B * y) + c;

    private static FrameWorkspace Workspace()
    {
        FrameWorkspace ws = new(640, 360, 480, 480, 100, 64, 0.5);
        ws.Search.WindowCount = 16;
        return ws;
    }

    private static void SetCandidate(FrameWorkspace ws, int candidate, Func<double, double> x)
        => SetCandidate(ws, candidate, x, 0, 16);

    /// <summary>A candidate with windows k = <paramref name="first"/> .. <paramref name="last"/> − 1 only (k = 0 nearest).</summary>
    private static void SetCandidate(FrameWorkspace ws, int candidate, Func<double, double> x, int first, int last)
    {
        for (int k = 0; k < 16; k++)
        {
            double y = 480 - (30 * k) - 15;
            bool has = k >= first && k < last;
            ws.Search.CandidateWindows[candidate][k] = new SearchWindow(x(y), y, has ? 20 : 0, 0, (int)(y - 15), 1, (int)(y + 15), has);
        }

        // Its own fit: the weighted least-squares quadratic of its windows (what the candidate fitter reports).
        SearchWindow[] present = [.. ws.Search.CandidateWindows[candidate].Take(16).Where(w => w.Mass > 0)];
        double[] xs = [.. present.Select(w => w.X)];
        double[] ys = [.. present.Select(w => w.Y)];
        double[] wts = [.. present.Select(w => w.Mass)];
        Assert.True(Core.Geometry.QuadraticFit.TryFit(xs, ys, wts, default, 480, out Quadratic own));
        ws.Search.CandidateFits[candidate] = new LaneEstimate(0, 0.9, own, 20 * present.Length, present.Length / 16.0, 1, 0);
    }

    [Fact]
    public void AnOutlierBoundary_IsDropped_AndTheOthersKeepTheSharedShape()
    {
        using FrameWorkspace ws = Workspace();
        SetCandidate(ws, 0, y => Road(y, 200));
        SetCandidate(ws, 1, y => Road(y, 320));
        SetCandidate(ws, 2, y => 420 + (0.4 * (479 - y))); // fans out: a streak, not a boundary of this road
        int[] chosen = [-1, -1, 0, 1, 2, -1];
        new JointBoundaryModel(new SearchOptions(), new FitOptions { JointRefit = true }, new ConfidenceOptions()).Refine(ws, chosen);
        Assert.Equal(new[] { -1, -1, 0, 1, -1, -1 }, chosen);
        Assert.Equal(A, ws.Search.CandidateFits[0].Fit.A, 9);
        Assert.Equal(B, ws.Search.CandidateFits[1].Fit.B, 6);
        Assert.Equal(200, ws.Search.CandidateFits[0].Fit.C, 4);
        Assert.Equal(320, ws.Search.CandidateFits[1].Fit.C, 4);
        Assert.Equal(1, ws.Search.CandidateFits[1].JointShare, 9);
    }

    /// <summary>Three boundaries on the road's curve, the middle one's four far windows pulled 25 px sideways (its own fit bent).</summary>
    private static FrameWorkspace BentMiddleBoundary()
    {
        FrameWorkspace ws = Workspace();
        SetCandidate(ws, 0, y => Road(y, 200));
        SetCandidate(ws, 1, y => Road(y, 320) + (y < 120 ? 25 : 0));
        SetCandidate(ws, 2, y => Road(y, 440));
        double bentBefore = Math.Abs(ws.Search.CandidateFits[1].Fit.At(15) - Road(15, 320));
        if (bentBefore <= 5)
        {
            ws.Dispose(); // the caller never receives it
            Assert.Fail($"the constructed own fit should be bent ({bentBefore:0.0} px)");
        }

        return ws;
    }

    [Fact]
    public void ABentBoundary_IsStraightenedByTheOthers()
    {
        // Boundary 1's four far windows are pulled 25 px sideways (a reflection beside a faded far end): its own
        // least-squares fit bends towards them; the joint consensus ignores them and restores the road's shape.
        using FrameWorkspace ws = BentMiddleBoundary();
        int[] chosen = [-1, -1, 0, 1, 2, -1];
        new JointBoundaryModel(new SearchOptions(), new FitOptions { JointRefit = true }, new ConfidenceOptions()).Refine(ws, chosen);
        Assert.Equal(new[] { -1, -1, 0, 1, 2, -1 }, chosen);
        Assert.Equal(Road(15, 320), ws.Search.CandidateFits[1].Fit.At(15), 6);
        Assert.Equal(0.75, ws.Search.CandidateFits[1].JointShare, 9); // 12 of its 16 windows
    }

    [Fact]
    public void ABentBoundary_ReportedWithItsOwnCurve_TakesTheSharedCurvatureFromItsJointInliers()
    {
        // Own curves reported (the default): boundary 1's far windows are pulled 25 px sideways (a light near the
        // horizon beside its far end), its own fit bends towards them, the other two agree on the road's curvature.
        // Source: RANSAC (Fischler & Bolles 1981) — the model comes from the consensus set; the far windows are
        // outliers of the joint curve and must not bend the reported curve, which takes the joint curvature with its
        // own heading and offset fitted to its 12 joint inliers (the constructed road exactly).
        using FrameWorkspace ws = BentMiddleBoundary();
        int[] chosen = [-1, -1, 0, 1, 2, -1];
        new JointBoundaryModel(new SearchOptions(), new FitOptions(), new ConfidenceOptions()).Refine(ws, chosen);
        Assert.Equal(new[] { -1, -1, 0, 1, 2, -1 }, chosen);
        LaneEstimate bent = ws.Search.CandidateFits[1];
        Assert.Equal(A, bent.Fit.A, 9);
        Assert.Equal(Road(15, 320), bent.Fit.At(15), 6);
        Assert.Equal(Road(479, 320), bent.Fit.At(479), 6);
        Assert.Equal(12 * 20, bent.InlierMass, 9); // support recomputed: the four pulled windows no longer count
        Assert.Equal(12.0 / 16, bent.Coverage, 9);
    }

    [Fact]
    public void ABoundaryThatOnlyFansOut_KeepsItsOwnCurve()
    {
        // Same curvature as the others, a different heading (the per-frame bird's-eye view is not exactly metric, so
        // real boundaries fan slightly): its far windows leave the joint curve, yet its own curve is reported as it was.
        // Source: constructed case of the shared-shape model (the guard acts on curvature, not on heading).
        using FrameWorkspace ws = Workspace();
        SetCandidate(ws, 0, y => Road(y, 200));
        SetCandidate(ws, 1, y => Road(y, 320));
        SetCandidate(ws, 2, y => Road(y, 440) + (0.05 * (479 - y)));
        LaneEstimate before = ws.Search.CandidateFits[2];
        int[] chosen = [-1, -1, 0, 1, 2, -1];
        new JointBoundaryModel(new SearchOptions(), new FitOptions(), new ConfidenceOptions()).Refine(ws, chosen);
        Assert.Equal(2, chosen[4]);
        Assert.True(ws.Search.CandidateFits[2].JointShare < 1, $"its far windows should be off the joint curve (share {ws.Search.CandidateFits[2].JointShare})");
        Assert.Equal(before.Fit, ws.Search.CandidateFits[2].Fit);
        Assert.Equal(before.InlierMass, ws.Search.CandidateFits[2].InlierMass);
    }

    [Fact]
    public void ALoneBoundary_IsLeftAlone()
    {
        // Source: common practice (a shared model needs at least two members).
        using FrameWorkspace ws = Workspace();
        SetCandidate(ws, 0, y => 420 + (0.4 * (479 - y)));
        LaneEstimate before = ws.Search.CandidateFits[0];
        int[] chosen = [-1, -1, 0, -1, -1, -1];
        new JointBoundaryModel(new SearchOptions(), new FitOptions { JointRefit = true }, new ConfidenceOptions()).Refine(ws, chosen);
        Assert.Equal(0, chosen[2]);
        Assert.Equal(before, ws.Search.CandidateFits[0]);
    }

    [Fact]
    public void AFaintDashedBoundary_IsFoundAlongTheJointCurve()
    {
        // Two dashes of a third boundary (one lane width, 120 px, right of +1), too few windows for a fit of its own:
        // the model-guided search follows the shared shape at the predicted offset and finds it; on the left, where
        // the road has no further paint, nothing is added. Source: constructed case of the shared-shape model.
        using FrameWorkspace ws = Workspace();
        ws.Warp.BirdsEye.SetTo(Scalar.All(0));
        SetCandidate(ws, 0, y => Road(y, 200));
        SetCandidate(ws, 1, y => Road(y, 320));
        ws.Search.CandidateCount = 2;
        foreach ((int y0, int y1) in new[] { (400, 470), (250, 300) })
        {
            for (int y = y0; y < y1; y++)
            {
                double x = Road(y, 443);
                Cv2.Line(ws.Warp.BirdsEye, new Point((int)Math.Round(x) - 2, y), new Point((int)Math.Round(x) + 2, y), Scalar.All(255));
            }
        }

        int[] chosen = [-1, -1, 0, 1, -1, -1];
        var model = new JointBoundaryModel(new SearchOptions(), new FitOptions(), new ConfidenceOptions());
        model.Refine(ws, chosen);
        model.Recover(ws, chosen, 4);
        Assert.Equal(new[] { -1, -1, 0, 1, 2, -1 }, chosen);
        Assert.Equal(3, ws.Search.CandidateCount);
        Assert.Equal(443, ws.Search.CandidateFits[2].Fit.C, 0);
        Assert.Equal(A, ws.Search.CandidateFits[2].Fit.A, 9);
    }

    // Straight boundaries that fan as under a slightly wrong horizon: heading B = K·(X − 240) at the middle row X.
    private const double K = 1e-4;

    private static double Fanned(double y, double x) => x + (K * (x - 240) * (y - 240));

    private static JointBoundaryModel RunAll(FrameWorkspace ws, int[] chosen)
    {
        ws.Warp.BirdsEye.SetTo(Scalar.All(0));
        ws.Search.CandidateCount = 3;
        var model = new JointBoundaryModel(new SearchOptions(), new FitOptions(), new ConfidenceOptions());
        model.Refine(ws, chosen);
        model.Recover(ws, chosen, 4);
        model.GuardHeadings(ws, chosen);
        return model;
    }

    [Fact]
    public void ATiltedFarOnlyBoundary_AmongFanningOnes_TakesTheFansHeading()
    {
        // −1 and +2 run the whole height on a fan (heading linear in position, as a wrong horizon makes parallel lines
        // in the bird's-eye view); +1 has windows only in the far half and is tilted 0.03 px/px against the fan.
        // Source: RANSAC (Fischler & Bolles 1981) — the fan is the hypothesis the other boundaries confirm; the linear
        // fan of headings is the first-order effect of a perspective error x → x / (1 + e·y) of the ground homography
        // (common practice). Reported on the fan, +1 gets the heading K·(280 − 240) at its own offset.
        using FrameWorkspace ws = Workspace();
        SetCandidate(ws, 0, y => Fanned(y, 160));
        SetCandidate(ws, 1, y => Fanned(y, 280) + (0.03 * (y - 120)), 8, 16);
        SetCandidate(ws, 2, y => Fanned(y, 400));
        double tiltedBefore = ws.Search.CandidateFits[1].Fit.B;
        Assert.Equal(K * 40, tiltedBefore - 0.03, 6); // the constructed own fit is tilted
        int[] chosen = [-1, -1, 0, 1, 2, -1];
        RunAll(ws, chosen);
        Assert.Equal(new[] { -1, -1, 0, 1, 2, -1 }, chosen);
        LaneEstimate tilted = ws.Search.CandidateFits[1];
        // Its curve takes the joint curvature (which absorbs part of the fan here), so compare the heading at the middle
        // row and the positions at the bottom and top rows with the fanned line, within the inlier tolerance (4 px).
        Assert.Equal(K * 40, (2 * tilted.Fit.A * 240) + tilted.Fit.B, 3);
        Assert.InRange(tilted.Fit.At(465) - Fanned(465, 280), -4, 4); // the own fit was 10 px off here
        Assert.InRange(tilted.Fit.At(15) - Fanned(15, 280), -4, 4);
        Assert.Equal(K * -80, ws.Search.CandidateFits[0].Fit.B, 6); // the others keep their own curves
        Assert.Equal(K * 160, ws.Search.CandidateFits[2].Fit.B, 6);
    }

    [Fact]
    public void ATiltedBoundary_WhoseNearWindowsSetItsHeading_IsLeftAlone()
    {
        // The same tilt (0.025 px/px), but +1's windows cover the near rows (k = 0..9, more than half the height): the
        // near part of the bird's-eye view is the better measured, so its own heading stands.
        // Source: constructed case of the fan model (near windows decide; the guard acts on unmeasured parts only).
        using FrameWorkspace ws = Workspace();
        SetCandidate(ws, 0, y => Fanned(y, 160));
        SetCandidate(ws, 1, y => Fanned(y, 280) + (0.025 * (y - 330)), 0, 10);
        SetCandidate(ws, 2, y => Fanned(y, 400));
        LaneEstimate before = ws.Search.CandidateFits[1];
        int[] chosen = [-1, -1, 0, 1, 2, -1];
        RunAll(ws, chosen);
        Assert.Equal(1, chosen[3]);
        Assert.Equal(before.Fit, ws.Search.CandidateFits[1].Fit);
        Assert.Equal(before.InlierMass, ws.Search.CandidateFits[1].InlierMass);
    }
    [Fact]
    public void ABoundaryWithoutNearWindows_ThatTheFanExplains_TakesTheFansHeading()
    {
        // +1 has windows over rows 15..315 (k = 5..15) of 480, none in the near third, tilted 0.02 px/px against the
        // fan: every window lies within the inlier tolerance (4 px) of its fan curve, yet its own line is 6 px off at
        // the bottom row. −1 and +2, measured in the near third, confirm the fan. Both curves explain the windows, so the
        // consensus model (the fan the near-measured boundaries confirm) is kept and the unmeasured near part follows it.
        // Source: RANSAC (Fischler & Bolles 1981), the model of the consensus set; fan of headings as in the test above
        // (common practice for a small perspective error of the ground homography).
        using FrameWorkspace ws = Workspace();
        SetCandidate(ws, 0, y => Fanned(y, 160));
        SetCandidate(ws, 1, y => Fanned(y, 280) + (0.02 * (y - 165)), 5, 16);
        SetCandidate(ws, 2, y => Fanned(y, 400));
        Assert.True(Math.Abs(ws.Search.CandidateFits[1].Fit.At(465) - Fanned(465, 280)) > 5); // the own line is off
        int[] chosen = [-1, -1, 0, 1, 2, -1];
        RunAll(ws, chosen);
        Assert.Equal(new[] { -1, -1, 0, 1, 2, -1 }, chosen);
        LaneEstimate fixedOne = ws.Search.CandidateFits[1];
        Assert.InRange(fixedOne.Fit.At(465) - Fanned(465, 280), -2.5, 2.5);
        Assert.Equal(K * 40, (2 * fixedOne.Fit.A * 240) + fixedOne.Fit.B, 3);
        Assert.Equal(K * -80, ws.Search.CandidateFits[0].Fit.B, 6); // the others keep their own curves
        Assert.Equal(K * 160, ws.Search.CandidateFits[2].Fit.B, 6);
    }

    private static void RunWithExtrapolationGuard(FrameWorkspace ws, int[] chosen)
    {
        JointBoundaryModel model = RunAll(ws, chosen);
        model.GuardExtrapolation(ws, chosen);
    }

    [Fact]
    public void AFarOnlyBoundary_WhoseWindowsDoNotPinItsCurvature_IsExtrapolatedWithTheSharedCurvature()
    {
        // Two boundaries (the fan needs three): −1 on the road's curve over all 16 windows; +1 with three far windows
        // only (k = 9..11), the middle one 3 px off the road (inside the 4 px inlier tolerance). The exact quadratic
        // through three windows 30 rows apart bends by the second difference, ΔA = −2·3 / (2·30²), so its own curve
        // ends hundreds of pixels off at the bottom row, while the shared curvature explains the same three windows.
        // Source: RANSAC (Fischler & Bolles 1981) — the model of the consensus set is kept; three points fix a
        // quadratic exactly, so their curvature is not measured (common practice: second difference of equally spaced
        // samples). With the shared curvature and its own line fit, the symmetric 3 px bump moves the offset by its mean
        // (1 px) and leaves the heading: +1 ends 1 px from the road at the bottom row.
        using FrameWorkspace ws = Workspace();
        SetCandidate(ws, 0, y => Road(y, 200));
        SetCandidate(ws, 1, y => Road(y, 320) + (Math.Abs(y - 165) < 1 ? 3 : 0), 9, 12);
        Assert.Equal(A - (3.0 / 900), ws.Search.CandidateFits[1].Fit.A, 9);
        Assert.True(Math.Abs(ws.Search.CandidateFits[1].Fit.At(479) - Road(479, 320)) > 100, "the constructed own fit should run off at the bottom row");
        int[] chosen = [-1, -1, 0, 1, -1, -1];
        RunWithExtrapolationGuard(ws, chosen);
        Assert.Equal(0, chosen[2]);
        Assert.Equal(1, chosen[3]);
        LaneEstimate far = ws.Search.CandidateFits[1];
        Assert.Equal(A, far.Fit.A, 6);
        Assert.InRange(far.Fit.At(479) - Road(479, 320), 0, 2);
        Assert.InRange(far.Fit.At(135) - Road(135, 320), 0, 2);
        Assert.Equal(3 * 20, far.InlierMass, 9); // its three windows still support it
    }

    [Fact]
    public void ABoundaryWhoseWindowsPinAnotherCurvature_KeepsItsOwnCurve()
    {
        // +1 curves more than −1 (A + 3e-4) over all 16 windows: over its 450 rows the difference is a sagitta of
        // 3e-4 · 450² / 4 ≈ 15 px, more than the inlier tolerance, so the shared curvature does not explain its windows
        // and its own curve stands. Source: constructed case (the guard acts only where the windows leave the curvature
        // free; consensus of RANSAC, Fischler & Bolles 1981).
        using FrameWorkspace ws = Workspace();
        SetCandidate(ws, 0, y => Road(y, 200));
        SetCandidate(ws, 1, y => Road(y, 320) + (3e-4 * (y - 240) * (y - 240)));
        LaneEstimate before = ws.Search.CandidateFits[1];
        int[] chosen = [-1, -1, 0, 1, -1, -1];
        RunWithExtrapolationGuard(ws, chosen);
        Assert.Equal(1, chosen[3]);
        Assert.Equal(before.Fit, ws.Search.CandidateFits[1].Fit);
    }
}
