namespace LaneBaseline.Cli;

/// <summary>
/// Refuses, before any work, an output that is also an input (<c>score --json T</c> where T is the truth,
/// <c>merge s0 s1 -o s0</c>) and one file named by two outputs (<c>--json x --csv x</c>): usage errors, exit 2. Paths
/// are compared by their full resolved path (symbolic links followed) and, when both exist, by device and inode
/// (hard links). <c>-</c> (standard input or output) and FIFOs or devices such as <c>/dev/stdout</c> are exempt: they
/// are streams, not files that could be overwritten. A file output that names an existing folder is bad input (exit 3)
/// here too, before anything is read or printed (before, <c>score --json DIR</c> printed the table and then failed).
/// </summary>
internal static class OutputPaths
{
    /// <summary>Checks <paramref name="outputs"/> against <paramref name="inputs"/> and each other; nulls are skipped.</summary>
    /// <param name="inputs">Input options and paths.</param>
    /// <param name="outputs">Output options and paths.</param>
    /// <param name="outputsAreFiles">False for outputs that are folders (overlays, mask folders): an existing folder is then fine.</param>
    /// <exception cref="UsageException">An output is an input, or two outputs are one file.</exception>
    /// <exception cref="Core.BadInputException">A file output is an existing folder.</exception>
    public static void Check(IEnumerable<(string Option, string? Path)> inputs, IEnumerable<(string Option, string? Path)> outputs, bool outputsAreFiles = true)
    {
        var seenInputs = Resolve(inputs);
        var seenOutputs = new List<(string Option, string Path, FileIdentity? Id)>();
        foreach ((string option, string path, FileIdentity? id) in Resolve(outputs))
        {
            if (id is { IsStream: true })
            {
                continue;
            }

            foreach ((string inOption, string inPath, FileIdentity? inId) in seenInputs)
            {
                if (Same(path, id, inPath, inId))
                {
                    throw new UsageException($"{option} {path} would overwrite the input given as {inOption}; choose another output path");
                }
            }

            foreach ((string outOption, string outPath, FileIdentity? outId) in seenOutputs)
            {
                if (Same(path, id, outPath, outId))
                {
                    throw new UsageException($"{outOption} and {option} both write {path}; give each output its own path");
                }
            }

            RefuseFileOnTheWay(option, path);
            if (outputsAreFiles)
            {
                Core.IO.OutputTarget.RefuseFolder(path, path);
            }
            else if (File.Exists(path))
            {
                throw Core.BadInputException.At(path, 0, null, option + " names a folder to write into, but this is a file; give a folder");
            }

            seenOutputs.Add((option, path, id));
        }
    }

    /// <summary>
    /// The folder a score page's regression gallery writes its full-size overlays to (<c>PAGE.frames/</c> beside the
    /// page), or null when no gallery is drawn; checked as a folder output so a file in its place fails before any work.
    /// </summary>
    public static string? GalleryFolder(string? reportPath, string? framesDir)
    {
        if (reportPath is null || framesDir is null || StandardStreams.IsDash(reportPath))
        {
            return null;
        }

        string full = System.IO.Path.GetFullPath(reportPath);
        return System.IO.Path.Combine(System.IO.Path.GetDirectoryName(full) ?? ".", System.IO.Path.GetFileNameWithoutExtension(full) + ".frames");
    }

    /// <summary>The files of <c>--pred [NAME=]FILE</c> values, without reading anything (standard input stays <c>-</c>).</summary>
    public static IEnumerable<(string Option, string? Path)> Preds(string[]? values)
    {
        foreach (string v in values ?? [])
        {
            int eq = v.IndexOf('=', StringComparison.Ordinal);
            yield return ("--pred", eq > 0 && v[..eq].IndexOfAny(['/', '\\']) < 0 ? v[(eq + 1)..] : v);
        }
    }

    private static List<(string Option, string Path, FileIdentity? Id)> Resolve(IEnumerable<(string Option, string? Path)> paths)
    {
        var list = new List<(string, string, FileIdentity?)>();
        foreach ((string option, string? path) in paths)
        {
            if (path is null || path == "-" || path.Length == 0)
            {
                continue;
            }

            string full;
            try
            {
                full = OutputTarget.Resolve(path).Path;
            }
            catch (Exception ex) when (ex is IOException or UnauthorizedAccessException or ArgumentException or Core.BadInputException)
            {
                full = System.IO.Path.GetFullPath(path);
            }

            list.Add((option, full, FileIdentity.Of(full)));
        }

        return list;
    }

    /// <summary>
    /// Refuses an output whose folder, or a folder above it, is an existing file: no folder can be made there
    /// (before, <c>--json F/x.json</c> with F a file was an internal error after the work).
    /// </summary>
    private static void RefuseFileOnTheWay(string option, string fullPath)
    {
        for (string? parent = System.IO.Path.GetDirectoryName(fullPath); !string.IsNullOrEmpty(parent); parent = System.IO.Path.GetDirectoryName(parent))
        {
            if (File.Exists(parent))
            {
                throw Core.BadInputException.At(fullPath, 0, null, $"{option}: '{parent}' is a file, so no folder can hold this output; choose another path");
            }

            if (Directory.Exists(parent))
            {
                return;
            }
        }
    }

    private static bool Same(string a, FileIdentity? aId, string b, FileIdentity? bId) =>
        aId is { } x && bId is { } y ? x.Device == y.Device && x.Inode == y.Inode : string.Equals(a, b, StringComparison.Ordinal);
}
