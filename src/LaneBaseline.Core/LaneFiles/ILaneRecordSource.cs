namespace LaneBaseline.Core.LaneFiles;

/// <summary>
/// A stream of <see cref="LaneRecord"/>s read one at a time: a lane file, a folder of instance-mask PNGs, or any
/// other format that can be turned into lanes. Bad input throws <see cref="BadInputException"/> naming the file,
/// line or frame.
/// </summary>
public interface ILaneRecordSource : IDisposable
{
    /// <summary>The file or folder name used in messages.</summary>
    string DisplayName { get; }

    /// <summary>Number of records read so far.</summary>
    long RecordCount { get; }

    /// <summary>Reads the next record, or returns false at the end.</summary>
    bool TryRead(out LaneRecord record);
}

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

/// <summary>The default opener: lane files only.</summary>
public static class LaneSources
{
    /// <summary>Opens <paramref name="path"/> as a lane file (<see cref="LaneFileReader"/>).</summary>
    public static ILaneRecordSource OpenLaneFile(string path, LaneSourceRequest request)
    {
        ArgumentNullException.ThrowIfNull(request);
        return LaneFileReader.Open(path, request.SizeRequired);
    }
}
