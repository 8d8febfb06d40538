namespace LaneBaseline.Vision.Pipeline.Workspace;

/// <summary>What stage <c>hough</c> writes: the frame's line segments (first <see cref="SegmentCount"/> entries).</summary>
public sealed class HoughSection
{
    internal HoughSection(int maxSegments) => Segments = new HoughSegment[Math.Max(maxSegments, 4)];

    internal HoughSegment[] Segments { get; }

    internal int SegmentCount { get; set; }
}
