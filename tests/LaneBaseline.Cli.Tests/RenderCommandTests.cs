using LaneBaseline.Core.Geometry;
using LaneBaseline.Core.LaneFiles;
using Xunit;

namespace LaneBaseline.Cli.Tests;

public sealed class RenderCommandTests : IDisposable
{
    private readonly string root = Path.Combine(Path.GetTempPath(), "lb-render-" + Guid.NewGuid().ToString("N"));

    public RenderCommandTests()
    {
        Directory.CreateDirectory(root);
    }

    public void Dispose()
    {
        if (Directory.Exists(root))
        {
            Directory.Delete(root, recursive: true);
        }
    }

    private static (int Code, string Out, string Err) Run(params string[] args)
    {
        using var output = new StringWriter();
        using var error = new StringWriter();
        int code = Program.Invoke(args, output, error);
        return (code, output.ToString(), error.ToString());
    }

    [Theory]
    [InlineData("--size", "12x", "--size")]
    [InlineData("--size", "20x20", "between 64 and 8192")]
    [InlineData("--conditions", "fog", "unknown condition 'fog'")]
    [InlineData("--severity", "1.5", "--severity must be in [0, 1]")]
    [InlineData("--sweep", "fog", "--sweep: unknown condition 'fog'")]
    [InlineData("--format", "gif", "--format must be jpg or png")]
    [InlineData("--count", "0", "--count must be between")]
    [InlineData("--count", "many", "many")]
    [InlineData("--threads", "0", "--threads must be between")]
    public void Render_BadArgument_IsUsageError(string option, string value, string expected)
    {
        // Source: CLI contract (docs/cli.md): usage errors exit with code 2 and say what is wrong.
        (int code, _, string err) = Run("render", "--out", Path.Combine(root, "o"), option, value);
        Assert.Equal(2, code);
        Assert.Contains(expected, err, StringComparison.Ordinal);
        Assert.False(File.Exists(Path.Combine(root, "o", "truth.lanes.jsonl")));
    }

    [Fact]
    public void Render_WithoutOut_IsUsageError()
    {
        (int code, _, string err) = Run("render", "--count", "1");
        Assert.Equal(2, code);
        Assert.Contains("--out", err, StringComparison.Ordinal);
    }

    [Fact]
    public void Render_SweepWithConditions_IsUsageError()
    {
        (int code, _, string err) = Run("render", "--out", Path.Combine(root, "o"), "--sweep", "night", "--conditions", "rain");
        Assert.Equal(2, code);
        Assert.Contains("do not combine", err, StringComparison.Ordinal);
    }

    [Fact]
    public void Render_MissingCameraFile_IsBadInputNamingTheFile()
    {
        // Source: CLI contract (docs/cli.md): bad input exits with code 3 and names the file.
        string cam = Path.Combine(root, "nope", "camera.json");
        (int code, _, string err) = Run("render", "--out", Path.Combine(root, "o"), "--camera", cam);
        Assert.Equal(3, code);
        Assert.Contains(cam, err, StringComparison.Ordinal);
    }

    [Fact]
    public void Render_CameraFileWithBadKey_IsBadInputNamingFileAndKey()
    {
        string cam = Path.Combine(root, "camera.json");
        File.WriteAllText(cam, "{\"imageWidth\":320,\"imageHeight\":180,\"fx\":250,\"fy\":250,\"cx\":160,\"cy\":90,\"mountHeightM\":-1}");
        (int code, _, string err) = Run("render", "--out", Path.Combine(root, "o"), "--camera", cam);
        Assert.Equal(3, code);
        Assert.Contains(cam + ": mountHeightM:", err, StringComparison.Ordinal);
        Assert.DoesNotContain("   at ", err, StringComparison.Ordinal); // no stack trace
    }

    [Fact]
    public void Render_OneAndTwoThreads_WriteByteIdenticalOutput()
    {
        // Source: project rule (determinism): same seed gives byte-identical outputs whatever --threads is.
        string a = Path.Combine(root, "a"), b = Path.Combine(root, "b");
        string[] common = ["render", "--seed", "31", "--count", "3", "--sequence-length", "2", "--size", "320x180"];
        Assert.Equal(0, Run([.. common, "--out", a, "--threads", "1"]).Code);
        Assert.Equal(0, Run([.. common, "--out", b, "--threads", "2"]).Code);
        string[] filesA = Directory.GetFiles(a, "*", SearchOption.AllDirectories).Select(f => Path.GetRelativePath(a, f)).Order(StringComparer.Ordinal).ToArray();
        string[] filesB = Directory.GetFiles(b, "*", SearchOption.AllDirectories).Select(f => Path.GetRelativePath(b, f)).Order(StringComparer.Ordinal).ToArray();
        Assert.Equal(filesA, filesB);
        Assert.Equal(8, filesA.Length); // 6 frames + truth + camera
        foreach (string f in filesA)
        {
            Assert.Equal(File.ReadAllBytes(Path.Combine(a, f)), File.ReadAllBytes(Path.Combine(b, f)));
        }
    }

    [Fact]
    public void Render_WritesReadableTruthWithFramesRelativeToOut_AndALoadableCamera()
    {
        // Source: docs/lane-file.md (frame keys relative to the frames root; width and height present).
        string o = Path.Combine(root, "o");
        (int code, string stdout, string stderr) = Run("render", "--out", o, "--count", "3", "--size", "320x180", "--format", "png", "--threads", "1");
        Assert.Equal(0, code);
        Assert.Contains("rendered 3 frames", stdout, StringComparison.Ordinal);
        Assert.Contains("render: 3/3 frames (100%)", stderr, StringComparison.Ordinal);
        using LaneFileReader reader = LaneFileReader.Open(Path.Combine(o, "truth.lanes.jsonl"), sizeRequired: true);
        List<LaneRecord> records = reader.ReadAll().ToList();
        Assert.Equal(3, records.Count);
        foreach (LaneRecord r in records)
        {
            Assert.Matches("^lap-\\d{4}/t\\d{4}\\.png$", r.Frame);
            Assert.True(File.Exists(Path.Combine(o, r.Frame)));
            Assert.Equal(320, r.Width);
            r.ValidatePointRange("truth", 320, 180);
            Assert.Contains(r.Lanes, l => l.Slot == -1);
        }

        Assert.Contains("clean", records[0].Tags);
        CameraModel cam = CameraModel.Load(Path.Combine(o, "camera.json"));
        Assert.Equal(CameraModel.CreateDefault(320, 180), cam);
    }

    [Fact]
    public void Render_Sweep_TagsEverySeverityAndKeepsTheTruth()
    {
        // Source: issue 3 (sweep mode renders the same scenes at 0, 0.25, ..., 1 and tags each frame with it).
        string o = Path.Combine(root, "s");
        Assert.Equal(0, Run("render", "--out", o, "--count", "1", "--size", "320x180", "--sweep", "night", "--threads", "2").Code);
        using LaneFileReader reader = LaneFileReader.Open(Path.Combine(o, "truth.lanes.jsonl"), sizeRequired: true);
        List<LaneRecord> records = reader.ReadAll().ToList();
        Assert.Equal(["severity=0.00", "severity=0.25", "severity=0.50", "severity=0.75", "severity=1.00"], records.Select(r => r.Tags.Single(t => t.StartsWith("severity=", StringComparison.Ordinal))).ToArray());
        Assert.All(records, r => Assert.Contains("night", r.Tags));
        Assert.All(records, r => Assert.DoesNotContain("clean", r.Tags));
        string first = string.Join("|", records[0].Lanes.Select(l => string.Join(";", l.Points)));
        Assert.All(records, r => Assert.Equal(first, string.Join("|", r.Lanes.Select(l => string.Join(";", l.Points)))));
        Assert.NotEqual(File.ReadAllBytes(Path.Combine(o, records[0].Frame)), File.ReadAllBytes(Path.Combine(o, records[4].Frame)));
    }

    [Fact]
    public void Render_OutIsAFileOrUnderOne_IsBadInput()
    {
        // Exit 3 as for every command's folder outputs (docs/reliability.md, case 13); before, under a file was exit 2
        // with the runtime's "Could not find a part of the path".
        string file = Path.Combine(root, "taken");
        File.WriteAllText(file, "x");
        (int code, _, string err) = Run("render", "--out", file, "--count", "1", "--size", "160x90");
        Assert.Equal(3, code);
        Assert.Contains("names a folder to write into, but this is a file", err, StringComparison.Ordinal);
        (code, _, err) = Run("render", "--out", Path.Combine(file, "sub"), "--count", "1", "--size", "160x90");
        Assert.Equal(3, code);
        Assert.Contains("'" + file + "' is a file", err, StringComparison.Ordinal);
        (code, _, err) = Run("render", "--out", Path.Combine(root, "fine"), "--overlays", file, "--count", "1", "--size", "160x90");
        Assert.Equal(3, code);
        Assert.Contains("--overlays names a folder", err, StringComparison.Ordinal);
        Assert.False(Directory.Exists(Path.Combine(root, "fine")));
        Assert.Equal("x", File.ReadAllText(file));
    }

    [Fact]
    public void Render_CameraAndSize_IsUsageError()
    {
        string cam = Path.Combine(root, "camera.json");
        CameraModel.CreateDefault(320, 180).Save(cam);
        (int code, _, string err) = Run("render", "--out", Path.Combine(root, "o"), "--camera", cam, "--size", "640x360");
        Assert.Equal(2, code);
        Assert.Contains("--size and --camera", err, StringComparison.Ordinal);
    }

    [Fact]
    public void Render_ThroughAGivenCamera_UsesItsSizeAndWritesItBack()
    {
        // Source: docs/camera-file.md (render --camera renders through the given camera and writes it out).
        string cam = Path.Combine(root, "camera.json");
        CameraModel given = CameraModel.CreateDefault(240, 160) with { PitchDeg = 3, RollDeg = 1, K1 = -0.2 };
        given.Save(cam);
        string o = Path.Combine(root, "o");
        Assert.Equal(0, Run("render", "--out", o, "--camera", cam, "--count", "1", "--threads", "1").Code);
        Assert.Equal(given, CameraModel.Load(Path.Combine(o, "camera.json")));
        using LaneFileReader reader = LaneFileReader.Open(Path.Combine(o, "truth.lanes.jsonl"), sizeRequired: true);
        LaneRecord r = reader.ReadAll().Single();
        Assert.Equal(240, r.Width);
        Assert.Equal(160, r.Height);
        using OpenCvSharp.Mat img = OpenCvSharp.Cv2.ImRead(Path.Combine(o, r.Frame));
        Assert.Equal(240, img.Cols);
        Assert.Equal(160, img.Rows);
    }
}
