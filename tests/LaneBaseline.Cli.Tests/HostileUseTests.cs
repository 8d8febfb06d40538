using System.Diagnostics;
using System.Text.Json;
using LaneBaseline.Core.IO;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Testing;
using Xunit;

namespace LaneBaseline.Cli.Tests;

// Issue 17 (hostile input and careless use), items 1, 2, 4, 5, 6, 7 and 15, through the real command line.
// Source for the pipe cases: POSIX.1-2017, pipe(7)/mkfifo(3): data read from a FIFO is gone, and a second open after
// the writer closed reads end-of-file at once; so a command that opens an input twice sees nothing the second time.
public sealed class HostileUseTests : IDisposable
{
    private readonly TempDir dir = new();

    public void Dispose() => dir.Dispose();

    [Fact]
    public void Score_TruthAndPredictionsFromPipes_ScoreEveryFrame()
    {
        if (!OperatingSystem.IsLinux())
        {
            return;
        }

        (string truth, string pred) = WriteSet();
        string json = dir.File("s.json"), expectedJson = dir.File("e.json");
        Assert.Equal(0, CliRunner.Run("score", "--truth", truth, "--pred", pred, "--json", expectedJson, "--bootstrap", "0").Exit);
        using (var truthPipe = new Fifo(dir.File("truth.fifo"), File.ReadAllBytes(truth)))
        using (var predPipe = new Fifo(dir.File("pred.fifo"), File.ReadAllBytes(pred)))
        {
            (int exit, _, string err) = CliRunner.Run("score", "--truth", truthPipe.Path, "--pred", predPipe.Path, "--json", json, "--bootstrap", "0", "--min-f1", "0.9");
            Assert.True(exit == 4, err); // the hand set's F1@0.50 is 4/7: the gate must fail, not pass on nothing
        }

        using JsonDocument doc = JsonDocument.Parse(File.ReadAllBytes(json));
        Assert.Equal(3, doc.RootElement.GetProperty("frames").GetInt32());
        using JsonDocument expected = JsonDocument.Parse(File.ReadAllBytes(expectedJson));
        Assert.Equal(
            expected.RootElement.GetProperty("iou_f1").GetRawText(),
            doc.RootElement.GetProperty("iou_f1").GetRawText());
        Assert.Empty(Directory.GetFiles(Path.GetTempPath(), "lanebaseline-input-" + Environment.ProcessId + "-*"));
    }

    [Fact]
    public void Score_EmptyTruthFromPipe_IsBadInput()
    {
        if (!OperatingSystem.IsLinux())
        {
            return;
        }

        (_, string pred) = WriteSet();
        using var truthPipe = new Fifo(dir.File("empty.fifo"), []);
        (int exit, _, string err) = CliRunner.Run("score", "--truth", truthPipe.Path, "--pred", pred, "--bootstrap", "0", "--min-f1", "0.5");
        Assert.Equal(3, exit);
        Assert.Contains("empty.fifo", err, StringComparison.Ordinal);
    }

    [Fact]
    public void Audit_PredictionsAndBaselineFromPipes_SameFindingsAndOverlaysAsFiles()
    {
        if (!OperatingSystem.IsLinux())
        {
            return;
        }

        (string truth, string pred) = WriteSet();
        string a = dir.File("a.jsonl"), b = dir.File("b.jsonl");
        Assert.Equal(0, CliRunner.Run("audit", "--pred", pred, "--baseline", truth, "-o", a, "--overlay-count", "5").Exit);
        using (var predPipe = new Fifo(dir.File("p.fifo"), File.ReadAllBytes(pred)))
        using (var basePipe = new Fifo(dir.File("b.fifo"), File.ReadAllBytes(truth)))
        {
            (int exit, _, string err) = CliRunner.Run("audit", "--pred", predPipe.Path, "--baseline", basePipe.Path, "-o", b, "--overlay-count", "5");
            Assert.True(exit == 0, err);
        }

        Assert.Equal(File.ReadAllBytes(a), File.ReadAllBytes(b));
        string[] expected = [.. Directory.GetFiles(dir.File("a.overlays")).Select(Path.GetFileName).Order(StringComparer.Ordinal)!];
        Assert.NotEmpty(expected); // the constructed predictions disagree with the baseline, so there are frames to draw
        Assert.Equal(expected, Directory.GetFiles(dir.File("b.overlays")).Select(Path.GetFileName).Order(StringComparer.Ordinal));
    }

    [Fact]
    public void Detect_TruncatedJpeg_IsBadInputNamingTheFrame_OrSkippedWithKeepGoing()
    {
        string frames = dir.File("frames");
        Directory.CreateDirectory(frames);
        string source = RepoPaths.Combine("sample-frames", "lap-0000");
        string[] jpgs = [.. Directory.GetFiles(source, "*.jpg").Order(StringComparer.Ordinal).Take(3)];
        File.Copy(jpgs[0], Path.Combine(frames, "a.jpg"));
        byte[] whole = File.ReadAllBytes(jpgs[1]);
        File.WriteAllBytes(Path.Combine(frames, "b.jpg"), whole.AsSpan(0, whole.Length / 2).ToArray()); // cut mid-scan
        File.Copy(jpgs[2], Path.Combine(frames, "c.jpg"));
        string output = dir.File("out.lanes.jsonl");

        (int exit, _, string err) = CliRunner.Run("detect", "--frames", frames, "-o", output);
        Assert.Equal(3, exit);
        Assert.Contains("b.jpg", err, StringComparison.Ordinal);
        Assert.Contains("truncated JPEG", err, StringComparison.Ordinal);
        Assert.False(File.Exists(output));

        (exit, _, err) = CliRunner.Run("detect", "--frames", frames, "-o", output, "--keep-going");
        Assert.Equal(0, exit);
        Assert.Contains("skipped 1 bad frame(s): b.jpg", err, StringComparison.Ordinal);
        using var reader = LaneFileReader.Open(output, sizeRequired: false);
        Assert.Equal(["a.jpg", "c.jpg"], reader.ReadAll().Select(r => r.Frame));
    }

    [Fact]
    public void Detect_HostileKeysFromAListFile_OverlaysAndStagesStayInTheirFolders()
    {
        // A list file naming frames by '../' and by an absolute path: the keys keep those forms, the images must not
        // be written beside the source frames (one run used to replace a source image with its overlay).
        string images = dir.File("images");
        Directory.CreateDirectory(images);
        string jpg = Directory.GetFiles(RepoPaths.Combine("sample-frames", "lap-0000"), "*.jpg").Order(StringComparer.Ordinal).First();
        File.Copy(jpg, Path.Combine(images, "up.jpg"));
        File.Copy(jpg, Path.Combine(images, "abs.jpg"));
        string lists = dir.File("lists");
        Directory.CreateDirectory(lists);
        string list = Path.Combine(lists, "frames.txt");
        File.WriteAllText(list, "../images/up.jpg\n" + Path.Combine(images, "abs.jpg") + "\n");
        string overlays = dir.File("out/overlays"), stages = dir.File("out/stages");
        Directory.CreateDirectory(dir.File("out"));

        (int exit, _, string err) = CliRunner.Run("detect", "--frames", list, "-o", dir.File("out/l.lanes.jsonl"), "--overlays", overlays, "--stages", stages);
        Assert.True(exit == 0, err);
        Assert.Equal(["abs.jpg", "up.jpg"], Directory.GetFiles(images).Select(Path.GetFileName).Order(StringComparer.Ordinal));
        Assert.Equal(["frames.txt"], Directory.GetFiles(lists).Select(Path.GetFileName));
        Assert.Equal(2, Directory.GetFiles(overlays, "*.png", SearchOption.AllDirectories).Length);
        Assert.Equal(2, Directory.GetFiles(stages, "*.stages.png", SearchOption.AllDirectories).Length);
        Assert.Equal(4, Directory.GetFiles(dir.File("out"), "*.png", SearchOption.AllDirectories).Length);
    }

    [Fact]
    public void Convert_HostileKeysToMasks_StayInTheMaskFolder()
    {
        string outside = dir.File("victim.png");
        string abs = dir.File("abs.png");
        string input = dir.File("hostile.lanes.jsonl");
        Lanes.WriteFile(input,
        [
            Lanes.Truth("../victim.png", 64, 48, Lanes.Vertical(20, 48)),
            Lanes.Truth(abs, 64, 48, Lanes.Vertical(30, 48)),
            Lanes.Truth("ok/frame.png", 64, 48, Lanes.Vertical(40, 48)),
        ]);
        string masks = dir.File("masks");
        (int exit, _, string err) = CliRunner.Run("convert", input, "-o", masks, "--to", "masks");
        Assert.True(exit == 0, err);
        Assert.False(File.Exists(outside));
        Assert.False(File.Exists(abs));
        Assert.Equal(3, Directory.GetFiles(masks, "*.png", SearchOption.AllDirectories).Length);
        Assert.Equal(["hostile.lanes.jsonl", "masks"], Directory.GetFileSystemEntries(dir.Path).Select(Path.GetFileName).Order(StringComparer.Ordinal)!);
    }

    [Fact]
    public void OutputThatIsAnInput_OrOneFileForTwoOutputs_IsUsageErrorBeforeAnyWork()
    {
        (string truth, string pred) = WriteSet();
        byte[] truthBytes = File.ReadAllBytes(truth), predBytes = File.ReadAllBytes(pred);
        string hard = dir.File("hard.lanes.jsonl");
        File.CreateSymbolicLink(dir.File("link.json"), truth);
        string x = dir.File("x.out");
        string[][] cases =
        [
            ["score", "--truth", truth, "--pred", pred, "--json", truth],
            ["score", "--truth", truth, "--pred", pred, "--csv", pred],
            ["score", "--truth", truth, "--pred", pred, "--report", pred],
            ["score", "--truth", truth, "--pred", pred, "--json", dir.File("link.json")],
            ["score", "--truth", truth, "--pred", pred, "--json", x, "--csv", x],
            ["merge", truth, pred, "-o", truth],
            ["audit", "--pred", pred, "-o", pred],
            ["convert", pred, "-o", pred],
            ["report", "--score", truth, "-o", truth],
        ];
        foreach (string[] args in cases)
        {
            (int exit, _, string err) = CliRunner.Run(args);
            Assert.True(exit == 2, string.Join(' ', args) + " -> " + exit + ": " + err);
            Assert.StartsWith("usage error:", err, StringComparison.Ordinal);
        }

        Assert.Equal(truthBytes, File.ReadAllBytes(truth));
        Assert.Equal(predBytes, File.ReadAllBytes(pred));
        Assert.False(File.Exists(x));
        Assert.Empty(Directory.GetFiles(dir.Path, "*.tmp"));

        if (OperatingSystem.IsLinux() && Link(truth, hard))
        {
            (int exit, _, _) = CliRunner.Run("score", "--truth", truth, "--pred", pred, "--json", hard);
            Assert.Equal(2, exit); // a hard link is the same file under another name
        }
    }

    [Fact]
    public void Detect_ExistingOutput_KeptWhenALaterFrameIsCorrupt()
    {
        string frames = dir.File("frames");
        Directory.CreateDirectory(frames);
        string[] jpgs = [.. Directory.GetFiles(RepoPaths.Combine("sample-frames", "lap-0000"), "*.jpg").Order(StringComparer.Ordinal).Take(3)];
        for (int i = 0; i < jpgs.Length; i++)
        {
            File.Copy(jpgs[i], Path.Combine(frames, $"f{i}.jpg"));
        }

        string output = dir.File("out.lanes.jsonl");
        Assert.Equal(0, CliRunner.Run("detect", "--frames", frames, "-o", output).Exit);
        byte[] before = File.ReadAllBytes(output), config = File.ReadAllBytes(dir.File("out.config.yaml"));
        File.WriteAllBytes(Path.Combine(frames, "f1.jpg"), [0xFF, 0xD8, 0xFF, 0xE0, 0, 0, 0]); // corrupt second frame

        (int exit, _, string err) = CliRunner.Run("detect", "--frames", frames, "-o", output, "--config", "default");
        Assert.Equal(3, exit);
        Assert.Contains("f1.jpg", err, StringComparison.Ordinal);
        Assert.Equal(before, File.ReadAllBytes(output));
        Assert.Equal(config, File.ReadAllBytes(dir.File("out.config.yaml")));
        Assert.Equal(["out.config.yaml", "out.lanes.jsonl"], Directory.GetFiles(dir.Path).Select(Path.GetFileName).Order(StringComparer.Ordinal));
    }

    [Fact]
    public void SecondWriterOfTheSameOutput_FailsClearly_AndTheFirstWinsIntact()
    {
        (string truth, string pred) = WriteSet();
        string json = dir.File("s.json");
        using (var first = new AtomicFile(json))
        {
            first.Writer.Write("{}\n");
            (int exit, _, string err) = CliRunner.Run("score", "--truth", truth, "--pred", pred, "--json", json, "--bootstrap", "0");
            Assert.Equal(3, exit);
            Assert.Contains("another process is writing this output", err, StringComparison.Ordinal);
            first.Commit();
        }

        Assert.Equal("{}\n", File.ReadAllText(json));
        Assert.Empty(Directory.GetFiles(dir.Path, "*.tmp"));
    }

    [Fact]
    public void Score_ReportGalleryImageMissing_NoOutputCommitted()
    {
        (string truth, string pred) = WriteSet();
        string frames = dir.File("frames");
        Directory.CreateDirectory(frames); // no images: the gallery cannot be drawn
        string json = dir.File("s.json"), csv = dir.File("s.csv"), page = dir.File("s.html");
        (int exit, _, string err) = CliRunner.Run("score", "--truth", truth, "--pred", pred, "--json", json, "--csv", csv, "--report", page, "--frames", frames, "--bootstrap", "0");
        Assert.Equal(3, exit);
        Assert.Contains("not found under --frames", err, StringComparison.Ordinal);
        Assert.False(File.Exists(json));
        Assert.False(File.Exists(csv));
        Assert.False(File.Exists(page));
        Assert.Empty(Directory.GetFiles(dir.Path, "*.tmp"));
    }

    [Fact]
    public void Audit_OverlayFolderIsAFile_IsBadInputBeforeTheFindingsAreWritten()
    {
        // Before: the findings file was committed, then the overlay folder failed as "internal error" (exit 1).
        (string truth, string pred) = WriteSet();
        string findings = dir.File("out.jsonl");
        File.WriteAllText(dir.File("out.overlays"), "not a folder");
        (int exit, _, string err) = CliRunner.Run("audit", "--pred", pred, "--baseline", truth, "-o", findings, "--overlay-count", "3");
        Assert.Equal(3, exit);
        Assert.Contains("out.overlays", err, StringComparison.Ordinal);
        Assert.Contains("give a folder", err, StringComparison.Ordinal);
        Assert.DoesNotContain("internal error", err, StringComparison.Ordinal);
        Assert.False(File.Exists(findings));
        Assert.Equal("not a folder", File.ReadAllText(dir.File("out.overlays")));
    }

    [Theory]
    [InlineData("--overlays")]
    [InlineData("--stages")]
    public void Detect_ImageFolderIsAFile_IsBadInputNamingTheOption_NotTheFrame(string option)
    {
        // Before: the frame was blamed ("cannot write ...") after the first frame's work, as if the image were bad.
        string blocker = dir.File("blocker");
        File.WriteAllText(blocker, "x");
        string output = dir.File("d.lanes.jsonl");
        (int exit, _, string err) = CliRunner.Run("detect", "--frames", RepoPaths.Combine("sample-frames", "lap-0000"), "-o", output, option, blocker);
        Assert.Equal(3, exit);
        Assert.Contains(option + " names a folder", err, StringComparison.Ordinal);
        Assert.Contains("blocker", err, StringComparison.Ordinal);
        Assert.False(File.Exists(output));
    }

    [Fact]
    public void Outputs_UnderAFile_AreBadInputBeforeAnyWork()
    {
        // Before: "internal error: IOException" (exit 1) after scoring, or after the first detected frame.
        (string truth, string pred) = WriteSet();
        string blocker = dir.File("F");
        File.WriteAllText(blocker, "x");
        (string Name, string[] Args)[] runs =
        [
            ("score --json", ["score", "--truth", truth, "--pred", pred, "--bootstrap", "0", "--json", Path.Combine(blocker, "x.json")]),
            ("score --report", ["score", "--truth", truth, "--pred", pred, "--bootstrap", "0", "--report", Path.Combine(blocker, "sub", "x.html")]),
            ("detect -o", ["detect", "--frames", RepoPaths.Combine("sample-frames", "lap-0000"), "-o", Path.Combine(blocker, "d.lanes.jsonl")]),
            ("audit -o", ["audit", "--pred", pred, "-o", Path.Combine(blocker, "f.jsonl")]),
        ];
        foreach ((string name, string[] args) in runs)
        {
            (int exit, string stdout, string err) = CliRunner.Run(args);
            Assert.True(exit == 3, name + ": exit " + exit + ": " + err);
            Assert.Contains("'" + blocker + "' is a file", err, StringComparison.Ordinal);
            Assert.DoesNotContain("internal error", err, StringComparison.Ordinal);
            Assert.Equal(string.Empty, stdout); // refused before the table or any record was printed
        }

        Assert.Equal("x", File.ReadAllText(blocker));
    }

    [Fact]
    public void Score_ReportGalleryFolderIsAFile_IsBadInputBeforeAnyOutput()
    {
        (string truth, string pred) = WriteSet();
        string frames = dir.File("frames");
        Directory.CreateDirectory(frames);
        string json = dir.File("g.json"), page = dir.File("g.html");
        File.WriteAllText(dir.File("g.frames"), "x"); // where the page's full-size regression overlays would go
        (int exit, _, string err) = CliRunner.Run("score", "--truth", truth, "--pred", pred, "--json", json, "--report", page, "--frames", frames, "--bootstrap", "0");
        Assert.Equal(3, exit);
        Assert.Contains("g.frames", err, StringComparison.Ordinal);
        Assert.Contains("give a folder", err, StringComparison.Ordinal);
        Assert.False(File.Exists(json));
        Assert.False(File.Exists(page));
    }

    private static bool Link(string target, string link)
    {
        using Process? p = Process.Start(new ProcessStartInfo("ln", [target, link]) { UseShellExecute = false });
        p?.WaitForExit();
        return p is { ExitCode: 0 };
    }

    // Three 320x240 frames, by hand: truth a 1 lane, b 2 lanes, c 1 lane (4); predictions a exact, b one exact lane and
    // one 100 px off (IoU 0), c none. At IoU 0.50: TP 2, FP 1, FN 2 -> P 2/3, R 1/2, F1 = 4/7, so a 0.9 gate fails.
    private (string Truth, string Pred) WriteSet()
    {
        string truth = dir.File("truth.lanes.jsonl"), pred = dir.File("pred.lanes.jsonl");
        if (!File.Exists(truth))
        {
            Lanes.WriteFile(truth,
            [
                Lanes.Truth("s/000001.png", 320, 240, Lanes.Vertical(100, 240)),
                Lanes.Truth("s/000002.png", 320, 240, Lanes.Vertical(100, 240), Lanes.Vertical(200, 240)),
                Lanes.Truth("s/000003.png", 320, 240, Lanes.Vertical(150, 240)),
            ]);
            Lanes.WriteFile(pred, [Lanes.Truth("s/000001.png", 320, 240, Lanes.Vertical(100, 240)), Lanes.Truth("s/000002.png", 320, 240, Lanes.Vertical(100, 240), Lanes.Vertical(300, 240))]);
        }

        return (truth, pred);
    }

    /// <summary>
    /// A named pipe fed by a background thread: the first reader gets <c>content</c>, every later open reads
    /// end-of-file at once, as a shell's <c>&lt;(cat file)</c> behaves once consumed.
    /// </summary>
    private sealed class Fifo : IDisposable
    {
        private readonly Thread writer;
        private volatile bool stop;

        public Fifo(string path, byte[] content)
        {
            Path = path;
            using (Process p = Process.Start(new ProcessStartInfo("mkfifo", [path]) { UseShellExecute = false })!)
            {
                p.WaitForExit();
                Assert.Equal(0, p.ExitCode);
            }

            writer = new Thread(() =>
            {
                bool first = true;
                while (!stop)
                {
                    try
                    {
                        using var s = new FileStream(path, FileMode.Open, FileAccess.Write, FileShare.ReadWrite);
                        if (first && !stop)
                        {
                            s.Write(content);
                        }

                        first = false;
                    }
                    catch (IOException)
                    {
                    }

                    Thread.Sleep(20);
                }
            })
            { IsBackground = true };
            writer.Start();
        }

        public string Path { get; }

        public void Dispose()
        {
            stop = true;
            // Unblock a writer waiting in open(2) for a reader: opening a FIFO read-write never blocks on Linux (fifo(7)).
            using (new FileStream(Path, FileMode.Open, FileAccess.ReadWrite, FileShare.ReadWrite))
            {
                Thread.Sleep(50);
            }

            writer.Join(TimeSpan.FromSeconds(10));
        }
    }
}
