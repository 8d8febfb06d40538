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
        // (Pan et al., AAAI 2018, arXiv 1712.06080: IoU >= 0.5 with 30 px lines at 1640 px width).
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
}
