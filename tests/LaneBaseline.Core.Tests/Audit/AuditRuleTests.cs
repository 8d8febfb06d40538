using LaneBaseline.Core.Audit;
using LaneBaseline.Core.Geometry;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Testing;
using Xunit;
using Xunit.Abstractions;
using static LaneBaseline.Core.Tests.Audit.AuditHelpers;

namespace LaneBaseline.Core.Tests.Audit;

public sealed class AuditRuleTests(ITestOutputHelper output)
{
    [Fact]
    public void MinimumRadius_AashtoWorkedExample()
    {
        // Source: AASHTO Green Book Sec. 3.3, worked example restated in the Ethiopian Roads Authority Geometric
        // Design Manual 2002 ch. 8 (docs/checks.md): R = V^2 / (127 (e + f)); 100 km/h, e 0.08, f 0.12 ->
        // 10000 / (127 * 0.20) = 10000 / 25.4 = 393.70 m.
        Assert.Equal(393.7, RoadGeometry.MinimumCurveRadiusM(100, 0.08, 0.12), 1);
        // Source: Highway Engineering Handbook Table 2.6 (from AASHTO 2004): 60 mph, f 0.12, e 8 % -> 1200 ft.
        // 60 mph = 96.5606 km/h; R = 9323.9 / 25.4 = 367.08 m = 1204.3 ft (the table rounds to 1200 ft).
        double feet = RoadGeometry.MinimumCurveRadiusM(60 * 1.609344, 0.08, 0.12) / 0.3048;
        Assert.InRange(feet, 1195, 1210);
        Assert.Throws<ArgumentOutOfRangeException>(() => RoadGeometry.MinimumCurveRadiusM(100, -0.2, 0.1));
    }

    [Theory]
    // Source: docs/checks.md camera rows (Hartley & Zisserman plane-induced homography).
    [InlineData(0.0, 20, 0, 640, 435)]
    [InlineData(0.0, 20, -1.8, 730, 435)]
    [InlineData(0.0, 10, 0, 640, 510)]
    [InlineData(0.0, 40, 0, 640, 397.5)]
    [InlineData(2.0, 20, 0, 640, 399.9745)]
    [InlineData(2.0, 20, -1.8, 729.8196, 399.9745)]
    [InlineData(2.0, 40, 0, 640, 362.5759)]
    public void SyntheticCamera_ReproducesThePublishedProjection(double pitch, double x, double y, double u, double v)
    {
        (double pu, double pv) = SyntheticRoad.Project(x, y, pitch);
        Assert.True(Math.Abs(u - pu) <= 1e-3, $"u {pu} vs {u}");
        Assert.True(Math.Abs(v - pv) <= 1e-3, $"v {pv} vs {v}");
    }

    [Fact]
    public void CleanTruth_FalseAlarmRate_NearZero()
    {
        // 12 sequences x 50 frames of clean synthetic truth (SyntheticRoad): no rule may fire on more than 0.5 % of
        // frames (issue 5: "the rules must not fire on clean truth").
        var records = SyntheticRoad.Clean(seed: 7, sequences: 12, framesPerSequence: 50).ToList();
        AuditResult result = Run(records);
        long flagged = result.Findings.Select(f => f.Ordinal).Distinct().Count();
        double rate = (double)flagged / result.Frames;
        output.WriteLine($"clean truth: {result.Frames} frames, {result.Findings.Count} findings, {flagged} frames flagged, false-alarm rate {rate:P2}");
        foreach (AuditFinding f in result.Findings.Take(5))
        {
            output.WriteLine(f.ToString());
        }

        Assert.Equal(600, result.Frames);
        Assert.True(rate <= 0.005, $"false-alarm rate {rate:P2}");
    }

    [Fact]
    public void EstimatedHorizon_IsThePublishedHorizonRow()
    {
        // Source: docs/checks.md, horizon row v = 325.08 at 2° pitch. Straight road (curvature 0): the lanes'
        // near-half fits meet on the horizon.
        var scene = new SyntheticRoad.Scene(3.5, 0, 0, 6, 0);
        LaneRecord r = SyntheticRoad.Frame(scene, 0, 0);
        double? h = TestAccess.EstimateHorizon(r.Lanes, 720);
        Assert.NotNull(h);
        Assert.Equal(325.08, h!.Value, 0);
    }

    [Fact]
    public void FoldBack_AboveHorizon_Short_Duplicate_FireOnConstructedLanes()
    {
        var scene = new SyntheticRoad.Scene(3.5, 0, 0, 6, 0);
        LaneRecord clean = SyntheticRoad.Frame(scene, 0, 0);
        Assert.Empty(Check(clean));

        // Fold: the far end of lane 1 comes back down 20 px.
        var folded = clean.Lanes.ToList();
        folded[1] = new Lane { Points = [.. clean.Lanes[1].Points, new LanePoint(clean.Lanes[1].Points[^1].X + 5, clean.Lanes[1].Points[^1].Y + 20)], Slot = -1 };
        AssertFinding(Check(With(clean, folded)), AuditRules.FoldBack, 1);

        // Above the horizon: lane 2 continues 60 px above row 325 (limit 3 % of 720 = 21.6 px).
        var tall = clean.Lanes.ToList();
        tall[2] = new Lane { Points = [.. clean.Lanes[2].Points, new LanePoint(640, 265)], Slot = 1 };
        AssertFinding(Check(With(clean, tall)), AuditRules.AboveHorizon, 2);

        // Short: a stub 22.4 px long (sqrt(10^2 + 20^2)); limit max(20, 0.05 * 720) = 36 px.
        var stub = clean.Lanes.Append(new Lane { Points = [new(100, 700), new(110, 680)] }).ToList();
        AssertFinding(Check(With(clean, stub)), AuditRules.ShortLane, 4);

        // Near duplicate: lane 1 again, 8 px to the right (metric width round(30 * 1280 / 1640) = 23 px).
        var dup = clean.Lanes.Append(new Lane { Points = [.. clean.Lanes[1].Points.Select(p => p with { X = p.X + 8 })] }).ToList();
        AssertFinding(Check(With(clean, dup)), AuditRules.NearDuplicate, 4);
    }

    private static void AssertFinding(List<AuditFinding> findings, string rule, int lane) =>
        Assert.Contains(findings, f => f.Rule == rule && (f.Lane == lane || f.OtherLane == lane));
}
