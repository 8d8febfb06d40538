using System.Globalization;
using LaneBaseline.Core.Interchange;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Vision.Masks;

namespace LaneBaseline.Cli;

/// <summary>
/// Chooses the reader for a lane input by what the path is: a directory is a folder of instance-mask PNGs, a
/// <c>*.json</c> file (not <c>*.jsonl</c>) an ASAM OpenLABEL document, anything else a lane file.
/// </summary>
internal static class LaneInputs
{
    public static bool IsMaskFolder(string path) => Directory.Exists(path);

    public static bool IsOpenLabel(string path) =>
        path.EndsWith(".json", StringComparison.OrdinalIgnoreCase) && !Directory.Exists(path);

    /// <summary>An opener that reads all three formats; notes (dropped mask ids) go to <paramref name="note"/> once each.</summary>
    public static LaneSourceOpener Opener((int Width, int Height)? size, int minMaskRows, TextWriter note)
    {
        var said = new HashSet<string>(StringComparer.Ordinal);
        void Note(string line)
        {
            if (said.Add(line))
            {
                note.WriteLine("note: " + line);
            }
        }

        return (path, request) =>
        {
            LaneSourceRequest r = size is null || request.Size is not null ? request : request with { Size = size };
            if (IsMaskFolder(path))
            {
                return new MaskFolderSource(path, r, new MaskLaneExtractor { MinRows = minMaskRows }) { OnNote = Note };
            }

            if (IsOpenLabel(path))
            {
                return OpenLabelSource.Open(path, r);
            }

            return LaneFileReader.Open(path, r.SizeRequired);
        };
    }

    /// <summary>Parses the <c>--shard K/N</c> option of detect, score and audit (null when not given); a malformed value is a usage error.</summary>
    public static Core.Sharding.ShardSpec? ParseShard(string? text)
    {
        try
        {
            return text is null ? null : Core.Sharding.ShardSpec.Parse(text);
        }
        catch (FormatException ex)
        {
            throw new UsageException("--shard: " + ex.Message);
        }
    }

    /// <summary>Parses <c>WxH</c> (e.g. <c>1280x720</c>).</summary>
    public static (int Width, int Height)? ParseSize(string? text, string option)
    {
        if (text is null)
        {
            return null;
        }

        string[] parts = text.Split('x', 'X');
        if (parts.Length == 2
            && int.TryParse(parts[0], NumberStyles.None, CultureInfo.InvariantCulture, out int w)
            && int.TryParse(parts[1], NumberStyles.None, CultureInfo.InvariantCulture, out int h)
            && w > 0 && h > 0 && w <= 1 << 20 && h <= 1 << 20)
        {
            return (w, h);
        }

        throw new UsageException($"{option} must be WIDTHxHEIGHT in pixels, e.g. 1280x720");
    }
}
