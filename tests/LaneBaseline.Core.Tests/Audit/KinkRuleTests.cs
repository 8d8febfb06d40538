using LaneBaseline.Core.Audit;
using LaneBaseline.Core.Audit.Rules;
using LaneBaseline.Core.Geometry;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Testing;
using Xunit;
using Xunit.Abstractions;

namespace LaneBaseline.Core.Tests.Audit;

/// <summary>
/// The kink rule (LBA-I08) on pinhole-projected synthetic roads (SyntheticRoad: the camera of docs/checks.md,
/// curves of radius at least 600 m): recall on injected kinks and false alarms on clean truth, with and without
/// the camera.
/// </summary>
public sealed class KinkRuleTests(ITestOutputHelper output)
{
    private const int Sequences = 20;
    private const int Frames = 12;

    /// <summary>The far half of a lane's image points mirrored back sideways about its middle point's column.</summary>
    public static Lane Kinked(Lane lane)
    {
        int mid = lane.Points.Count / 2;
        double xm = lane.Points[mid].X;
        var pts = lane.Points.Select((p, j) => j <= mid ? p : new LanePoint((2 * xm) - p.X, p.Y)).ToList();
        return new Lane { Points = pts, Slot = lane.Slot };
    }

    private static CameraModel Camera() => new()
    {
        // Source: docs/checks.md camera rows (f = 1000 px, principal point (640, 360), height 1.5 m, pitch 2°), as SyntheticRoad projects.
        ImageWidth = 1280, ImageHeight = 720, Fx = 1000, Fy = 1000, Cx = 640, Cy = 360, MountHeightM = 1.5, PitchDeg = 2,
    };

    public static TheoryData<bool> WithCamera() => [false, true];

    [Theory]
    [MemberData(nameof(WithCamera))]
    public void InjectedKinks_AreFound_AndCleanRoads_AreQuiet(bool withCamera)
    {
        AuditSettings settings = withCamera ? new AuditSettings { Camera = Camera(), HorizonRow = Camera().HorizonRowAtCentre() } : new AuditSettings();
        int lanes = 0, found = 0, frames = 0, flagged = 0;
        for (int s = 0; s < Sequences; s++)
        {
            SyntheticRoad.Scene scene = SyntheticRoad.SceneFor(23, s);
            for (int f = 0; f < Frames; f++)
            {
                LaneRecord clean = SyntheticRoad.Frame(scene, s, f);
                var sink = new List<AuditFinding>();
                new KinkRule().Check(new AuditFrame(clean, f, 1280, 720, settings), sink);
                frames++;
                flagged += sink.Count > 0 ? 1 : 0;
                for (int i = 0; i < clean.Lanes.Count; i++)
                {
                    if (clean.Lanes[i].Points.Count < 6)
                    {
                        continue;
                    }

                    var edited = clean.Lanes.Select((l, j) => j == i ? Kinked(l) : l).ToList();
                    var kinkSink = new List<AuditFinding>();
                    new KinkRule().Check(new AuditFrame(AuditHelpers.With(clean, edited), f, 1280, 720, settings), kinkSink);
                    lanes++;
                    found += kinkSink.Any(x => x.Rule == AuditRules.Kink && x.Lane == i) ? 1 : 0;
                }
            }
        }

        double recall = (double)found / lanes, falseAlarms = (double)flagged / frames;
        output.WriteLine($"camera {withCamera}: recall {found}/{lanes} = {recall:P1}; clean frames flagged {flagged}/{frames} = {falseAlarms:P2}");

        // Targets: recall >= 0.9 on injected kinks, false alarms <= 1 % of clean frames (issue's acceptance figures).
        Assert.True(recall >= 0.9, $"recall {recall:P1}");
        Assert.True(falseAlarms <= 0.01, $"false alarms {falseAlarms:P2}");
    }

    [Fact]
    public void AStraightLane_IsQuiet_AndARightAngle_IsFlagged()
    {
        // Hand-worked: a straight boundary 1.75 m right of a camera (f 1000 px, h 1.5 m, horizon row 360, c_x 640)
        // projects to x = 640 + 1000 * 1.75 / Z, y = 360 + 1500 / Z. A lane that turns 90 degrees at Z = 20 m runs on
        // sideways at constant Z, i.e. along row 435: a corner no road has.
        AuditSettings settings = new() { Camera = Camera(), HorizonRow = 360 };
        var straight = new List<LanePoint>();
        for (double z = 4; z <= 40; z += 2)
        {
            straight.Add(new LanePoint(640 + (1750 / z), 360 + (1500 / z)));
        }

        var corner = straight.Where(p => p.Y >= 435).ToList();
        for (double x = 1.75 + 2; x <= 1.75 + 20; x += 2)
        {
            corner.Add(new LanePoint(640 + (1000 * x / 20), 435));
        }

        LaneRecord R(List<LanePoint> pts) => new() { Frame = "a/000001.png", Width = 1280, Height = 720, Lanes = [new Lane { Points = pts, Slot = 1 }] };
        var quiet = new List<AuditFinding>();
        new KinkRule().Check(new AuditFrame(R(straight), 0, 1280, 720, settings), quiet);
        var loud = new List<AuditFinding>();
        new KinkRule().Check(new AuditFrame(R(corner), 0, 1280, 720, settings), loud);
        Assert.Empty(quiet);
        AuditFinding f = Assert.Single(loud);
        Assert.Equal(AuditRules.Kink, f.Rule);
        Assert.InRange(f.Value, 80, 100);

        // 30 copies of the corner in one frame: the catalogue lists 20 kink findings and one that counts the other 10,
        // as for every one-frame rule (InputLimits.MaxFindingsPerFrameAndRule; the corner fires once per lane, above).
        var many = new LaneRecord { Frame = "a/000001.png", Width = 1280, Height = 720, Lanes = [.. Enumerable.Range(0, 30).Select(_ => new Lane { Points = corner })] };
        var capped = new List<AuditFinding>();
        AuditRuleCatalogue.Check(new AuditFrame(many, 0, 1280, 720, settings), AuditRuleFamily.Image, capped);
        var kinks = capped.Where(x => x.Rule == AuditRules.Kink).ToList();
        Assert.Equal(21, kinks.Count);
        Assert.Equal(10, kinks[^1].Value);
        Assert.Null(kinks[^1].Lane);
        Assert.Equal("10 more findings of LBA-I08 in this frame (at most 20 per frame and rule are listed)", kinks[^1].Message);
    }
}

/// <summary>The crossing rule's message names the row where two steep lanes swap order.</summary>
public sealed class CrossingRowTests
{
    [Fact]
    public void SteepLanesCrossing_MessageNamesTheCrossingRow()
    {
        // Hand-worked: x = 100 + 2 (700 - y) and x = 896 - 2 (700 - y) meet at y = 501 (x = 498); sampled at even rows
        // their difference goes from -4 px (row 502) to +4 px (row 500), never within the 2 px tolerance, so the row
        // comes from the sign change.
        LaneRecord r = new()
        {
            Frame = "a/000001.png", Width = 1280, Height = 720,
            Lanes =
            [
                new Lane { Points = [new LanePoint(100, 700), new LanePoint(900, 300)] },
                new Lane { Points = [new LanePoint(896, 700), new LanePoint(96, 300)] },
            ],
        };
        var sink = new List<AuditFinding>();
        AuditRuleCatalogue.Check(new AuditFrame(r, 0, 1280, 720, new AuditSettings { HorizonRow = 200 }), AuditRuleFamily.Image, sink);
        AuditFinding f = Assert.Single(sink, x => x.Rule == AuditRules.LanesCross);
        Assert.DoesNotContain("NaN", f.Message, StringComparison.Ordinal);
        Assert.Matches("near row 50[0-2] ", f.Message);
    }
}
