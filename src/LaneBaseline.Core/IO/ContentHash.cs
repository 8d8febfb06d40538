using System.Security.Cryptography;
using System.Text;

namespace LaneBaseline.Core.IO;

/// <summary>
/// SHA-256 of an input's contents, recorded in partial states so <c>merge</c> can refuse states made from different
/// contents of the same path. A file hashes its bytes (a pipe is read through <see cref="InputSpool"/>); a folder
/// (mask folders) hashes each file's '/'-separated relative path, length and bytes in ordinal path order.
/// </summary>
public static class ContentHash
{
    /// <summary><c>sha256:</c> and 64 hex digits, or an empty string when the path does not exist.</summary>
    public static string Of(string path)
    {
        ArgumentNullException.ThrowIfNull(path);
        try
        {
            if (Directory.Exists(path))
            {
                using var hash = IncrementalHash.CreateHash(HashAlgorithmName.SHA256);
                string root = Path.GetFullPath(path);
                var files = Directory.EnumerateFiles(root, "*", SearchOption.AllDirectories)
                    .Select(f => (Rel: Path.GetRelativePath(root, f).Replace('\\', '/'), Full: f))
                    .OrderBy(f => f.Rel, StringComparer.Ordinal);
                foreach ((string rel, string full) in files)
                {
                    byte[] bytes = File.ReadAllBytes(full);
                    hash.AppendData(Encoding.UTF8.GetBytes(rel + "\n" + bytes.LongLength.ToString(System.Globalization.CultureInfo.InvariantCulture) + "\n"));
                    hash.AppendData(bytes);
                }

                return "sha256:" + Convert.ToHexStringLower(hash.GetHashAndReset());
            }

            if (!File.Exists(path))
            {
                return string.Empty;
            }

            using FileStream s = File.OpenRead(InputSpool.ReadablePath(path));
            return "sha256:" + Convert.ToHexStringLower(SHA256.HashData(s));
        }
        catch (Exception ex) when (ex is IOException or UnauthorizedAccessException)
        {
            throw BadInputException.At(path, 0, null, "cannot be read: " + ex.Message);
        }
    }
}
