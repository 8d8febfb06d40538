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
    /// <param name="input">A folder, a list file or one image.</param>
    /// <param name="followLinks">
    /// Whether a folder scan enters symbolic links to folders. Off by default: a link loop would never end and a link
    /// to a parent would repeat frames. When on, each real folder is entered once (loops and repeats are skipped).
    /// Links to image files are always read.
    /// </param>
    /// <exception cref="BadInputException">The input does not exist, lists a missing file, or holds no image.</exception>
    public static IReadOnlyList<FrameItem> ListImages(string input, bool followLinks = false)
    {
        ArgumentNullException.ThrowIfNull(input);
        if (Directory.Exists(input))
        {
            string root = Path.GetFullPath(input);
            var keys = FilesUnder(root, followLinks, input)
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

    /// <summary>
    /// Every file under <paramref name="root"/> (recursive). Links to folders are skipped unless
    /// <paramref name="followLinks"/>; then every real folder (link target resolved) is entered at most once.
    /// </summary>
    /// <exception cref="BadInputException">A folder cannot be read.</exception>
    public static List<string> FilesUnder(string root, bool followLinks, string displayName)
    {
        ArgumentNullException.ThrowIfNull(root);
        var files = new List<string>();
        var visited = new HashSet<string>(StringComparer.Ordinal) { RealPath(root) };
        var pending = new Stack<string>();
        pending.Push(root);
        while (pending.Count > 0)
        {
            string dir = pending.Pop();
            FileSystemInfo[] entries;
            try
            {
                entries = new DirectoryInfo(dir).GetFileSystemInfos();
                Array.Sort(entries, (a, b) => string.CompareOrdinal(a.Name, b.Name));
            }
            catch (Exception ex) when (ex is IOException or UnauthorizedAccessException or System.Security.SecurityException)
            {
                throw BadInputException.At(displayName, 0, null, "cannot read the folder '" + Path.GetRelativePath(root, dir) + "': " + ex.Message);
            }

            foreach (FileSystemInfo entry in entries)
            {
                bool isLink = entry.LinkTarget is not null;
                if (!isLink)
                {
                    if (entry is DirectoryInfo)
                    {
                        if (!followLinks || visited.Add(RealPath(entry.FullName)))
                        {
                            pending.Push(entry.FullName); // with links followed, a folder also reached through a link is entered once
                        }
                    }
                    else
                    {
                        files.Add(entry.FullName);
                    }

                    continue;
                }

                if (File.Exists(entry.FullName))
                {
                    files.Add(entry.FullName); // a link to a file (File.Exists follows links; a dangling link is neither)
                }
                else if (followLinks && Directory.Exists(entry.FullName) && visited.Add(RealPath(entry.FullName)))
                {
                    pending.Push(entry.FullName);
                }
            }
        }

        return files;
    }

    private static string RealPath(string dir)
    {
        try
        {
            return new DirectoryInfo(dir).ResolveLinkTarget(returnFinalTarget: true)?.FullName is string target
                ? RealPath(target)
                : RealParent(dir);
        }
        catch (IOException)
        {
            return dir;
        }
    }

    /// <summary>The path with every linked parent folder resolved, so two routes to one folder compare equal.</summary>
    private static string RealParent(string dir)
    {
        string full = Path.TrimEndingDirectorySeparator(Path.GetFullPath(dir));
        string? parent = Path.GetDirectoryName(full);
        return parent is null ? full : Path.Combine(RealPath(parent), Path.GetFileName(full));
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
