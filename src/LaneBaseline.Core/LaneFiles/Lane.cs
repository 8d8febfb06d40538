namespace LaneBaseline.Core.LaneFiles;

/// <summary>One lane marking (boundary) of a frame, as a polyline ordered from near to far.</summary>
public sealed class Lane
{
    /// <summary>Points in pixel coordinates, at least two, nearest to the camera first.</summary>
    public required IReadOnlyList<LanePoint> Points { get; init; }

    /// <summary>Signed position relative to the ego vehicle (-1 left ego boundary, +1 right, ±2 next out), or null.</summary>
    public int? Slot { get; init; }

    /// <summary>Confidence in [0, 1], or null.</summary>
    public double? Score { get; init; }

    /// <summary>Marking type (see <see cref="LaneKinds"/>), or null.</summary>
    public string? Kind { get; init; }

    /// <summary>Keys this version does not know, kept as raw JSON text in file order so a rewrite keeps them.</summary>
    public IReadOnlyList<KeyValuePair<string, string>> ExtraJson { get; init; } = [];
}
