namespace LaneBaseline.Core.LaneFiles;

/// <summary>What a source needs to know to turn its input into lane records.</summary>
public sealed record LaneSourceRequest
{
    /// <summary>True for ground truth, where every record must carry <c>width</c> and <c>height</c>.</summary>
    public bool SizeRequired { get; init; }

    /// <summary>
    /// Frame keys and sizes of a reference set (the truth when scoring), or null. A mask folder uses it to map mask
    /// files back to frame keys and to rescale masks to the frame size.
    /// </summary>
    public IReadOnlyDictionary<string, (int Width, int Height)>? Reference { get; init; }

    /// <summary>A frame size for every record (<c>--size</c>), or null.</summary>
    public (int Width, int Height)? Size { get; init; }
}

/// <summary>Opens a lane-record source for a path as the user gave it; the caller owns the result.</summary>
public delegate ILaneRecordSource LaneSourceOpener(string path, LaneSourceRequest request);
