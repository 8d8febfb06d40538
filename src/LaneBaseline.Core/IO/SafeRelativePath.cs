using System.Text;

namespace LaneBaseline.Core.IO;

/// <summary>
/// Turns a frame key (from a lane file, a list file or an OpenLABEL document, so possibly hostile) into a relative
/// path that stays inside the folder it is joined to: a leading root or drive is dropped, <c>.</c> and empty
/// components vanish, a component of only dots (<c>..</c>) becomes underscores, and control characters and
/// <c>:</c> become <c>_</c>. Ordinary keys (<c>dusk/000012.png</c>, <c>clip.mp4#000012</c>) keep their folders and
/// names, so mask folders still round-trip.
/// </summary>
public static class SafeRelativePath
{
    /// <summary>The safe relative form of <paramref name="key"/> (components joined by the platform separator).</summary>
    public static string From(string key)
    {
        ArgumentNullException.ThrowIfNull(key);
        var parts = new List<string>();
        foreach (string raw in key.Split('/', '\\'))
        {
            if (raw.Length == 0 || raw == ".")
            {
                continue;
            }

            var b = new StringBuilder(raw.Length);
            foreach (char c in raw)
            {
                b.Append(char.IsControl(c) || c == ':' ? '_' : c);
            }

            string part = b.ToString();
            if (part.Trim('.').Length == 0)
            {
                part = new string('_', part.Length);
            }

            parts.Add(part);
        }

        return parts.Count == 0 ? "_" : string.Join(Path.DirectorySeparatorChar, parts);
    }

    /// <summary>
    /// <paramref name="folder"/> joined with the safe form of <paramref name="key"/>, with <paramref name="extension"/>
    /// (e.g. <c>.png</c>; null keeps the key's own) in place of the key's extension; always inside the folder.
    /// </summary>
    public static string Under(string folder, string key, string? extension)
    {
        ArgumentNullException.ThrowIfNull(folder);
        string rel = From(key);
        if (extension is not null)
        {
            rel = Path.ChangeExtension(rel, extension);
        }

        string root = Path.GetFullPath(folder);
        string full = Path.GetFullPath(Path.Combine(root, rel));
        string prefix = Path.EndsInDirectorySeparator(root) ? root : root + Path.DirectorySeparatorChar;
        if (!full.StartsWith(prefix, StringComparison.Ordinal))
        {
            throw new BadInputException("frame key '" + key + "' does not make a path inside " + folder);
        }

        return full;
    }
}
