using LaneBaseline.Core.Options;
using LaneBaseline.Core.Results;
using LaneBaseline.Vision.Pipeline;
using OpenCvSharp;
using Xunit;

namespace LaneBaseline.Vision.Tests.Pipeline;

public sealed class LanePipelineTests
{
    // Frames are 640x360 so each whole-pipeline test stays in the tens of milliseconds.
    private static SyntheticRoad Road(ulong seed) => new() { Width = 640, Height = 360, Seed = seed };

    /// <summary>Largest horizontal distance from the detected points to the truth polyline, over rows the truth spans.</summary>
    internal static double MaxDeviation(ReadOnlySpan<double> pts, List<Point2d> truth, out int compared)
    {
        double worst = 0;
        compared = 0;
        for (int k = 0; k < pts.Length / 2; k++)
        {
            double x = pts[2 * k], y = pts[(2 * k) + 1];
            for (int i = 1; i < truth.Count; i++)
            {
                Point2d a = truth[i - 1], b = truth[i];
                if ((y - a.Y) * (y - b.Y) <= 0 && a.Y != b.Y)
                {
                    double tx = a.X + ((b.X - a.X) * (y - a.Y) / (b.Y - a.Y));
                    worst = Math.Max(worst, Math.Abs(tx - x));
                    compared++;
                    break;
                }
            }
        }

        return worst;
    }

    private static void AssertLanesFollowTruth(SyntheticRoad road, FrameWorkspace ws, int[] requiredSlots, double tolerancePx)
    {
        var slots = Enumerable.Range(0, ws.LaneCount).Select(i => ws.GetLane(i).Slot).ToList();
        foreach (int s in requiredSlots)
        {
            Assert.Contains(s, slots);
        }

        for (int i = 0; i < ws.LaneCount; i++)
        {
            LaneEstimate lane = ws.GetLane(i);
            double y0 = SyntheticRoad.Boundaries.Single(b => b.Slot == lane.Slot).Y;
            double dev = MaxDeviation(FramePoints(ws, i), road.Truth(y0), out int compared);
            Assert.True(compared >= (Math.Abs(lane.Slot) == 1 ? 4 : 2), $"slot {lane.Slot}: only {compared} points overlap the truth");
            Assert.True(dev <= tolerancePx, $"slot {lane.Slot}: {dev:0.0} px from the drawn line (allowed {tolerancePx})");
        }
    }

    [Theory]
    [InlineData("straight")]
    [InlineData("curve-left")]
    [InlineData("curve-right-yellow")]
    [InlineData("dim")]
    [InlineData("shadows")]
    [InlineData("offset-flat-pitch")]
    public void Process_SyntheticRoad_FindsTheEgoBoundariesOnTheDrawnLines(string scene)
    {
        SyntheticRoad road = scene switch
        {
            "straight" => Road(1),
            "curve-left" => Road(2) with { Curvature = 0.002 },
            "curve-right-yellow" => Road(3) with { Curvature = -0.002, YellowLeft = true },
            "dim" => Road(4) with { Brightness = 0.3, NoiseSigma = 4 },
            "shadows" => Road(5) with { Shadows = true },
            _ => Road(6) with { OffsetM = 0.6, PitchDeg = 0 },
        };
        using Mat frame = road.Render();
        using var pipeline = new LanePipeline(new PipelineOptions());
        FrameResult result = pipeline.Process(frame, 0);

        // Tolerance: the point metric's 20 px at 1280 px width scaled to this width, 10 px
        // (Source: docs/metrics.md, row-sampled point accuracy, step 2).
        AssertLanesFollowTruth(road, pipeline.Workspace!, [-1, 1], 10);
        Assert.Equal(VanishingSource.Estimated, result.VanishingSource);
    }

    [Fact]
    public void Process_StraightRoad_FindsAllFourBoundaries_AndTheVanishingPoint()
    {
        SyntheticRoad road = Road(11);
        using Mat frame = road.Render();
        using var pipeline = new LanePipeline(new PipelineOptions());
        FrameResult result = pipeline.Process(frame, 0);
        AssertLanesFollowTruth(road, pipeline.Workspace!, [-2, -1, 1, 2], 10);

        // Vanishing point of lines parallel to the optical axis' ground track: (cx, cy - f tan θ)
        // (pinhole geometry, Hartley & Zisserman Sec. 8.6); allow 1 % of the width.
        double vy = (359 / 2.0) - (road.Focal * Math.Tan(2 * Math.PI / 180));
        Assert.InRange(result.VanishingX, (639 / 2.0) - 6.4, (639 / 2.0) + 6.4);
        Assert.InRange(result.VanishingY, vy - 6.4, vy + 6.4);
    }

    [Fact]
    public void Process_MultiLanePreset_KeepsTheFourDrawnBoundaries_AndInventsNoThird()
    {
        // The drawn road has boundaries at ±1.8 m and ±5.4 m only (asphalt to ±7.5 m): with slots ±3 allowed the
        // four must still be found on their lines, and nothing may be reported as ±3.
        SyntheticRoad road = Road(12);
        using Mat frame = road.Render();
        using var pipeline = new LanePipeline(KnownPresets.Load("default"));
        pipeline.Process(frame, 0);
        AssertLanesFollowTruth(road, pipeline.Workspace!, [-2, -1, 1, 2], 10);
        Assert.Equal(4, pipeline.Workspace!.LaneCount);
    }

    [Fact]
    public void Process_EstimatesSolidAndDashed()
    {
        // The drawn road has dashed ego boundaries (3 m strokes, 9 m gaps: a metric rounding of the 10 ft / 30 ft pattern of US MUTCD 2003, Sec. 3A.05) and solid
        // outer ones; a kind, when estimated, must name the drawn type. Full 1280x720 resolution: at 640 px the far
        // solid lines thin to 2 px and the coverage rule abstains.
        SyntheticRoad road = new() { Seed = 13 };
        using Mat frame = road.Render();
        using var pipeline = new LanePipeline(new PipelineOptions());
        pipeline.Process(frame, 0);
        FrameWorkspace ws = pipeline.Workspace!;
        int named = 0;
        for (int i = 0; i < ws.LaneCount; i++)
        {
            LaneEstimate lane = ws.GetLane(i);
            if (lane.Kind is not null)
            {
                Assert.Equal(Math.Abs(lane.Slot) == 1 ? "dashed" : "solid", lane.Kind);
                named++;
            }
        }

        Assert.True(named >= 3, $"only {named} kinds estimated");
    }

    [Fact]
    public void Process_BlankRoad_FindsNoLanes()
    {
        using Mat frame = (Road(7) with { Blank = true }).Render();
        using var pipeline = new LanePipeline(new PipelineOptions());
        Assert.Equal(0, pipeline.Process(frame, 0).LaneCount);
    }

    [Fact]
    public void Process_UniformNoise_FindsNoLanes()
    {
        // Pure noise has no marking-shaped ridge: anything found would be a false positive.
        using var frame = new Mat(360, 640, MatType.CV_8UC3, new Scalar(90, 90, 90));
        using var noise = new Mat(360, 640, MatType.CV_8UC3);
        Cv2.Randn(noise, new Scalar(0, 0, 0), new Scalar(8, 8, 8));
        Cv2.Add(frame, noise, frame);
        using var pipeline = new LanePipeline(new PipelineOptions());
        Assert.Equal(0, pipeline.Process(frame, 0).LaneCount);
    }

    [Fact]
    public void Process_Output_RespectsTheLaneFileRules()
    {
        // docs/lane-file.md: >= 2 points, near to far (y decreasing), inside the frame; score in [0, 1]; slot in ±1, ±2.
        using var pipeline = new LanePipeline(new PipelineOptions());
        for (ulong seed = 20; seed < 24; seed++)
        {
            SyntheticRoad road = Road(seed) with { Curvature = (seed - 22) * 0.0015, Shadows = seed % 2 == 0 };
            using Mat frame = road.Render();
            pipeline.Process(frame, 0);
            FrameWorkspace ws = pipeline.Workspace!;
            for (int i = 0; i < ws.LaneCount; i++)
            {
                LaneEstimate lane = ws.GetLane(i);
                ReadOnlySpan<double> p = FramePoints(ws, i);
                Assert.True(lane.PointCount >= 2);
                Assert.InRange(lane.Score, 0, 1);
                Assert.Contains(lane.Slot, new[] { -2, -1, 1, 2 });
                for (int k = 0; k < lane.PointCount; k++)
                {
                    Assert.InRange(p[2 * k], 0, 639);
                    Assert.InRange(p[(2 * k) + 1], 0, 359);
                    if (k > 0)
                    {
                        Assert.True(p[(2 * k) + 1] < p[(2 * k) - 1]);
                    }
                }
            }
        }
    }

    [Fact]
    public void Process_ReusesItsBuffers_AndDisposeReleasesThem()
    {
        // Architecture guide section 6.7: no buffer reallocated after the first frame; all disposed at the end.
        var pipeline = new LanePipeline(new PipelineOptions());
        using Mat a = Road(30).Render();
        using Mat b = (Road(31) with { Curvature = 0.002 }).Render();
        pipeline.Process(a, 0);
        FrameWorkspace ws = pipeline.Workspace!;
        nint[] before = ws.OwnedBuffers.Select(m => m.Data).ToArray();
        for (int i = 0; i < 10; i++)
        {
            pipeline.Process(i % 2 == 0 ? b : a, i);
        }

        Assert.Same(ws, pipeline.Workspace);
        Assert.Equal(before, ws.OwnedBuffers.Select(m => m.Data).ToArray());
#pragma warning disable IDISP017 // the test disposes explicitly to inspect the buffers afterwards
        pipeline.Dispose();
#pragma warning restore IDISP017
        Assert.All(ws.OwnedBuffers, m => Assert.True(m.IsDisposed));
    }

    [Fact]
    public void Process_ManagedAllocation_StaysWithinBudget()
    {
        // Architecture guide section 7: OpenCvSharp interop costs about 2 KB per frame; HoughLinesP returns a new
        // array (16 bytes per segment). Budget: 16 KB per frame for our code plus interop garbage.
        using var pipeline = new LanePipeline(new PipelineOptions());
        using Mat frame = Road(40).Render();
        pipeline.Process(frame, 0);
        pipeline.Process(frame, 0);
        long before = GC.GetAllocatedBytesForCurrentThread();
        for (int i = 0; i < 10; i++)
        {
            pipeline.Process(frame, i);
        }

        long perFrame = (GC.GetAllocatedBytesForCurrentThread() - before) / 10;
        Assert.True(perFrame < 16 * 1024, $"{perFrame} bytes per frame");
    }

    [Fact]
    public void Process_SameFrameTwice_GivesIdenticalLanes()
    {
        // Stills are independent: no state leaks from one frame to the next (tracking off).
        using var pipeline = new LanePipeline(new PipelineOptions());
        using Mat a = (Road(50) with { Curvature = 0.0015 }).Render();
        using Mat b = (Road(51) with { Shadows = true }).Render();
        pipeline.Process(a, 0);
        LaneEstimate[] first = Enumerable.Range(0, pipeline.Workspace!.LaneCount).Select(pipeline.Workspace.GetLane).ToArray();
        pipeline.Process(b, 1);
        pipeline.Process(a, 2);
        LaneEstimate[] again = Enumerable.Range(0, pipeline.Workspace!.LaneCount).Select(pipeline.Workspace.GetLane).ToArray();
        Assert.Equal(first, again);
    }

    // Lane points in the frame's own pixels: the workspace holds them at the working size (limits.workingWidthPx
    // enlarges these 640-wide test frames to 1280), so map them back as detect does when writing lane files.
    private static double[] FramePoints(FrameWorkspace ws, int i)
    {
        double[] p = ws.GetLanePoints(i).ToArray();
        for (int k = 0; k + 1 < p.Length; k += 2)
        {
            (p[k], p[k + 1]) = ws.ToFramePixels(p[k], p[k + 1]);
        }

        return p;
    }
}
