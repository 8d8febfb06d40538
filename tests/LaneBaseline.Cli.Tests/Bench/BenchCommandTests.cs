using System.Text.Json;
using LaneBaseline.Cli.Bench;
using LaneBaseline.Testing;
using OpenCvSharp;
using Xunit;

namespace LaneBaseline.Cli.Tests.Bench;

/// <summary>
/// The bench command's contract: its JSON schema, that the pipeline and the floor ran the same frames, and its exit
/// codes. No assertion depends on how fast anything ran (speed is what the command reports, not what tests check).
/// </summary>
public sealed class BenchCommandTests : IDisposable
{
    private readonly TempDir dir = new();

    public void Dispose() => dir.Dispose();

    [Fact]
    public void Json_RenderedFrames_HasEveryKeyWithPositiveFiniteNumbers()
    {
        string json = dir.File("bench.json");
        var (code, stdout, err) = CliRunner.Run(
            "bench", "--render", "2", "--size", "128x96", "--thread-counts", "1,2", "--warmup", "1", "--passes", "2", "--json", json);
        Assert.True(code == 0, err);
        Assert.Contains("pipeline/floor", stdout, StringComparison.Ordinal);

        using JsonDocument doc = JsonDocument.Parse(File.ReadAllText(json));
        JsonElement root = doc.RootElement;
        Assert.Equal("lanebaseline", root.GetProperty("tool").GetString());
        Assert.Equal("bench", root.GetProperty("command").GetString());
        Assert.Equal(BenchReportWriter.SchemaVersion, root.GetProperty("schema_version").GetInt32());

        JsonElement machine = root.GetProperty("machine");
        Assert.False(string.IsNullOrWhiteSpace(machine.GetProperty("cpu_model").GetString()));
        // Source: the .NET runtime itself (Environment.ProcessorCount) and OpenCV itself (cv::getVersionString).
        Assert.Equal(Environment.ProcessorCount, machine.GetProperty("logical_cores").GetInt32());
        JsonElement opencv = machine.GetProperty("opencv");
        Assert.Equal(Cv2.GetVersionString(), opencv.GetProperty("version").GetString());
        foreach (string key in new[] { "simd_baseline", "simd_dispatched", "host_simd", "ipp", "parallel_framework" })
        {
            Assert.False(string.IsNullOrWhiteSpace(opencv.GetProperty(key).GetString()), key);
        }

        Assert.Equal(1, opencv.GetProperty("threads_per_worker").GetInt32());

        JsonElement input = root.GetProperty("input");
        Assert.Equal("render", input.GetProperty("source").GetString());
        Assert.Equal(2, input.GetProperty("frame_count").GetInt32());
        Assert.Equal(2, input.GetProperty("frames").GetArrayLength());
        AssertStats(input.GetProperty("decode_ms"), 2);

        JsonElement[] runs = [.. root.GetProperty("runs").EnumerateArray()];
        Assert.Equal([1, 2], runs.Select(r => r.GetProperty("workers").GetInt32()));
        foreach (JsonElement run in runs)
        {
            Assert.Equal(128, run.GetProperty("width").GetInt32());
            Assert.Equal(96, run.GetProperty("height").GetInt32());
            JsonElement pipeline = run.GetProperty("pipeline");
            AssertStats(pipeline.GetProperty("frame_ms"), 4);
            string[] stageNames = [.. pipeline.GetProperty("stages").EnumerateArray().Select(s => s.GetProperty("name").GetString()!)];
            Assert.Equal(["resize", "gradient", "hough", "region", "color", "warp", "search", "marking", "calibrate"], stageNames); // 128-wide frames are enlarged first (limits.workingWidthPx); the default preset is calibrated
            foreach (JsonElement s in pipeline.GetProperty("stages").EnumerateArray())
            {
                AssertPositive(s, "median_ms", "p95_ms", "mean_ms");
            }

            JsonElement floor = run.GetProperty("floor");
            AssertStats(floor.GetProperty("frame_ms"), 4);
            Assert.Equal(FloorPrimitives.Names, floor.GetProperty("primitives").EnumerateArray().Select(p => p.GetProperty("name").GetString()));
            foreach (JsonElement p in floor.GetProperty("primitives").EnumerateArray())
            {
                AssertPositive(p, "median_ms", "p95_ms", "mean_ms");
            }

            AssertPositive(run.GetProperty("ratio"), "median_of_pairs", "of_medians");
            AssertPositive(run, "frames_per_second", "peak_rss_bytes");
            double bytes = run.GetProperty("allocated_bytes_per_frame").GetDouble();
            Assert.True(double.IsFinite(bytes) && bytes >= 0, "allocatedBytesPerFrame " + bytes);
            Assert.True(run.GetProperty("max_allocated_bytes_per_frame").GetInt64() >= bytes);
        }

        Assert.Empty(Directory.GetFiles(dir.Path, "*.tmp"));
    }

    [Fact]
    public void FramesFolder_FloorAndPipelineRanTheSameFrames()
    {
        string frames = Path.Combine(dir.Path, "frames");
        var render = CliRunner.Run("render", "--out", frames, "--count", "3", "--size", "160x96", "--seed", "7");
        Assert.True(render.Exit == 0, render.Err);
        string json = dir.File("bench.json");

        var (code, _, err) = CliRunner.Run("bench", "--frames", frames, "--threads", "2", "--warmup", "0", "--passes", "2", "--json", json);

        Assert.True(code == 0, err);
        using JsonDocument doc = JsonDocument.Parse(File.ReadAllText(json));
        string[] inputKeys = [.. doc.RootElement.GetProperty("input").GetProperty("frames").EnumerateArray().Select(e => e.GetString()!)];
        string[] onDisk = [.. Directory.GetFiles(frames, "*.jpg", SearchOption.AllDirectories).Select(f => Path.GetRelativePath(frames, f).Replace('\\', '/')).Order(StringComparer.Ordinal)];
        Assert.Equal(onDisk, inputKeys);
        Assert.Equal("frames", doc.RootElement.GetProperty("input").GetProperty("source").GetString());
        JsonElement run = Assert.Single(doc.RootElement.GetProperty("runs").EnumerateArray());
        Assert.Equal(160, run.GetProperty("width").GetInt32());
        string[] pipelineKeys = Keys(run.GetProperty("pipeline"));
        string[] floorKeys = Keys(run.GetProperty("floor"));

        // Every frame twice (two passes) on each side, recorded independently by each side.
        string[] expected = [.. inputKeys.Concat(inputKeys).Order(StringComparer.Ordinal)];
        Assert.Equal(expected, pipelineKeys.Order(StringComparer.Ordinal));
        Assert.Equal(expected, floorKeys.Order(StringComparer.Ordinal));
        Assert.Equal(pipelineKeys, floorKeys);
        Assert.Equal(expected.Length, run.GetProperty("pipeline").GetProperty("frame_ms").GetProperty("count").GetInt32());
        Assert.Equal(expected.Length, run.GetProperty("floor").GetProperty("frame_ms").GetProperty("count").GetInt32());
    }

    [Fact]
    public void FramesBeyondTheMemoryBudget_AreNotDecoded_AndANoteSaysHowManyWereKept()
    {
        // Issue 17 case 11: bench holds its frames decoded, so their number is bounded by bytes, not only by a count.
        // Ten 64x48 BGR frames of 64*48*3 = 9,216 bytes each; every frame kept also needs a resized copy of the same
        // size, so a budget of 5 * 2 * 9,216 bytes fits exactly five (arithmetic, common practice: 8-bit BGR = 3 B/px).
        string frames = dir.File("small");
        Directory.CreateDirectory(frames);
        for (int i = 0; i < 10; i++)
        {
            using var m = new Mat(48, 64, MatType.CV_8UC3, new Scalar(40 + i, 60, 80));
            Cv2.ImWrite(Path.Combine(frames, $"f{i:D2}.png"), m);
        }

        var request = new BenchRequest
        {
            FramesPath = frames,
            Options = LaneBaseline.Core.Options.KnownPresets.Default,
            ConfigSource = "default",
            Warmup = 0,
            Passes = 1,
            MaxFrames = 60,
            MemoryBudgetBytes = 5 * 2 * 64 * 48 * 3,
        };
        using var err = new StringWriter();
        BenchResult result = new BenchRunner(request, err).Run();
        Assert.Equal(["f00.png", "f01.png", "f02.png", "f03.png", "f04.png"], result.FrameKeys);
        Assert.Contains("bench: 5 frames kept within the 0 MiB memory budget", err.ToString(), StringComparison.Ordinal);

        // One byte less and only four fit.
        using var err4 = new StringWriter();
        BenchResult four = new BenchRunner(request with { MemoryBudgetBytes = request.MemoryBudgetBytes - 1 }, err4).Run();
        Assert.Equal(4, four.FrameKeys.Count);
    }

    [Fact]
    public void MissingFrames_ExitsThreeNamingThePath_AndWritesNoJson()
    {
        string missing = dir.File("no-such-folder");
        string json = dir.File("bench.json");

        var (code, _, err) = CliRunner.Run("bench", "--frames", missing, "--json", json);

        Assert.Equal(ExitCodes.InputError, code);
        Assert.Contains(missing, err, StringComparison.Ordinal);
        Assert.False(File.Exists(json));
        Assert.Empty(Directory.GetFiles(dir.Path));
    }

    [Fact]
    public void CorruptImage_ExitsThreeNamingTheFile()
    {
        string frames = Path.Combine(dir.Path, "frames");
        Directory.CreateDirectory(frames);
        string bad = Path.Combine(frames, "frame-0001.png");
        File.WriteAllText(bad, "this is not a PNG");

        var (code, _, err) = CliRunner.Run("bench", "--frames", frames);

        Assert.Equal(ExitCodes.InputError, code);
        Assert.Contains("frame-0001.png", err, StringComparison.Ordinal);
        Assert.Contains("cannot decode", err, StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("--size", "12x", "--size")]
    [InlineData("--size", "20x20", "between 64 and 8192")]
    [InlineData("--size", "640x360,abc", "--size")]
    [InlineData("--threads", "0", "--threads")]
    [InlineData("--threads", "1,x", "--threads")]
    [InlineData("--threads", "1,,2", "--threads")]
    [InlineData("--thread-counts", "1,x", "--thread-counts")]
    [InlineData("--thread-counts", "0,1", "--thread-counts")]
    [InlineData("--passes", "0", "--passes")]
    [InlineData("--render", "0", "--render")]
    public void BadOption_ExitsTwo(string option, string value, string expected)
    {
        var (code, _, err) = CliRunner.Run("bench", "--render", "1", option, value);

        Assert.Equal(ExitCodes.UsageError, code);
        Assert.Contains(expected, err, StringComparison.Ordinal);
    }

    [Fact]
    public void FramesAndRender_ExitsTwo()
    {
        var (code, _, err) = CliRunner.Run("bench", "--frames", dir.Path, "--render", "2");

        Assert.Equal(ExitCodes.UsageError, code);
        Assert.Contains("either --frames or --render", err, StringComparison.Ordinal);
    }

    [Fact]
    public void TimingStats_MedianAndP95_FollowTheNearestRankDefinition()
    {
        // Source: Hyndman & Fan (1996), "Sample quantiles in statistical packages", definition 1 (inverse of the
        // empirical distribution): p95 of 1..20 is the value at rank ceil(0.95 * 20) = 19; the median of an even
        // count is the mean of the two middle values (common practice).
        double[] samples = [.. Enumerable.Range(1, 20).Select(i => (double)i).Reverse()];
        TimingStats s = TimingStats.From(samples);
        Assert.Equal(19, s.P95);
        Assert.Equal(10.5, s.Median);
        Assert.Equal(10.5, s.Mean);
        Assert.Equal(1, s.Min);
        Assert.Equal(20, s.Max);

        // Odd count: the middle value; p95 of 5 samples is rank ceil(4.75) = 5, the largest.
        TimingStats odd = TimingStats.From([3.0, 1.0, 2.0, 5.0, 4.0]);
        Assert.Equal(3, odd.Median);
        Assert.Equal(5, odd.P95);
    }

    [Fact]
    public void BuildLine_ReadsOpenCvBuildInformation()
    {
        // Source: OpenCV itself: cv::getBuildInformation() of the library these tests load.
        string build = Cv2.GetBuildInformation();
        string? baseline = MachineInfo.BuildLine(build, "Baseline:");
        Assert.False(string.IsNullOrWhiteSpace(baseline));
        Assert.Contains(baseline!, build.Replace("  ", " ", StringComparison.Ordinal), StringComparison.Ordinal);
        Assert.Null(MachineInfo.BuildLine(build, "No such label in any build:"));
        Assert.Equal("SSE SSE2 SSE3", MachineInfo.BuildLine("  CPU/HW features:\n    Baseline:                    SSE SSE2 SSE3\n", "Baseline:"));
    }

    private static string[] Keys(JsonElement side)
    {
        JsonElement keys = side.GetProperty("frame_keys");
        Assert.Equal(keys.GetArrayLength(), side.GetProperty("frame_calls").GetInt32());
        return [.. keys.EnumerateArray().Select(e => e.GetString()!)];
    }

    private static void AssertStats(JsonElement stats, int count)
    {
        Assert.Equal(count, stats.GetProperty("count").GetInt32());
        AssertPositive(stats, "median", "p95", "mean", "min", "max");
        Assert.True(stats.GetProperty("min").GetDouble() <= stats.GetProperty("median").GetDouble());
        Assert.True(stats.GetProperty("median").GetDouble() <= stats.GetProperty("p95").GetDouble());
        Assert.True(stats.GetProperty("p95").GetDouble() <= stats.GetProperty("max").GetDouble());
    }

    private static void AssertPositive(JsonElement obj, params string[] keys)
    {
        foreach (string key in keys)
        {
            double v = obj.GetProperty(key).GetDouble();
            Assert.True(double.IsFinite(v) && v > 0, key + " = " + v.ToString(System.Globalization.CultureInfo.InvariantCulture));
        }
    }
}
