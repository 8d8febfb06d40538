using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Options;
using LaneBaseline.Core.Results;
using LaneBaseline.Vision.IO;
using LaneBaseline.Vision.Pipeline;
using OpenCvSharp;
using Xunit;

namespace LaneBaseline.Vision.Tests.Pipeline;

public sealed class FrameSequenceRunnerTests
{
    private static readonly PipelineOptions Tracked = new() { Tracking = new TrackingOptions { Enabled = true } };

    private static string Points(IReadOnlyList<Lane> lanes) =>
        string.Join(";", lanes.Select(l => string.Join(" ", l.Points.Select(p => FormattableString.Invariant($"{p.X},{p.Y}")))));

    [Fact]
    public void NewSequence_RestartsTracking_LikeAFreshPipeline()
    {
        // Common practice (tracking by sequence): the first frame of a new sequence must not inherit tracks from the
        // previous sequence, so it gives exactly the lanes a fresh pipeline gives on it.
        using Mat a = new SyntheticRoad { Width = 640, Height = 360, Seed = 3, Curvature = 0.002 }.Render();
        using Mat b = new SyntheticRoad { Width = 640, Height = 360, Seed = 9, Curvature = -0.002, Shadows = true }.Render();
        string fresh;
        using (var alone = new LanePipeline(Tracked))
        {
            fresh = Points(alone.Process(b, 0).Lanes);
        }

        using var pipeline = new LanePipeline(Tracked);
        var runner = new FrameSequenceRunner(pipeline, _ => throw new InvalidOperationException("decoded up front"));
        for (int i = 0; i < 5; i++)
        {
            runner.Process(new FrameItem(i, $"drive1/{i:D6}.png", null, i * 0.1), a);
        }

        FrameResult first = runner.Process(new FrameItem(5, "drive2/000000.png", null, 0.5), b);
        Assert.Equal(fresh, Points(first.Lanes));

        // The same frame inside the old sequence carries the old tracks (so the comparison above can fail).
        using var carried = new LanePipeline(Tracked);
        for (int i = 0; i < 5; i++)
        {
            carried.Process(a, i * 0.1);
        }

        Assert.NotEqual(fresh, Points(carried.Process(b, 0.5).Lanes));
    }

    [Fact]
    public void DecodesOnlyFramesWithoutPixels_AndReleasesThem()
    {
        using Mat a = new SyntheticRoad { Width = 320, Height = 180, Seed = 4 }.Render();
        var decoded = new List<Mat>();
        using var pipeline = new LanePipeline(new PipelineOptions());
        var runner = new FrameSequenceRunner(pipeline, _ =>
        {
            Mat m = a.Clone();
            decoded.Add(m);
            return m;
        });
        runner.Process(new FrameItem(0, "s/000000.png", "unused", 0), a);
        Assert.Empty(decoded);
        runner.Process(new FrameItem(1, "s/000001.png", "unused", 0.1), null);
        Assert.Single(decoded);
        Assert.True(decoded[0].IsDisposed);
        Assert.False(a.IsDisposed);
    }
}
