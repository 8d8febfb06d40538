using LaneBaseline.Core.Options;
using LaneBaseline.Vision.Pipeline;
using LaneBaseline.Vision.Stages.Search;

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
/// otherwise moved along the trend of the previous centroids (dashed lines, curves); on a lit road the centroid is taken
/// over the cluster of the window's column profile nearest its predicted centre (<see cref="WindowSlider"/>);
/// (3) hypothesise-and-verify (RANSAC) over the window centroids: every line through two and every quadratic
/// through three centroids (a fixed-seed sample when there are many) is scored by the evidence mass of the
/// centroids within <see cref="FitOptions.InlierTolerancePx"/>; the best consensus set is refitted by weighted least
/// squares (weights = window mass) as x = A·y² + B·y + C, or a line when |A| exceeds <see cref="FitOptions.MaxCurvature"/>;
/// (4) confidence = min(1, inlier mass / <see cref="ConfidenceOptions.FullSupportMass"/>) ·
/// min(1, coverage / <see cref="ConfidenceOptions.FullCoverage"/>) · exp(−rms / <see cref="ConfidenceOptions.ResidualScalePx"/>);
/// (5) duplicates (mean separation below half <see cref="SearchOptions.MinSeparationPx"/>) keep the higher score; of two
/// candidates closer than the smallest plausible lane width, one whose near half is extrapolated (at most one inlier
/// window there) is dropped when the other is measured there (two or more);
/// (6) slots: the nearest boundary left and right of the vehicle centre are −1 and +1 when their spacing is a
/// plausible lane width; the next boundaries out are −2 and +2 (then −3 and +3 when search.maxLanes allows) when
/// their spacing matches the ego lane within
/// <see cref="SearchOptions.WidthTolerance"/>; every pair must also stay parallel (spacing at the far end of their
/// common support within the same tolerance of the spacing at the bottom); (7) each lane is sampled every <see cref="FitOptions.PointSpacingPx"/>
/// image rows from the bottom row up to its farthest supported window (or the far edge of the warped area, see
/// <see cref="FitOptions.ExtendToFarEdge"/>) and mapped back with the inverse homography; points outside the frame are
/// dropped (the longest run inside is kept); (8) the far end is continued along its image tangent towards the horizon
/// over <see cref="FitOptions.HorizonExtensionFraction"/> of the remaining rows.
/// With <see cref="FitOptions.JointModel"/>, between (6) and (7) the chosen boundaries are fitted jointly as
/// x_i = A·y² + B·y + C_i (shared heading and curvature on the ground) by RANSAC over all their window centroids [1]; a
/// boundary the joint curve does not explain is dropped, and a missing boundary next to the kept ones is searched along
/// the joint curve at the offset their spacing predicts (<see cref="JointBoundaryModel"/>); a kept boundary whose own
/// curvature departs from the joint one and from every other boundary's, while another boundary confirms the joint
/// curvature, is refitted from its joint inliers with the joint curvature and its own heading and offset, so
/// centroids outside the consensus set (a far end pulled towards lights at the horizon) do not bend it [1]; with three or
/// more boundaries, the boundaries' headings are fitted as a fan (heading linear in position, as a slightly wrong horizon
/// makes parallel lines; RANSAC over pairs [1]) and a boundary whose reported curve leaves its fan curve where it has no
/// windows of its own (or is far-only and tilted against the fan) is reported on the fan curve. Each
/// candidate also measures its fan-out in the bird's-eye view (direction between the bird's-eye vertical and the ray from the camera's
/// ground point, where image-vertical reflection streaks go), optionally lowering its raw confidence
/// (<see cref="FitOptions.FanOutPenalty"/>) and always available to the calibration.
/// <para>References: [1] M. A. Fischler, R. C. Bolles, "Random Sample Consensus: A Paradigm for Model Fitting with
/// Applications to Image Analysis and Automated Cartography", Communications of the ACM 24(6):381–395, 1981,
/// DOI 10.1145/358669.358692. [2] J. Matas, C. Galambos, J. Kittler, CVIU 78(1):119–137, 2000 (Hough seeds).</para>
/// <para>The steps live in <c>Stages/Search</c>: <see cref="SeedFinder"/> (1), <see cref="WindowSlider"/> (2),
/// <see cref="CandidateFitter"/> (3, 4), <see cref="SlotAssigner"/> (5–7), <see cref="JointBoundaryModel"/> and
/// <see cref="MarkingKind"/>; step (8) is
/// <see cref="LaneSampler"/>.</para>
/// </remarks>
public sealed class SlidingWindowFitStage : IFrameStage
{
    private readonly SeedFinder seeds;
    private readonly WindowSlider slider;
    private readonly CandidateFitter fitter;
    private readonly SlotAssigner slots;

    /// <summary>Creates the stage.</summary>
    public SlidingWindowFitStage(SearchOptions search, FitOptions fit, ConfidenceOptions confidence)
    {
        seeds = new SeedFinder(search);
        slider = new WindowSlider(search);
        fitter = new CandidateFitter(search, fit, confidence);
        slots = new SlotAssigner(search, fit, confidence);
    }

    /// <inheritdoc />
    public string Name => "search";

    /// <inheritdoc />
    public void Process(FrameWorkspace workspace)
    {
        ArgumentNullException.ThrowIfNull(workspace);
        seeds.Find(workspace);
        int n = workspace.Search.CandidateCount;
        for (int i = 0; i < n; i++)
        {
            slider.Slide(workspace, i);
            fitter.Fit(workspace, i);
        }

        slots.Assign(workspace);
    }

    /// <inheritdoc />
    public void Dispose()
    {
    }
}
