using System.Globalization;

namespace LaneBaseline.Core.LaneFiles;

/// <summary>One line of a lane file: the lanes of one frame.</summary>
public sealed class LaneRecord
{
    /// <summary>Frame key: the image path relative to the frames root, '/'-separated (or <c>VIDEO#NNNNNN</c>).</summary>
    public required string Frame { get; init; }

    /// <summary>Image width in pixels, or null when a prediction leaves it to the truth.</summary>
    public int? Width { get; init; }

    /// <summary>Image height in pixels, or null when a prediction leaves it to the truth.</summary>
    public int? Height { get; init; }

    /// <summary>Free scenario labels, in file order.</summary>
    public IReadOnlyList<string> Tags { get; init; } = [];

    /// <summary>The lane markings visible in the frame (may be empty).</summary>
    public required IReadOnlyList<Lane> Lanes { get; init; }

    /// <summary>Top-level keys this version does not know, kept as raw JSON text in file order.</summary>
    public IReadOnlyList<KeyValuePair<string, string>> ExtraJson { get; init; } = [];

    /// <summary>One-based line of the record in the file it was read from (0 when built in memory).</summary>
    public long LineNumber { get; init; }

    /// <summary>
    /// Checks every point against the valid range [-width, 2*width] x [-height, 2*height] of the lane-file
    /// specification and throws <see cref="BadInputException"/> naming file, line and key on the first violation.
    /// </summary>
    /// <param name="file">File name used in the message.</param>
    /// <param name="width">Frame width in pixels.</param>
    /// <param name="height">Frame height in pixels.</param>
    public void ValidatePointRange(string file, int width, int height)
    {
        for (int i = 0; i < Lanes.Count; i++)
        {
            IReadOnlyList<LanePoint> points = Lanes[i].Points;
            for (int j = 0; j < points.Count; j++)
            {
                LanePoint p = points[j];
                if (p.X < -width || p.X > 2.0 * width || p.Y < -height || p.Y > 2.0 * height)
                {
                    throw BadInputException.At(
                        file,
                        LineNumber,
                        $"lanes[{i.ToString(CultureInfo.InvariantCulture)}].points[{j.ToString(CultureInfo.InvariantCulture)}]",
                        string.Create(
                            CultureInfo.InvariantCulture,
                            $"point ({p.X}, {p.Y}) is outside [-{width}, {2 * width}] x [-{height}, {2 * height}] for a {width}x{height} frame"));
                }
            }
        }
    }
}
