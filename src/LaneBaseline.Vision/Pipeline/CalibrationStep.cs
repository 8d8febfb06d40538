using LaneBaseline.Core.Calibration;
using LaneBaseline.Core.Options;
using LaneBaseline.Core.Results;

namespace LaneBaseline.Vision.Pipeline;

/// <summary>
/// Replaces each lane's raw confidence by its calibrated probability of being a true positive at IoU 0.50
/// (<see cref="LaneCalibration"/>) and drops lanes whose probability is below <c>confidence.minScore</c>, so an
/// ambiguous frame reports fewer lanes. Runs after the search and before the tracker, which therefore filters and
/// coasts calibrated scores. Only built when the preset has a <c>calibration</c> section.
/// </summary>
public sealed class CalibrationStep : IFrameStage
{
    private readonly LaneCalibration calibration;
    private readonly double minScore;

    /// <summary>Creates the step from a validated calibration.</summary>
    public CalibrationStep(CalibrationOptions calibration, double minScore)
    {
        this.calibration = new LaneCalibration(calibration);
        this.minScore = minScore;
    }

    /// <inheritdoc />
    public string Name => "calibrate";

    /// <inheritdoc />
    public void Process(FrameWorkspace workspace)
    {
        ArgumentNullException.ThrowIfNull(workspace);
        int kept = 0;
        for (int i = 0; i < workspace.LaneCount; i++)
        {
            LaneEstimate lane = workspace.Lanes[i];
            double p = calibration.Probability(lane);
            if (p < minScore)
            {
                continue;
            }

            if (kept != i)
            {
                // Swap the point buffers so every buffer stays owned by the workspace (no allocation).
                (workspace.LanePoints[kept], workspace.LanePoints[i]) = (workspace.LanePoints[i], workspace.LanePoints[kept]);
                workspace.LaneCandidate[kept] = workspace.LaneCandidate[i];
            }

            workspace.Lanes[kept++] = lane with { Score = p };
        }

        workspace.LaneCount = kept;
    }

    /// <inheritdoc />
    public void Dispose()
    {
    }
}
