using LaneBaseline.Core.LaneFiles;

namespace LaneBaseline.Vision.Synthetic;

/// <summary>The ground truth of one rendered frame: its lanes (pixel polylines, near to far) and tags.</summary>
/// <param name="Lanes">Every visible boundary as the centreline of its paint, with slot and kind.</param>
/// <param name="Tags">Scenario labels (conditions, road shape, surface, marking standard, motion).</param>
public sealed record RenderedFrame(IReadOnlyList<Lane> Lanes, IReadOnlyList<string> Tags);
