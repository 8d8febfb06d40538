using System.Diagnostics;
using LaneBaseline.Core.IO;
using LaneBaseline.Testing;
using Xunit;

namespace LaneBaseline.Core.Tests.IO;

// Issue 17 items 1, 4, 6 and 7 at the helper level.
public sealed class HostilePathTests
{
    // Source: POSIX.1-2017, 4.13 Pathname Resolution: a leading '/' starts at the root and '..' names the parent, so
    // these are exactly the components that can leave a folder.
    [Theory]
    [InlineData("dusk/000012.png", "dusk/000012.png")]
    [InlineData("clip.mp4#000012", "clip.mp4#000012")]
    [InlineData("/etc/passwd", "etc/passwd")]
    [InlineData("../../x.png", "__/__/x.png")]
    [InlineData("a/./../b.png", "a/__/b.png")]
    [InlineData("..\\..\\win.png", "__/__/win.png")]
    [InlineData("C:\\x.png", "C_/x.png")]
    [InlineData("...", "___")]
    [InlineData("", "_")]
    [InlineData("/", "_")]
    [InlineData("a\u0001b", "a_b")]
    public void From_KeepsOrdinaryKeys_NeutralisesEscapes(string key, string expected) =>
        Assert.Equal(expected.Replace('/', Path.DirectorySeparatorChar), SafeRelativePath.From(key));

    [Theory]
    [InlineData("/etc/passwd")]
    [InlineData("../../../../../../tmp/escape")]
    [InlineData("a/../../b")]
    [InlineData("....//....//x")]
    public void Under_StaysInsideTheFolder(string key)
    {
        using var dir = new TempDir();
        string folder = Path.Combine(dir.Path, "out");
        string path = SafeRelativePath.Under(folder, key, ".png");
        Assert.StartsWith(Path.GetFullPath(folder) + Path.DirectorySeparatorChar, path, StringComparison.Ordinal);
        Assert.EndsWith(".png", path, StringComparison.Ordinal);
    }

    [Fact]
    public void AtomicFile_SecondWriterOfOneOutput_IsRefusedWhileTheFirstWrites()
    {
        using var dir = new TempDir();
        string path = Path.Combine(dir.Path, "out.txt");
        using (var first = new AtomicFile(path))
        {
            first.Writer.Write("first");
            BadInputException e = Assert.Throws<BadInputException>(() => new AtomicFile(path).Dispose());
            Assert.Contains("another process is writing this output", e.Message, StringComparison.Ordinal);
            first.Commit();
        }

        Assert.Equal("first", File.ReadAllText(path));
        AtomicFile.WriteAllText(path, "second"); // free again once committed
        Assert.Equal("second", File.ReadAllText(path));
        Assert.Single(Directory.GetFiles(dir.Path));
    }

    [Fact]
    public void AtomicFile_Resume_ContinuesTheOutput_OrWhatAKilledRunLeft()
    {
        using var dir = new TempDir();
        string path = Path.Combine(dir.Path, "out.txt");
        File.WriteAllText(path, "a\n");
        using (var f = AtomicFile.Resume(path))
        {
            f.Writer.Write("b\n");
            f.Commit();
        }

        Assert.Equal("a\nb\n", File.ReadAllText(path));

        File.WriteAllText(path + AtomicFile.TempSuffix, "a\nb\nc\n"); // a killed run's temporary
        using (var f = AtomicFile.Resume(path))
        {
            Assert.Equal(6, f.Stream.Position);
            f.Writer.Write("d\n");
            f.Commit();
        }

        Assert.Equal("a\nb\nc\nd\n", File.ReadAllText(path));
        Assert.Single(Directory.GetFiles(dir.Path));

        using (var f = AtomicFile.Resume(path))
        {
            f.Writer.Write("lost\n"); // not committed: the output stays, the temporary goes
        }

        Assert.Equal("a\nb\nc\nd\n", File.ReadAllText(path));
        Assert.Single(Directory.GetFiles(dir.Path));
    }

    [Fact]
    public async Task InputSpool_FifoReadTwice_SecondReadSeesTheSameBytes()
    {
        if (!OperatingSystem.IsLinux())
        {
            return;
        }

        using var dir = new TempDir();
        string fifo = Path.Combine(dir.Path, "in.fifo");
        using (Process p = Process.Start(new ProcessStartInfo("mkfifo", [fifo]) { UseShellExecute = false })!)
        {
            p.WaitForExit();
        }

        var writer = Task.Run(() => File.WriteAllText(fifo, "one\ntwo\n"));
        string copy;
        using (InputSpool spool = InputSpool.Begin())
        {
            string first = InputSpool.ReadablePath(fifo);
            Assert.NotEqual(fifo, first);
            Assert.Equal("one\ntwo\n", File.ReadAllText(first));
            Assert.Equal(first, InputSpool.ReadablePath(fifo));
            Assert.Equal("one\ntwo\n", File.ReadAllText(InputSpool.ReadablePath(fifo)));
            string regular = Path.Combine(dir.Path, "r.txt");
            File.WriteAllText(regular, "x");
            Assert.Equal(regular, InputSpool.ReadablePath(regular));
            copy = first;
        }

        await writer.WaitAsync(TimeSpan.FromSeconds(20));
        Assert.False(File.Exists(copy));
        Assert.Equal(fifo, InputSpool.ReadablePath(fifo)); // no scope: unchanged
    }

    // Issue 13 (one spool): standard input given as '-' goes through the same scope as pipes and FIFOs: read once,
    // named by its format for the readers, shown as '-' in messages, deleted with the scope. Before, a second
    // mechanism in the command line (RunContext) did this and its copy was unknown to the Ctrl-C cleanup.
    [Theory]
    [InlineData("{\"frame\":\"a.png\",\"lanes\":[]}\n", ".lanes.jsonl")]
    [InlineData("{\"openlabel\":{\"metadata\":{\"schema_version\":\"1.0.0\"}}}", ".json")]
    public void StandardInput_IsSpooledOnceByTheOneInputSpool(string text, string extension)
    {
        using var stdin = new MemoryStream(System.Text.Encoding.UTF8.GetBytes(text));
        using IDisposable streams = StandardStreams.Use(null, stdin);
        string copy;
        using (InputSpool spool = InputSpool.Begin())
        {
            Assert.False(InputSpool.ReadStdin);
            copy = InputSpool.Input("-");
            Assert.EndsWith(extension, copy, StringComparison.Ordinal);
            Assert.Equal(text, File.ReadAllText(copy));
            Assert.Equal(copy, InputSpool.Input("-")); // the stream is read once; later uses read the copy
            Assert.Equal(copy, InputSpool.ReadablePath(copy));
            Assert.True(InputSpool.ReadStdin);
            Assert.Contains(copy, spool.Copies);
            Assert.Equal("error: -:3: lanes: bad", InputSpool.Display("error: " + copy + ":3: lanes: bad"));
            Assert.Equal("t.lanes.jsonl", InputSpool.Input("t.lanes.jsonl"));
        }

        Assert.False(File.Exists(copy));
        Assert.Throws<InvalidOperationException>(() => InputSpool.Input("-")); // outside a command's scope
    }
}
