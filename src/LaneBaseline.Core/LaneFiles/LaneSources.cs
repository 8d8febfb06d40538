namespace LaneBaseline.Core.LaneFiles;

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
