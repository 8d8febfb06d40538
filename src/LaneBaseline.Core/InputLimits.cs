using System.Globalization;

namespace LaneBaseline.Core;

/// <summary>
/// The documented limits on what one input may ask of the machine (docs/reliability.md). Inputs beyond them are bad
/// input (exit 3, naming the file, line or frame), so a small hostile file can never take gigabytes or hours.
/// </summary>
public static class InputLimits
{
    /// <summary>Most lanes one record (one frame) of a lane file, an OpenLABEL frame or an instance mask may hold.</summary>
    public const int MaxLanesPerFrame = 500;

    /// <summary>Most pixels (width × height) of one frame or mask: 2^28, e.g. 16384 x 16384.</summary>
    public const long MaxFramePixels = 1L << 28;

    /// <summary>Longest line of a lane file, in bytes (64 MiB).</summary>
    public const int MaxLineBytes = 64 << 20;

    /// <summary>Most findings one audit rule reports for one frame; the rest are counted in one summary finding.</summary>
    public const int MaxFindingsPerFrameAndRule = 20;

    /// <summary>Most distinct tags a truth file may carry (each gets its own breakdown and intervals).</summary>
    public const int MaxDistinctTags = 1000;

    /// <summary>Nesting depth allowed in a YAML preset or search-space file.</summary>
    public const int MaxYamlDepth = 64;

    /// <summary>Checks a frame size against <see cref="MaxFramePixels"/>; the message names the file, line and size.</summary>
    /// <exception cref="BadInputException">The frame is larger.</exception>
    public static void CheckFrameSize(string file, long line, long width, long height)
    {
        if (width * height > MaxFramePixels)
        {
            throw BadInputException.At(file, line, "width, height", string.Create(
                CultureInfo.InvariantCulture,
                $"a {width}x{height} frame has {width * height} pixels; at most {MaxFramePixels} (2^28, e.g. 16384x16384) are accepted"));
        }
    }
}
