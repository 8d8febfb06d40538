namespace LaneBaseline.Reporting;

/// <summary>The worst frames carrying one tag.</summary>
/// <param name="Tag">The truth tag.</param>
/// <param name="Frames">Number of truth frames carrying the tag.</param>
/// <param name="Worst">Thumbnails, worst first; empty when every frame with the tag scores perfectly.</param>
public sealed record ConditionGroup(string Tag, int Frames, IReadOnlyList<GalleryFrame> Worst);
