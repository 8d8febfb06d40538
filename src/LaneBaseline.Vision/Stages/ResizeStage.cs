using LaneBaseline.Vision.Pipeline;
using OpenCvSharp;

namespace LaneBaseline.Vision.Stages;

/// <summary>
/// Enlarges a frame narrower than <c>limits.workingWidthPx</c> to the working size (bilinear, aspect kept) so the
/// other stages, whose pixel settings were set on 1280-wide frames, see the scale they expect. Present only when the
/// frame is narrower; the lanes are scaled back by <see cref="FrameWorkspace.Scale"/> when they are read.
/// </summary>
/// <remarks>Owns the enlarged copy (one buffer, reused for every frame) and points the workspace's frame at it.</remarks>
public sealed class ResizeStage : IFrameStage
{
    private readonly Mat enlarged = new();

    /// <inheritdoc />
    public string Name => "resize";

    /// <inheritdoc />
    public void Process(FrameWorkspace workspace)
    {
        ArgumentNullException.ThrowIfNull(workspace);
        Cv2.Resize(workspace.Frame, enlarged, new Size(workspace.Width, workspace.Height), 0, 0, InterpolationFlags.Linear);
        workspace.Frame = enlarged;
    }

    /// <inheritdoc />
    public void Dispose() => enlarged.Dispose();
}
