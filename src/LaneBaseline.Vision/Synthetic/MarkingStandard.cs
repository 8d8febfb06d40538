namespace LaneBaseline.Vision.Synthetic;

/// <summary>
/// A road-marking convention: lane-line width, broken-line pattern, lane widths and line colours.
/// Values come from the standards named in each catalogue entry (see <see cref="KnownMarkingStandards"/>).
/// </summary>
public sealed record MarkingStandard
{
    /// <summary>Short name used in tags (e.g. <c>us</c>).</summary>
    public required string Name { get; init; }

    /// <summary>Smallest lane-line width, metres.</summary>
    public required double MinLineWidthM { get; init; }

    /// <summary>Largest lane-line width, metres.</summary>
    public required double MaxLineWidthM { get; init; }

    /// <summary>Length of one painted stroke of a broken line, metres.</summary>
    public required double DashLengthM { get; init; }

    /// <summary>Gap between strokes of a broken line, metres.</summary>
    public required double GapLengthM { get; init; }

    /// <summary>Smallest lane width, metres.</summary>
    public required double MinLaneWidthM { get; init; }

    /// <summary>Largest lane width, metres.</summary>
    public required double MaxLaneWidthM { get; init; }

    /// <summary>Whether the left edge line of a one-way carriageway is yellow.</summary>
    public required bool YellowLeftEdge { get; init; }

    /// <summary>Gap between the two lines of a double line, metres.</summary>
    public required double DoubleLineGapM { get; init; }
}
