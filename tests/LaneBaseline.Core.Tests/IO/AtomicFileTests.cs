using System.Diagnostics;
using System.Text;
using LaneBaseline.Core.IO;
using LaneBaseline.Testing;
using Xunit;

namespace LaneBaseline.Core.Tests.IO;

public sealed class AtomicFileTests
{
    // Source: POSIX.1-2017, rename(2): rename replaces the directory entry, so renaming over a FIFO or a symbolic link
    // would replace the FIFO or the link itself; open(2) on a FIFO writes to its reader. These tests check that the
    // helper keeps those objects and writes through them.

    [Fact]
    public void RegularFile_ReplacedOnCommit_TemporaryGone()
    {
        using var dir = new TempDir();
        string path = Path.Combine(dir.Path, "out.txt");
        File.WriteAllText(path, "old");
        AtomicFile.WriteAllText(path, "new\n");
        Assert.Equal("new\n", File.ReadAllText(path));
        Assert.Single(Directory.GetFiles(dir.Path));
    }

    [Fact]
    public void NotCommitted_LeavesTheOldFileAndNoTemporary()
    {
        using var dir = new TempDir();
        string path = Path.Combine(dir.Path, "out.txt");
        File.WriteAllText(path, "old");
        using (var file = new AtomicFile(path))
        {
            file.Writer.Write("half");
        }

        Assert.Equal("old", File.ReadAllText(path));
        Assert.Single(Directory.GetFiles(dir.Path));
    }

    [Fact]
    public void MissingFolder_IsCreated()
    {
        using var dir = new TempDir();
        string path = Path.Combine(dir.Path, "a", "b", "out.txt");
        AtomicFile.WriteAllText(path, "x");
        Assert.Equal("x", File.ReadAllText(path));
    }

    [Fact]
    public void SymlinkToRegularFile_TargetReplaced_LinkKept()
    {
        using var dir = new TempDir();
        string target = Path.Combine(dir.Path, "target.txt");
        string link = Path.Combine(dir.Path, "link.txt");
        File.WriteAllText(target, "old");
        File.CreateSymbolicLink(link, target);
        AtomicFile.WriteAllText(link, "new");
        Assert.NotNull(new FileInfo(link).LinkTarget);
        Assert.Equal("new", File.ReadAllText(target));
        Assert.Equal(2, Directory.GetFiles(dir.Path).Length);
    }

    [Fact]
    public async Task Fifo_WrittenInPlace_NotReplaced()
    {
        if (!OperatingSystem.IsLinux())
        {
            return; // mkfifo: Linux only in CI
        }

        using var dir = new TempDir();
        string fifo = Path.Combine(dir.Path, "pipe");
        string link = Path.Combine(dir.Path, "pipe-link");
        MkFifo(fifo);
        File.CreateSymbolicLink(link, fifo);
        foreach (string path in new[] { fifo, link })
        {
            Task<string> reader = Task.Run(() => File.ReadAllText(fifo));
            Assert.True(OutputTarget.Resolve(path).InPlace);
            AtomicFile.WriteAllText(path, "through the pipe\n");
            Assert.Equal("through the pipe\n", await reader.WaitAsync(TimeSpan.FromSeconds(20)));
            Assert.False(File.Exists(fifo + "." + Environment.ProcessId + ".tmp"));
        }

        Assert.Equal(2, Directory.GetFileSystemEntries(dir.Path).Length);
        Assert.True(OutputTarget.Resolve(fifo).InPlace); // still a FIFO
    }

    [Fact]
    public void CharacterDevice_WrittenInPlace()
    {
        if (!OperatingSystem.IsLinux())
        {
            return;
        }

        OutputTarget t = OutputTarget.Resolve("/dev/null");
        Assert.True(t.InPlace);
        AtomicFile.WriteAllBytes("/dev/null", Encoding.UTF8.GetBytes("discarded"));
        Assert.True(OutputTarget.Resolve("/dev/null").InPlace);
        Assert.False(OutputTarget.Resolve(Path.Combine(Path.GetTempPath(), "missing-" + Guid.NewGuid())).InPlace);
    }

    private static void MkFifo(string path)
    {
        using var p = Process.Start(new ProcessStartInfo("mkfifo", [path]) { UseShellExecute = false })!;
        p.WaitForExit();
        Assert.Equal(0, p.ExitCode);
    }
}
