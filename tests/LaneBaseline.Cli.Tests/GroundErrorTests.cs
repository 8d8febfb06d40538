using System.Text.Json;
using LaneBaseline.Core.Geometry;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Testing;
using Xunit;

namespace LaneBaseline.Cli.Tests;

public sealed class GroundErrorTests : IDisposable
{
    // Source: external-checks "Camera geometry": f = 1000 px, principal point (640, 360), 1280x720, h = 1.5 m, pitch 0;
    // e.g. ground (20, -1.8) m -> pixel (730, 435). Lanes are drawn by projecting ground curves with this camera.
    private static readonly CameraModel Camera = new()
    {
        ImageWidth = 1280, ImageHeight = 720, Fx = 1000, Fy = 1000, Cx = 640, Cy = 360, MountHeightM = 1.5, PitchDeg = 0,
    };

    private readonly TempDir dir = new();

    public void Dispose() => dir.Dispose();

    [Fact]
    public void Camera_ReproducesPublishedTableValue()
    {
        (double u, double v) = Camera.ProjectGroundToImage(20, -1.8);
        Assert.Equal(730, u, 6);
        Assert.Equal(435, v, 6);
    }

    // Hand-derived: lanes run from 8 m to 47 m ahead (so nothing exists at the 5 m look-ahead). The right boundary is
    // predicted 0.05 m further right at every distance (Y = -1.90 for -1.85); the left one bends as
    // Y = 1.85 + 0.0004 X², i.e. 0.0004 X² m off at distance X. Mean |dY| over the two pairs at X:
    // (0.0004 X² + 0.05) / 2 -> 10 m: 0.045, 20 m: 0.105, 30 m: 0.205. Ego width at 10 m:
    // (1.85 + 0.04) - (-1.90) = 3.79 vs 3.70 -> 0.09 m. Curvature at X = 0 of Y = aX² + c is 2a = 0.0008 /m
    // (R = (1 + b²)^1.5 / |2a| = 1250 m by the external-checks radius formula), the truth is straight, the right pair
    // is straight on both sides: mean error (0.0008 + 0) / 2 = 0.0004 /m. Ground points are exact projections at whole metres, so the look-ahead
    // distances fall on points and no interpolation error enters.
    // Issue #8: sharded scoring with --camera merges to the unsharded JSON and table byte for byte (the state carries
    // each frame's metric-space sums, including frames where the ego width cannot be measured).
    [Theory]
    [InlineData(2)]
    [InlineData(5)]
    public void Score_WithCamera_ShardsMergeToUnshardedOutput(int n)
    {
        string cam = dir.File("camera.json"), truth = dir.File("t.lanes.jsonl"), pred = dir.File("p.lanes.jsonl");
        Camera.Save(cam);
        Lane Ground(Func<double, double> y, int slot) => new()
        {
            Points = [.. Enumerable.Range(0, 40).Select(i => 8.0 + (i * 1.0)).Select(x => Camera.ProjectGroundToImage(x, y(x))).Select(p => new LanePoint(p.U, p.V))],
            Slot = slot,
        };

        var t = new List<LaneRecord>();
        var p = new List<LaneRecord>();
        for (int i = 0; i < 24; i++)
        {
            string frame = $"run/{i:000}.png";
            double off = 0.02 * i, bend = 0.0001 * (i % 5);
            t.Add(Lanes.Truth(frame, 1280, 720, Ground(_ => 1.85, -1), Ground(_ => -1.85, 1)));
            p.Add(i % 4 == 0
                ? Lanes.Pred(frame, Ground(x => 1.85 + off, -1)) // one lane only: no ego width this frame
                : Lanes.Pred(frame, Ground(x => 1.85 + off + (bend * x * x), -1), Ground(_ => -1.85 - off, 1)));
        }

        Lanes.WriteFile(truth, t);
        Lanes.WriteFile(pred, p);
        string[] common = ["--truth", truth, "--pred", pred, "--camera", cam, "--bootstrap", "40", "--bootstrap-seed", "3"];
        (int exit, string fullOut, string err) = CliRunner.Run(["score", .. common, "--json", dir.File("full.json")]);
        Assert.True(exit == 0, err);
        var states = new List<string>();
        for (int k = 0; k < n; k++)
        {
            states.Add(dir.File($"g{k}.state"));
            (exit, _, err) = CliRunner.Run(["score", .. common, "--shard", $"{k}/{n}", "--partial", states[k]]);
            Assert.True(exit == 0, err);
        }

        (exit, string mergedOut, err) = CliRunner.Run(["merge", .. states, "-o", dir.File("merged.json")]);
        Assert.True(exit == 0, err);
        Assert.Contains("On the road plane", mergedOut, StringComparison.Ordinal);
        Assert.Equal(fullOut, mergedOut);
        Assert.Equal(File.ReadAllBytes(dir.File("full.json")), File.ReadAllBytes(dir.File("merged.json")));
    }

    [Fact]
    public void Score_WithCamera_ReportsLateralWidthAndCurvatureErrors()
    {
        string cam = dir.File("camera.json"), truth = dir.File("t.lanes.jsonl"), pred = dir.File("p.lanes.jsonl"), json = dir.File("g.json");
        Camera.Save(cam);
        Lane Ground(Func<double, double> y, int slot) => new()
        {
            Points = [.. Enumerable.Range(0, 40).Select(i => 8.0 + (i * 1.0)).Select(x => Camera.ProjectGroundToImage(x, y(x))).Select(p => new LanePoint(p.U, p.V))],
            Slot = slot,
        };

        Lanes.WriteFile(truth, [Lanes.Truth("a.png", 1280, 720, Ground(_ => 1.85, -1), Ground(_ => -1.85, 1))]);
        Lanes.WriteFile(pred, [Lanes.Pred("a.png", Ground(x => 1.85 + (0.0004 * x * x), -1), Ground(_ => -1.90, 1))]);
        (int exit, string stdout, string err) = CliRunner.Run("score", "--truth", truth, "--pred", pred, "--camera", cam, "--json", json, "--bootstrap", "0");
        Assert.True(exit == 0, err);
        Assert.Contains("On the road plane", stdout, StringComparison.Ordinal);
        using JsonDocument doc = JsonDocument.Parse(File.ReadAllText(json));
        Assert.Equal(2, doc.RootElement.GetProperty("iou_f1").GetProperty("thresholds").GetProperty("0.50").GetProperty("tp").GetInt32());
        JsonElement g = doc.RootElement.GetProperty("ground");
        JsonElement lateral = g.GetProperty("lateral_abs_error_m");
        Assert.Equal(0, lateral.GetProperty("5").GetProperty("pairs").GetInt32());
        Assert.Equal(JsonValueKind.Null, lateral.GetProperty("5").GetProperty("mean").ValueKind);
        Assert.Equal(0.045, lateral.GetProperty("10").GetProperty("mean").GetDouble(), 6);
        Assert.Equal(0.105, lateral.GetProperty("20").GetProperty("mean").GetDouble(), 6);
        Assert.Equal(0.205, lateral.GetProperty("30").GetProperty("mean").GetDouble(), 6);
        Assert.Equal(0.09, g.GetProperty("ego_width_abs_error_m").GetProperty("mean").GetDouble(), 6);
        Assert.Equal(0.0004, g.GetProperty("curvature_abs_error_per_m").GetProperty("mean").GetDouble(), 7);
    }

    [Fact]
    public void Score_CameraForOtherImageSize_Exits3()
    {
        string cam = dir.File("camera.json"), truth = dir.File("t.lanes.jsonl");
        Camera.Save(cam);
        Lanes.WriteFile(truth, [Lanes.Truth("a.png", 1920, 1080, Lanes.Vertical(100, 1080))]);
        (int exit, _, string err) = CliRunner.Run("score", "--truth", truth, "--pred", truth, "--camera", cam);
        Assert.Equal(3, exit);
        Assert.Contains("camera file describes 1280x720", err, StringComparison.Ordinal);
    }
}
