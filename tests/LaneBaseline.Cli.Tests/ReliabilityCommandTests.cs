using System.Globalization;
using System.Text;
using LaneBaseline.Testing;
using OpenCvSharp;
using Xunit;

namespace LaneBaseline.Cli.Tests;

// Regression tests of issue 17 items 8, 10 and 13 from the command line: each hostile input gets exit 2 or 3 and
// one clear line (docs/cli.md exit codes; limits in docs/reliability.md), never exit 1 or a stack trace.
public sealed class ReliabilityCommandTests : IDisposable
{
    private readonly TempDir dir = new();

    public void Dispose() => dir.Dispose();

    private string Truth(string name = "t.lanes.jsonl", string frame = "a.png", string tags = "")
    {
        string path = dir.File(name);
        File.WriteAllText(path, "{\"frame\":\"" + frame + "\",\"width\":640,\"height\":360," + tags + "\"lanes\":[{\"points\":[[100,359],[200,100]]}]}\n");
        return path;
    }

    private static void AssertOneLine(string err, string prefix)
    {
        // progress and timing lines may come first; the failure is one line, the last
        string[] lines = err.Split('\n', StringSplitOptions.RemoveEmptyEntries);
        Assert.Single(lines, l => l.Contains("error", StringComparison.Ordinal));
        Assert.StartsWith(prefix, lines[^1], StringComparison.Ordinal);
        Assert.DoesNotContain(" at LaneBaseline.", err, StringComparison.Ordinal);
    }

    // Item 8. Before: 100,000 lanes in one frame asked for a frame-sized canvas each (~90 GB at 1280x720) and the
    // process died (exit 1 or killed).
    [Fact]
    public void Score_HundredThousandLanesInOneFrame_Exit3BeforeScoring()
    {
        string truth = Truth();
        string pred = dir.File("p.lanes.jsonl");
        var line = new StringBuilder("{\"frame\":\"a.png\",\"lanes\":[");
        for (int i = 0; i < 100_000; i++)
        {
            line.Append(i == 0 ? string.Empty : ",").Append(CultureInfo.InvariantCulture, $"{{\"points\":[[{i % 640},359],[{i % 640},0]]}}");
        }

        File.WriteAllText(pred, line.Append("]}\n").ToString());
        string json = dir.File("s.json");
        (int exit, _, string err) = CliRunner.Run("score", "--truth", truth, "--pred", pred, "--json", json);
        Assert.Equal(3, exit);
        AssertOneLine(err, "error: " + pred + ":1: lanes: more than 500 lanes in one frame");
        Assert.False(File.Exists(json));
    }

    // Item 13. Before: --bootstrap 2147483647 ran for days, --lane-width-px 100000 failed inside OpenCV (exit 1).
    [Theory]
    [InlineData("--bootstrap", "2147483647", "usage error: --bootstrap must be from 0 to 100000 resamples")]
    [InlineData("--lane-width-px", "100000", "usage error: --lane-width-px must be a whole number from 1 to 1000")]
    public void Score_AbsurdOptionValue_Exit2(string option, string value, string message)
    {
        string truth = Truth();
        (int exit, _, string err) = CliRunner.Run("score", "--truth", truth, "--pred", truth, option, value);
        Assert.Equal(2, exit);
        AssertOneLine(err, message);
    }

    // Item 13. Before: the rename onto a folder failed with an IOException (exit 1).
    [Fact]
    public void Score_OutputPathIsAFolder_Exit3()
    {
        string truth = Truth();
        string folder = dir.File("out");
        Directory.CreateDirectory(folder);
        (int exit, _, string err) = CliRunner.Run("score", "--truth", truth, "--pred", truth, "--json", folder);
        Assert.Equal(3, exit);
        AssertOneLine(err, "error: " + folder + ": the output path is a folder; give a file name");
    }

    // Item 13 (error after partial output). A file output that is an existing folder is refused before any work, so
    // nothing reaches stdout and no work is wasted. Before: score printed its table and then failed, tune ran every
    // trial and then failed, and merge and detect wrote nothing but read every input first.
    [Theory]
    [InlineData("score", "--json")]
    [InlineData("score", "--csv")]
    [InlineData("audit", "-o")]
    [InlineData("merge", "-o")]
    [InlineData("convert", "-o")]
    [InlineData("detect", "-o")]
    [InlineData("report", "-o")]
    [InlineData("tune", "-o")]
    [InlineData("bench", "--json")]
    public void OutputPathIsAFolder_EveryCommand_Exit3BeforeAnyOutput(string command, string option)
    {
        string truth = Truth();
        string frames = dir.File("frames");
        Directory.CreateDirectory(frames);
        using (var black = new Mat(360, 640, MatType.CV_8UC3, Scalar.All(0)))
        {
            Cv2.ImWrite(Path.Combine(frames, "a.png"), black);
        }

        string scoreJson = dir.File("score.json");
        Assert.Equal(0, CliRunner.Run("score", "--truth", truth, "--pred", truth, "--json", scoreJson, "--bootstrap", "0").Exit);
        string folder = dir.File("out");
        Directory.CreateDirectory(folder);
        string[] args = command switch
        {
            "score" => ["score", "--truth", truth, "--pred", truth, option, folder],
            "audit" => ["audit", "--pred", truth, option, folder],
            "merge" => ["merge", truth, option, folder],
            "convert" => ["convert", truth, "--to", "openlabel", option, folder],
            "detect" => ["detect", frames, option, folder],
            "report" => ["report", "--score", scoreJson, option, folder],
            "tune" => ["tune", "--frames", frames, "--truth", truth, "--budget", "2", "--holdout", "0", "--allow-overlap", option, folder],
            _ => ["bench", "--render", "1", "--size", "128x64", "--warmup", "0", "--passes", "1", option, folder],
        };
        (int exit, string stdout, string err) = CliRunner.Run(args);
        Assert.Equal(3, exit);
        Assert.Equal(string.Empty, stdout);
        AssertOneLine(err, "error: " + folder + ": the output path is a folder; give a file name");
        Assert.Empty(Directory.GetFileSystemEntries(folder));
    }

    // Issue 17 item 5 for tune and bench: an output that is an input, or one file named by two outputs (the preset
    // and its trial log), is a usage error before any work, and the input is left as it was. Before: tune
    // overwrote its truth, its search space or its own trial log, and bench overwrote its frame list or preset.
    [Theory]
    [InlineData("tune-truth", "--truth")]
    [InlineData("tune-space", "--space")]
    [InlineData("tune-log", "-o")]
    [InlineData("bench-frames", "--frames")]
    [InlineData("bench-config", "--config")]
    public void TuneAndBench_OutputIsAnInput_Exit2BeforeAnyWork(string when, string inputOption)
    {
        string truth = Truth();
        string frames = dir.File("frames");
        Directory.CreateDirectory(frames);
        using (var black = new Mat(360, 640, MatType.CV_8UC3, Scalar.All(0)))
        {
            Cv2.ImWrite(Path.Combine(frames, "a.png"), black);
        }

        string list = dir.File("frames.txt");
        File.WriteAllText(list, Path.Combine(frames, "a.png") + "\n");
        string space = dir.File("space.yaml");
        File.WriteAllText(space, "parameters:\n  - key: color.minSaturation\n    min: 10\n    max: 60\n");
        string preset = dir.File("preset.yaml");
        File.WriteAllText(preset, "tracking:\n  enabled: false\n");
        // the trial log of -o P is P.trials.jsonl: for "tune-log" the truth is that file
        string logTruth = dir.File("p.trials.jsonl");
        File.Copy(truth, logTruth);
        string[] tune = ["tune", "--frames", frames, "--truth", when == "tune-log" ? logTruth : truth, "--budget", "2", "--holdout", "0", "--allow-overlap"];
        string[] args = when switch
        {
            "tune-truth" => [.. tune, "-o", truth],
            "tune-space" => [.. tune, "--space", space, "-o", space],
            "tune-log" => [.. tune, "-o", dir.File("p")],
            "bench-frames" => ["bench", "--frames", list, "--json", list],
            _ => ["bench", "--config", preset, "--json", preset],
        };
        string victim = when switch
        {
            "tune-truth" => truth,
            "tune-space" => space,
            "tune-log" => logTruth,
            "bench-frames" => list,
            _ => preset,
        };
        byte[] before = File.ReadAllBytes(victim);
        (int exit, string stdout, string err) = CliRunner.Run(args);
        Assert.Equal(2, exit);
        Assert.Equal(string.Empty, stdout);
        Assert.Contains(when == "tune-log" ? "would overwrite the input given as --truth" : "would overwrite the input given as " + inputOption, err, StringComparison.Ordinal);
        Assert.Equal(before, File.ReadAllBytes(victim));
    }

    // Source: docs/detect.md ("a preset with several errors lists all of them"), end to end: detect prints every
    // error of the preset, one "error:" line each, in file order, exit 3, no output. Before, the command line printed
    // them as one line joined by "\u000A" escapes.
    [Fact]
    public void Detect_PresetWithSeveralErrors_ListsEachOnItsOwnLine()
    {
        string frames = dir.File("frames");
        Directory.CreateDirectory(frames);
        using (var black = new Mat(360, 640, MatType.CV_8UC3, Scalar.All(0)))
        {
            Cv2.ImWrite(Path.Combine(frames, "a.png"), black);
        }

        string preset = dir.File("q.yaml");
        File.WriteAllText(preset, "gradient:\n  cannyLowThreshhold: 40\nsearch:\n  windowCount: many\nhough:\n  votes: 0\nbogus: 1\n");
        string output = dir.File("x.lanes.jsonl");
        (int exit, string stdout, string err) = CliRunner.Run("detect", "--frames", frames, "-o", output, "--config", preset);
        Assert.Equal(3, exit);
        Assert.Equal(string.Empty, stdout);
        string[] lines = err.Split('\n', StringSplitOptions.RemoveEmptyEntries);
        Assert.Equal(4, lines.Length);
        Assert.StartsWith("error: " + preset + ":2: gradient.cannyLowThreshhold: unknown key", lines[0], StringComparison.Ordinal);
        Assert.StartsWith("error: " + preset + ":4: search.windowCount:", lines[1], StringComparison.Ordinal);
        Assert.StartsWith("error: " + preset + ":6: hough.votes:", lines[2], StringComparison.Ordinal);
        Assert.StartsWith("error: " + preset + ":7: bogus: unknown key", lines[3], StringComparison.Ordinal);
        Assert.DoesNotContain("\\u000A", err, StringComparison.Ordinal);
        Assert.False(File.Exists(output));
    }

    // Item 13. Before: a full disk surfaced as "internal error: IOException" (exit 1). /dev/full answers every
    // write with ENOSPC (Linux man page full(4)).
    [Fact]
    public void Score_DiskFull_Exit3()
    {
        if (!File.Exists("/dev/full"))
        {
            return; // not Linux: nothing to simulate a full disk with
        }

        string truth = Truth();
        (int exit, _, string err) = CliRunner.Run("score", "--truth", truth, "--pred", truth, "--json", "/dev/full", "--bootstrap", "0");
        Assert.Equal(3, exit);
        AssertOneLine(err, "error: no space left on the device while writing");
    }

    // Item 13. Before: a frame key with an escape sequence and a line break was printed raw, so the message could
    // drive the terminal and spread over two lines.
    [Fact]
    public void ControlCharactersInKeys_AreEscapedWhenPrinted()
    {
        string path = dir.File("k.lanes.jsonl");
        string rec = "{\"frame\":\"x\\u001b[31m\\ny\",\"width\":640,\"height\":360,\"lanes\":[]}\n";
        File.WriteAllText(path, rec + rec);
        (int exit, _, string err) = CliRunner.Run("score", "--truth", path, "--pred", path);
        Assert.Equal(3, exit);
        AssertOneLine(err, "error: " + path + ":2: frame: duplicate frame 'x\\u001B[31m\\u000Ay'");
        Assert.DoesNotContain('\u001b', err);
    }

    // Item 13 (22,000 tags x 40 systems). Before: every tag got a breakdown per system and the report's per-tag
    // lookups were quadratic; now more than 1,000 distinct tags is bad input before anything is scored.
    [Fact]
    public void Score_TooManyDistinctTags_Exit3()
    {
        string path = dir.File("tags.lanes.jsonl");
        string tags = string.Join(",", Enumerable.Range(0, 1001).Select(i => "\"t" + i.ToString(CultureInfo.InvariantCulture) + "\""));
        File.WriteAllText(path, "{\"frame\":\"a.png\",\"width\":640,\"height\":360,\"tags\":[" + tags + "],\"lanes\":[]}\n");
        (int exit, _, string err) = CliRunner.Run("score", "--truth", path, "--pred", path);
        Assert.Equal(3, exit);
        AssertOneLine(err, "error: " + path + ":1: tags: frame 'a.png' brings the number of distinct tags above 1000");
    }

    // Item 13: OpenCV's own texts (function, source file) are translated into one plain line.
    [Fact]
    public void OpenCvFailure_TranslatedToOneLine()
    {
        var ex = new OpenCVException(ErrorCode.StsNoMem, "OutOfMemoryError", "Failed to allocate 92160000000 bytes", "/build/alloc.cpp", 73);
        string text = CommandRunner.TranslateOpenCv(ex);
        Assert.Equal("the image library ran out of memory (Failed to allocate 92160000000 bytes in OutOfMemoryError)", text);
    }

    // Item 10. Before: a link to the parent folder made detect list the frame again on every level of the loop.
    [Fact]
    public void Detect_LinkLoopInFramesFolder_EachFrameOnce()
    {
        string frames = dir.File("frames");
        Directory.CreateDirectory(frames);
        using (var image = new Mat(48, 64, MatType.CV_8UC3, Scalar.All(40)))
        {
            Cv2.ImWrite(Path.Combine(frames, "f0001.png"), image);
        }

        Directory.CreateSymbolicLink(Path.Combine(frames, "loop"), frames);
        foreach (string[] extra in new[] { Array.Empty<string>(), ["--follow-links"] })
        {
            string output = dir.File("d" + extra.Length.ToString(CultureInfo.InvariantCulture) + ".lanes.jsonl");
            (int exit, _, string err) = CliRunner.Run(["detect", "--frames", frames, "-o", output, .. extra]);
            Assert.True(exit == 0, err);
            Assert.Single(File.ReadAllLines(output));
        }
    }
}
