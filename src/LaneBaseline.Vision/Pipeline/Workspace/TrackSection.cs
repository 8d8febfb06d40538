namespace LaneBaseline.Vision.Pipeline.Workspace;

/// <summary>What the temporal tracker hands to the next frame's search: predicted bird's-eye bottom positions.</summary>
public sealed class TrackSection
{
    internal TrackSection()
    {
    }

    /// <summary>Bird's-eye bottom positions predicted by the tracker for this frame's search.</summary>
    internal double[] PriorSeedX { get; } = new double[FrameWorkspace.MaxLanes];

    internal int PriorSeedCount { get; set; }
}
