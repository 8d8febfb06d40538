using LaneBaseline.Core.Audit;
using LaneBaseline.Core.Geometry;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Testing;
using Xunit;
using Xunit.Abstractions;
using static LaneBaseline.Core.Tests.Audit.AuditHelpers;

namespace LaneBaseline.Core.Tests.Audit;

/// <summary>
/// Ground rules with the camera of docs/checks.md (f 1000 px, 1280x720, 1.5 m, 2° pitch), which is
/// <see cref="CameraModel.CreateDefault"/> and the camera of <see cref="SyntheticRoad"/>.
/// </summary>
public sealed class GroundRuleTests(ITestOutputHelper output)
{
    private static readonly AuditSettings WithCamera = new() { Camera = CameraModel.CreateDefault(1280, 720) };

    private static List<AuditFinding> Ground(LaneRecord r, AuditSettings? s = null)
    {
        var sink = new List<AuditFinding>();
        AuditSettings settings = s ?? WithCamera;
        var frame = new AuditFrame(r, 0, r.Width!.Value, r.Height!.Value, settings) { Ground = AuditFrame.GroundLanesOf(r, settings.Camera!.ToProjection()) };
        AuditRuleCatalogue.Check(frame, AuditRuleFamily.Ground, sink);
        return sink;
    }

    [Fact]
    public void QuadraticFit_RadiusOfAParabola()
    {
        // Source: docs/checks.md, R of x = a*y^2 + b*y + c is (1 + (2ay + b)^2)^(3/2) / |2a|; a = 0.001, b = 0
        // gives R = 500 m at y = 0. The fit recovers a and b from exact samples.
        var pts = Enumerable.Range(0, 20).Select(i => (X: 5.0 + (2.0 * i), Y: (0.001 * Math.Pow(5.0 + (2.0 * i), 2)) + 1.0)).ToList();
        Assert.True(GroundLane.FromPoints(pts).TryQuadratic(double.NegativeInfinity, double.PositiveInfinity, 3, 0, out double a, out double b));
        Assert.Equal(0.001, a, 9);
        Assert.Equal(0.0, b, 7);
        Assert.Equal(500.0, 1 / Math.Abs(2 * a), 3);
    }

    [Fact]
    public void CleanTruth_NoGroundFindings()
    {
        var records = SyntheticRoad.Clean(seed: 5, sequences: 10, framesPerSequence: 30).ToList();
        AuditResult result = Run(records, WithCamera);
        double rate = (double)result.Findings.Select(f => f.Ordinal).Distinct().Count() / result.Frames;
        output.WriteLine($"clean truth with camera: {result.Frames} frames, {result.Findings.Count} findings, false-alarm rate {rate:P2}");
        Assert.Empty(result.Findings);
    }

    [Theory]
    // Curve radius against R = V^2/(127(e+f)) = 393.7 m at 100 km/h (AASHTO Green Book Sec. 3.3):
    [InlineData(50.0, 100.0, true)]   // the injected fault: R = 50 m at a stated 100 km/h
    [InlineData(300.0, 100.0, true)]  // 300 < 393.7
    [InlineData(500.0, 100.0, false)] // 500 > 393.7
    [InlineData(300.0, 80.0, false)]  // 80 km/h: 6400 / 25.4 = 252.0 m < 300
    public void Curvature_AgainstMinimumRadius(double radiusM, double speedKmh, bool fires)
    {
        var scene = new SyntheticRoad.Scene(3.5, 0, 0, 6, 0);
        LaneRecord r = SyntheticRoad.Frame(scene, 0, 0, (slot, y) => slot == 1 ? x => y(x) + (x * x / (2 * radiusM)) : y);
        List<AuditFinding> found = Ground(r, WithCamera with { DesignSpeedKmh = speedKmh });
        int lane = IndexOfSlot(r, 1);
        Assert.Equal(fires, found.Any(f => f.Rule == AuditRules.GroundCurvature && f.Lane == lane));
        Assert.DoesNotContain(found, f => f.Rule == AuditRules.GroundCurvature && f.Lane != lane);
    }

    [Fact]
    public void SqueezedLane_2m_IsFoundOnTheMovedBoundary()
    {
        var scene = new SyntheticRoad.Scene(3.5, 1.0 / 900, 0, 6, 0);
        LaneRecord r = SyntheticRoad.Frame(scene, 0, 0, (slot, y) => slot == 1 ? x => y(x) + 1.5 : y);
        AuditFinding f = Assert.Single(Ground(r), f => f.Rule == AuditRules.GroundLaneWidth && f.Value < 2.5);
        Assert.Equal(IndexOfSlot(r, 1), f.Lane);
        Assert.Equal(2.0, f.Value, 2);
    }

    [Fact]
    public void DivergingBoundary_IsNotParallel()
    {
        // Slot +2 drifts 1 m outwards over 30 m: the outer lane widens by 2/3 m between 10 m and 30 m (> 0.5 m).
        var scene = new SyntheticRoad.Scene(3.5, 0, 0, 6, 0);
        LaneRecord r = SyntheticRoad.Frame(scene, 0, 0, (slot, y) => slot == 2 ? x => y(x) - (x / 30) : y);
        Assert.Contains(Ground(r), f => f.Rule == AuditRules.GroundParallel && f.Lane == IndexOfSlot(r, 2));
    }
}
