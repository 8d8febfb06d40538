using LaneBaseline.Core;

namespace LaneBaseline.Vision.IO;

/// <summary>
/// Lists the frames of a detect input: a folder of images (recursive, sorted by relative path, ordinal), a text
/// list of image paths (one per line, relative to the list's folder; blank lines and lines starting with '#'
/// skipped), one image, or a video file (keys <c>VIDEO#NNNNNN</c>, zero-based).
/// </summary>
public static class FrameListing
{
    /// <summary>Image file extensions a folder scan picks up (case-insensitive).</summary>
    public static IReadOnlyList<string> ImageExtensions { get; } = [".png", ".jpg", ".jpeg", ".bmp", ".tif", ".tiff", ".webp"];

    /// <summary>Video file extensions read with the video decoder (case-insensitive).</summary>
    public static IReadOnlyList<string> VideoExtensions { get; } = [".mp4", ".avi", ".mkv", ".mov", ".m4v"];

    /// <summary>List-file extensions (case-insensitive).</summary>
    public static IReadOnlyList<string> ListExtensions { get; } = [".txt", ".lst"];

    /// <summary>Whether <paramref name="path"/> names a video file by its extension.</summary>
    public static bool IsVideo(string path) => HasExtension(path, VideoExtensions);

    /// <summary>Lists the image frames of a folder, list file or single image.</summary>
    /// <exception cref="BadInputException">The input does not exist, lists a missing file, or holds no image.</exception>
    public static IReadOnlyList<FrameItem> ListImages(string input)
    {
        ArgumentNullException.ThrowIfNull(input);
        if (Directory.Exists(input))
        {
            string root = Path.GetFullPath(input);
            var keys = Directory.EnumerateFiles(root, "*", SearchOption.AllDirectories)
                .Where(f => HasExtension(f, ImageExtensions))
                .Select(f => (Key: Path.GetRelativePath(root, f).Replace('\\', '/'), Path: f))
                .OrderBy(k => k.Key, StringComparer.Ordinal)
                .ToList();
            if (keys.Count == 0)
            {
                throw BadInputException.At(input, 0, null, "the folder holds no image (" + string.Join(", ", ImageExtensions) + ")");
            }

            return keys.Select((k, i) => new FrameItem(i, k.Key, k.Path, i)).ToArray();
        }

        if (!File.Exists(input))
        {
            throw BadInputException.At(input, 0, null, "no such file or folder");
        }

        if (HasExtension(input, ListExtensions))
        {
            return ReadList(input);
        }

        return [new FrameItem(0, Path.GetFileName(input), Path.GetFullPath(input), 0)];
    }

    private static FrameItem[] ReadList(string listFile)
    {
        string baseDir = Path.GetDirectoryName(Path.GetFullPath(listFile)) ?? ".";
        var items = new List<FrameItem>();
        var seen = new HashSet<string>(StringComparer.Ordinal);
        int lineNo = 0;
        foreach (string raw in File.ReadLines(listFile))
        {
            lineNo++;
            string line = raw.Trim();
            if (line.Length == 0 || line.StartsWith('#'))
            {
                continue;
            }

            string full = Path.GetFullPath(Path.Combine(baseDir, line));
            if (!File.Exists(full))
            {
                throw BadInputException.At(listFile, lineNo, null, "listed image '" + line + "' does not exist");
            }

            string key = Path.IsPathRooted(line) ? line.Replace('\\', '/') : Path.GetRelativePath(baseDir, full).Replace('\\', '/');
            if (!seen.Add(key))
            {
                throw BadInputException.At(listFile, lineNo, null, "image '" + line + "' is listed twice");
            }

            items.Add(new FrameItem(items.Count, key, full, items.Count));
        }

        if (items.Count == 0)
        {
            throw BadInputException.At(listFile, 0, null, "the list names no image");
        }

        return items.ToArray();
    }

    /// <summary>Key of video frame <paramref name="index"/>: <c>VIDEO#</c> and six digits.</summary>
    public static string VideoKey(int index) => "VIDEO#" + index.ToString("D6", System.Globalization.CultureInfo.InvariantCulture);

    private static bool HasExtension(string path, IReadOnlyList<string> extensions)
    {
        string ext = Path.GetExtension(path);
        foreach (string e in extensions)
        {
            if (string.Equals(ext, e, StringComparison.OrdinalIgnoreCase))
            {
                return true;
            }
        }

        return false;
    }
}
