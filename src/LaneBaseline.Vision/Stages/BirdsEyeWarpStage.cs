using LaneBaseline.Vision.Pipeline;
using OpenCvSharp;

namespace LaneBaseline.Vision.Stages;

/// <summary>Warps the binary evidence (not the colour frame) to the bird's-eye rectangle with the region's homography.</summary>
/// <remarks>
/// Steps: (1) <c>WarpPerspective</c> of <see cref="Pipeline.Workspace.ColorSection.Evidence"/> with the 3×3 homography from
/// <see cref="RegionStage"/>, bilinear, zero border, into the <see cref="Pipeline.Workspace.WarpSection.BirdsEye"/> buffer of
/// warp.widthPx × warp.heightPx pixels. Only the output pixels are computed, so the cost follows the bird's-eye
/// size, not the frame size. Bird's-eye pixel (x, y), y down; the bottom row is the frame's bottom row.
/// <para>References: [1] R. Hartley, A. Zisserman, Multiple View Geometry in Computer Vision, 2nd ed., 2004,
/// Sec. 2.3 (projective transformations).</para>
/// </remarks>
public sealed class BirdsEyeWarpStage : IFrameStage
{
    /// <inheritdoc />
    public string Name => "warp";

    /// <inheritdoc />
    public void Process(FrameWorkspace workspace)
    {
        ArgumentNullException.ThrowIfNull(workspace);
        Cv2.WarpPerspective(
            workspace.Color.Evidence,
            workspace.Warp.BirdsEye,
            workspace.Region.HomographyMat,
            new Size(workspace.Warp.BirdsEyeWidth, workspace.Warp.BirdsEyeHeight),
            InterpolationFlags.Linear,
            BorderTypes.Constant,
            Scalar.All(0));
    }

    /// <inheritdoc />
    public void Dispose()
    {
    }
}
