using System.Globalization;
using System.Text.Json;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Vision.Tests.Pipeline;
using OpenCvSharp;
using Xunit;

namespace LaneBaseline.Cli.Tests.Detect;

public sealed class DetectAccuracyTests : IDisposable
{
    private readonly string dir = Path.Combine(Path.GetTempPath(), "lb-acc-" + Guid.NewGuid().ToString("N"));

    public DetectAccuracyTests()
    {
        Directory.CreateDirectory(dir);
    }

    public void Dispose() => Directory.Delete(dir, recursive: true);

    [Fact]
    public void DetectThenScore_ClearSyntheticRoads_ReachF1OfNinetyPercent()
    {
        // End to end through both commands: frames drawn with exact truth (SyntheticRoad: pinhole camera, flat road,
        // boundaries at ±1.8 m and ±5.4 m), detect, then score. The clear-day target is F1@0.50 >= 0.90
        // (common practice in the lane-detection literature, docs/metrics.md: IoU >= 0.5 with 30 px lines at 1640 px width).
        string frames = Path.Combine(dir, "frames");
        Directory.CreateDirectory(frames);
        string truthPath = Path.Combine(dir, "truth.lanes.jsonl");
        using (LaneFileWriter truth = LaneFileWriter.Create(truthPath))
        {
            for (int i = 0; i < 6; i++)
            {
                var road = new SyntheticRoad
                {
                    Width = 640, Height = 360, Seed = (ulong)(100 + i), Curvature = (i - 2.5) * 0.0008, Shadows = i % 3 == 0,
                    OffsetM = (i % 2 == 0 ? 0.3 : -0.3),
                };
                string key = "f" + i.ToString("D2", CultureInfo.InvariantCulture) + ".png";
                using (Mat m = road.Render())
                {
                    Cv2.ImWrite(Path.Combine(frames, key), m);
                }

                var lanes = SyntheticRoad.Boundaries
                    .Select(b => (b.Slot, Points: road.Truth(b.Y)))
                    .Where(b => b.Points.Count >= 2)
                    .Select(b => new Lane { Points = b.Points.Select(p => new LanePoint(Math.Round(p.X, 2), Math.Round(p.Y, 2))).ToArray(), Slot = b.Slot })
                    .ToArray();
                truth.Write(new LaneRecord { Frame = key, Width = 640, Height = 360, Lanes = lanes });
            }
        }

        string pred = Path.Combine(dir, "pred.lanes.jsonl"), json = Path.Combine(dir, "score.json");
        using var o = new StringWriter();
        using var e = new StringWriter();
        Assert.Equal(0, Program.Invoke(["detect", frames, "-o", pred], o, e));
        Assert.Equal(0, Program.Invoke(["score", "--truth", truthPath, "--pred", pred, "--json", json, "--bootstrap", "0"], o, e));
        using JsonDocument doc = JsonDocument.Parse(File.ReadAllText(json));
        double f1 = doc.RootElement.GetProperty("iou_f1").GetProperty("thresholds").GetProperty("0.50").GetProperty("f1").GetDouble();
        Assert.True(f1 >= 0.90, $"F1@0.50 = {f1}");
    }

    private static string RepoRoot()
    {
        string? d = AppContext.BaseDirectory;
        while (d is not null && !File.Exists(Path.Combine(d, "LaneBaseline.sln")))
        {
            d = Path.GetDirectoryName(d);
        }

        return d ?? throw new InvalidOperationException("repository root not found");
    }

    private static double F1At50(string json)
    {
        using JsonDocument doc = JsonDocument.Parse(File.ReadAllText(json));
        return doc.RootElement.GetProperty("iou_f1").GetProperty("thresholds").GetProperty("0.50").GetProperty("f1").GetDouble();
    }

    [Theory]
    [InlineData(false)]
    [InlineData(true)]
    public void DetectThenScore_SampleFrames_ReachTheOverallTarget(bool withCamera)
    {
        // sample-frames/: 44 rendered frames, every condition (sample-frames/README.md). The overall target is
        // F1@0.50 >= 0.75 on the rendered conditions; measured 0.779 without and 0.806 with the camera file.
        string root = Path.Combine(RepoRoot(), "sample-frames");
        string pred = Path.Combine(dir, "sf.lanes.jsonl"), json = Path.Combine(dir, "sf.json");
        using var o = new StringWriter();
        using var e = new StringWriter();
        string[] args = withCamera
            ? ["detect", root, "-o", pred, "--threads", "2", "--camera", Path.Combine(root, "camera.json")]
            : ["detect", root, "-o", pred, "--threads", "2"];
        Assert.Equal(0, Program.Invoke(args, o, e));
        Assert.Equal(0, Program.Invoke(["score", "--truth", Path.Combine(root, "truth.lanes.jsonl"), "--pred", pred, "--json", json, "--bootstrap", "0"], o, e));
        double f1 = F1At50(json);
        Assert.True(f1 >= 0.75, $"F1@0.50 = {f1}");
    }

    [Fact]
    public void Detect_CameraOfAnotherSize_IsBadInput_NamingTheFrame()
    {
        string root = Path.Combine(RepoRoot(), "sample-frames");
        string frame = Path.Combine(dir, "small.png");
        using (Mat m = new SyntheticRoad { Width = 320, Height = 180 }.Render())
        {
            Cv2.ImWrite(frame, m);
        }

        using var o = new StringWriter();
        using var e = new StringWriter();
        int code = Program.Invoke(["detect", frame, "-o", Path.Combine(dir, "x.lanes.jsonl"), "--camera", Path.Combine(root, "camera.json")], o, e);
        Assert.Equal(3, code);
        Assert.Contains("small.png", e.ToString(), StringComparison.Ordinal);
        Assert.Contains("1280x720", e.ToString(), StringComparison.Ordinal);
    }

    [Fact]
    public void Detect_BrokenCameraFile_IsBadInput()
    {
        string frame = Path.Combine(dir, "f.png");
        using (Mat m = new SyntheticRoad { Width = 320, Height = 180 }.Render())
        {
            Cv2.ImWrite(frame, m);
        }

        string cam = Path.Combine(dir, "camera.json");
        File.WriteAllText(cam, "{ \"version\": 1, ");
        using var o = new StringWriter();
        using var e = new StringWriter();
        Assert.Equal(3, Program.Invoke(["detect", frame, "-o", Path.Combine(dir, "x.lanes.jsonl"), "--camera", cam], o, e));
        Assert.Contains("camera.json", e.ToString(), StringComparison.Ordinal);
    }
}
