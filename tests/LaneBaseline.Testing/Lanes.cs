using LaneBaseline.Core.LaneFiles;

namespace LaneBaseline.Testing;

/// <summary>Compact builders for lanes and records in tests.</summary>
public static class Lanes
{
    /// <summary>A lane through the given (x, y) pairs.</summary>
    public static Lane Of(params (double X, double Y)[] points) =>
        new() { Points = [.. points.Select(p => new LanePoint(p.X, p.Y))] };

    /// <summary>A vertical lane at column x over the full frame height (near to far).</summary>
    public static Lane Vertical(double x, int height) => Of((x, height - 1), (x, 0));

    /// <summary>A truth record with size.</summary>
    public static LaneRecord Truth(string frame, int width, int height, params Lane[] lanes) =>
        new() { Frame = frame, Width = width, Height = height, Lanes = lanes };

    /// <summary>A prediction record without size.</summary>
    public static LaneRecord Pred(string frame, params Lane[] lanes) => new() { Frame = frame, Lanes = lanes };

    /// <summary>Writes records to a lane file.</summary>
    public static void WriteFile(string path, IEnumerable<LaneRecord> records)
    {
        using LaneFileWriter writer = LaneFileWriter.Create(path);
        foreach (LaneRecord r in records)
        {
            writer.Write(r);
        }
    }
}
