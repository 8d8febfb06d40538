using System.Runtime.InteropServices;
using System.Text;
using Microsoft.Win32.SafeHandles;

namespace LaneBaseline.Core.IO;

/// <summary>
/// What an existing path is on disk: its device and inode (so two names of one file, through links or hard links,
/// compare equal) and its file type. Linux only (statx); elsewhere every query answers null.
/// </summary>
public readonly record struct FileIdentity(ulong Device, ulong Inode, int Type)
{
    /// <summary>The S_IFMT value of a regular file.</summary>
    public const int Regular = 0x8000;

    /// <summary>The S_IFMT value of a directory.</summary>
    public const int Directory = 0x4000;

    private const int AtFdCwd = -100;
    private const int AtEmptyPath = 0x1000;
    private const uint StatxType = 0x1, StatxIno = 0x100;
    private const int ModeOffset = 28, InodeOffset = 32, DevMajorOffset = 136, DevMinorOffset = 140;
    private const int TypeMask = 0xF000;

    /// <summary>True for a FIFO, character device or socket: a stream that can be read only once.</summary>
    public bool IsStream => Type is 0x1000 or 0x2000 or 0xC000;

    /// <summary>The identity of an existing path (links followed), or null when it does not exist or off Linux.</summary>
    public static FileIdentity? Of(string path)
    {
        ArgumentNullException.ThrowIfNull(path);
        if (!OperatingSystem.IsLinux() || path.Length == 0)
        {
            return null;
        }

        byte[] buffer = new byte[256];
        return Statx(AtFdCwd, Encoding.UTF8.GetBytes(path + "\0"), 0, StatxType | StatxIno, buffer) == 0 ? From(buffer) : null;
    }

    /// <summary>The identity of an open file.</summary>
    public static FileIdentity? Of(SafeFileHandle handle)
    {
        ArgumentNullException.ThrowIfNull(handle);
        if (!OperatingSystem.IsLinux())
        {
            return null;
        }

        byte[] buffer = new byte[256];
        int fd = (int)handle.DangerousGetHandle();
        return Statx(fd, "\0"u8.ToArray(), AtEmptyPath, StatxType | StatxIno, buffer) == 0 ? From(buffer) : null;
    }

    private static FileIdentity From(byte[] b) => new(
        ((ulong)BitConverter.ToUInt32(b, DevMajorOffset) << 32) | BitConverter.ToUInt32(b, DevMinorOffset),
        BitConverter.ToUInt64(b, InodeOffset),
        BitConverter.ToUInt16(b, ModeOffset) & TypeMask);

    [DllImport("libc", EntryPoint = "statx", SetLastError = true)]
    [DefaultDllImportSearchPaths(DllImportSearchPath.SafeDirectories)]
#pragma warning disable SYSLIB1054 // DllImport keeps the project free of unsafe code; the call is rare
    private static extern int Statx(int dirFd, byte[] path, int flags, uint mask, byte[] buffer);
#pragma warning restore SYSLIB1054
}
