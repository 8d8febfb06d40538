using System.Runtime.InteropServices;
using System.Text;

namespace LaneBaseline.Core.IO;

/// <summary>
/// Where an output path really leads: symbolic links are followed to their final target, and an existing target
/// that is not a regular file (a FIFO, a character device such as <c>/dev/stdout</c>, a socket) is reported so that
/// writers write it in place instead of renaming a temporary file over it.
/// </summary>
public readonly record struct OutputTarget(string Path, bool InPlace)
{
    private const int AtFdCwd = -100;
    private const uint StatxType = 0x1;
    private const int ModeOffset = 28; // stx_mode (u16) in struct statx, the same on every Linux architecture
    private const int TypeMask = 0xF000, Regular = 0x8000, Directory = 0x4000;

    /// <summary>Resolves <paramref name="path"/> (relative to the current folder) to the file that will be written.</summary>
    public static OutputTarget Resolve(string path)
    {
        ArgumentNullException.ThrowIfNull(path);
        string full = System.IO.Path.GetFullPath(path);
        if (new FileInfo(full).LinkTarget is not null && File.ResolveLinkTarget(full, returnFinalTarget: true) is { } target)
        {
            full = target.FullName;
        }

        int? type = FileType(full);
        return new OutputTarget(full, type is int t && t != Regular && t != Directory);
    }

    /// <summary>Throws when the resolved target is an existing folder (an output needs a file name).</summary>
    /// <exception cref="BadInputException">The path is an existing folder.</exception>
    public static void RefuseFolder(string path, string resolved)
    {
        if (System.IO.Directory.Exists(resolved))
        {
            throw BadInputException.At(path, 0, null, "the output path is a folder; give a file name");
        }
    }

    /// <summary>The S_IFMT bits of an existing path on Linux (following links), or null (missing, or not Linux).</summary>
    private static int? FileType(string path)
    {
        if (!OperatingSystem.IsLinux())
        {
            return null;
        }

        byte[] name = Encoding.UTF8.GetBytes(path + "\0");
        byte[] buffer = new byte[256];
        if (Statx(AtFdCwd, name, 0, StatxType, buffer) != 0)
        {
            return null;
        }

        return BitConverter.ToUInt16(buffer, ModeOffset) & TypeMask;
    }

    [DllImport("libc", EntryPoint = "statx", SetLastError = true)]
    [DefaultDllImportSearchPaths(DllImportSearchPath.SafeDirectories)]
#pragma warning disable SYSLIB1054 // DllImport keeps the project free of unsafe code; the call is rare
    private static extern int Statx(int dirFd, byte[] path, int flags, uint mask, byte[] buffer);
#pragma warning restore SYSLIB1054
}
