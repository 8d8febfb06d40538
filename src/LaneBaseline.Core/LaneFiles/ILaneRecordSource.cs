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
