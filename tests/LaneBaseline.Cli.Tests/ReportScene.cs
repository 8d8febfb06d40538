using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Testing;
using OpenCvSharp;

namespace LaneBaseline.Cli.Tests;

/// <summary>
/// A small scene of our own for the report tests: six 640x360 frames of a two-line road drawn with OpenCV, their
/// truth (tags day/dusk/curve), and two prediction files with confidences ("baseline" with known faults, "net"
/// close to the truth). Frame i's road shifts i*6 px to the right.
/// </summary>
internal sealed class ReportScene
{
    public const int Width = 640, Height = 360;

    public ReportScene(TempDir dir)
    {
        Frames = Path.Combine(dir.Path, "frames");
        Directory.CreateDirectory(Path.Combine(Frames, "clip"));
        Truth = dir.File("truth.lanes.jsonl");
        Baseline = dir.File("baseline.lanes.jsonl");
        Net = dir.File("net.lanes.jsonl");
        var truth = new List<LaneRecord>();
        var baseline = new List<LaneRecord>();
        var net = new List<LaneRecord>();
        for (int i = 0; i < 6; i++)
        {
            string key = $"clip/f{i}.png";
            double dx = i * 6;
            Lane left = Line(150 + dx, 300 + dx), right = Line(490 + dx, 340 + dx);
            string[] tags = i < 3 ? ["day"] : ["dusk"];
            if (i is 1 or 4)
            {
                tags = [.. tags, "curve"];
            }

            truth.Add(new LaneRecord { Frame = key, Width = Width, Height = Height, Tags = tags, Lanes = [left, right] });
            DrawFrame(Path.Combine(Frames, "clip", $"f{i}.png"), left, right, dusk: i >= 3);

            // baseline: f0, f5 exact; f1 shifted 12 px; f2 misses the right line; f3 adds a false line; f4 shifted 45 px.
            Lane[] b = i switch
            {
                1 => [Shift(left, 12, 0.8), Shift(right, 12, 0.7)],
                2 => [Shift(left, 0, 0.9)],
                3 => [Shift(left, 0, 0.9), Shift(right, 0, 0.85), Line(40, 250, 0.2)],
                4 => [Shift(left, 45, 0.4), Shift(right, 45, 0.35)],
                _ => [Shift(left, 0, 0.95), Shift(right, 0, 0.9)],
            };
            baseline.Add(Lanes.Pred(key, b));
            net.Add(Lanes.Pred(key, i == 4 ? [Shift(left, 8, 0.6), Shift(right, 4, 0.7)] : [Shift(left, 2, 0.97), Shift(right, -2, 0.96)]));
        }

        Lanes.WriteFile(Truth, truth);
        Lanes.WriteFile(Baseline, baseline);
        Lanes.WriteFile(Net, net);
    }

    public string Frames { get; }

    public string Truth { get; }

    public string Baseline { get; }

    public string Net { get; }

    /// <summary>A straight line from (xNear, bottom row) to (xFar, row 200).</summary>
    private static Lane Line(double xNear, double xFar, double? score = null) =>
        new() { Points = [new LanePoint(xNear, Height - 1), new LanePoint((xNear + xFar) / 2, 280), new LanePoint(xFar, 200)], Score = score };

    private static Lane Shift(Lane lane, double dx, double score) =>
        new() { Points = [.. lane.Points.Select(p => new LanePoint(p.X + dx, p.Y))], Score = score };

    private static void DrawFrame(string path, Lane left, Lane right, bool dusk)
    {
        using var img = new Mat(Height, Width, MatType.CV_8UC3, dusk ? new Scalar(70, 50, 40) : new Scalar(200, 170, 120));
        Cv2.Rectangle(img, new Rect(0, 190, Width, Height - 190), dusk ? new Scalar(45, 45, 45) : new Scalar(95, 95, 95), -1);
        foreach (Lane lane in new[] { left, right })
        {
            Point[] pts = [.. lane.Points.Select(p => new Point((int)p.X, (int)p.Y))];
            Cv2.Polylines(img, [pts], false, new Scalar(235, 235, 235), 4);
        }

        Cv2.ImWrite(path, img);
    }
}
