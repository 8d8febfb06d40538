using LaneBaseline.Core.Options;
using LaneBaseline.Vision.Pipeline;
using LaneBaseline.Vision.Tests.Pipeline;
using OpenCvSharp;
using Xunit;

namespace LaneBaseline.Vision.Tests.Stages;

public sealed class TemporalTrackerTests
{
    private static readonly PipelineOptions Tracking = new() { Tracking = new TrackingOptions { Enabled = true, MaxMissedFrames = 2 } };

    [Fact]
    public void Tracking_AddsTheTrackStage_AfterTheSearch()
    {
        using var pipeline = new LanePipeline(Tracking);
        using Mat frame = new SyntheticRoad { Width = 640, Height = 360 }.Render();
        pipeline.Process(frame, 0);
        Assert.Equal(["resize", "gradient", "hough", "region", "color", "warp", "search", "marking", "track"], pipeline.StageNames); // 640-wide frames are enlarged first
    }

    [Fact]
    public void Tracking_CoastsThroughAMissingFrame_ThenDropsTheTrack()
    {
        // A blank frame in a sequence keeps the tracks alive on their prediction (score halved each frame) for
        // tracking.maxMissedFrames frames, then drops them (Kalman 1960: predict without update).
        using var pipeline = new LanePipeline(Tracking);
        using Mat road = new SyntheticRoad { Width = 640, Height = 360, Seed = 3 }.Render();
        using Mat blank = new SyntheticRoad { Width = 640, Height = 360, Seed = 4, Blank = true }.Render();
        pipeline.Process(road, 0.0);
        pipeline.Process(road, 0.1);
        int lanes = pipeline.Workspace!.LaneCount;
        double score = pipeline.Workspace.GetLane(0).Score;
        Assert.True(lanes >= 2);

        Assert.Equal(lanes, pipeline.Process(blank, 0.2).LaneCount);
        Assert.Equal(score / 2, pipeline.Workspace.GetLane(0).Score, 9);
        Assert.Equal(lanes, pipeline.Process(blank, 0.3).LaneCount);
        Assert.Equal(0, pipeline.Process(blank, 0.4).LaneCount);
    }

    [Fact]
    public void Tracking_StaticScene_StaysOnTheMeasurement()
    {
        // With identical measurements the filtered state equals the measurement (K(z - x) = 0 once x = z).
        using var still = new LanePipeline(new PipelineOptions());
        using var tracked = new LanePipeline(Tracking);
        using Mat road = new SyntheticRoad { Width = 640, Height = 360, Seed = 5, Curvature = 0.001 }.Render();
        still.Process(road, 0);
        for (int i = 0; i < 5; i++)
        {
            tracked.Process(road, i * 0.1);
        }

        Assert.Equal(still.Workspace!.LaneCount, tracked.Workspace!.LaneCount);
        for (int i = 0; i < still.Workspace.LaneCount; i++)
        {
            Assert.Equal(still.Workspace.GetLane(i).Slot, tracked.Workspace.GetLane(i).Slot);
            Assert.Equal(still.Workspace.GetLane(i).Fit.C, tracked.Workspace.GetLane(i).Fit.C, 6);
        }
    }

    [Fact]
    public void ResetSequence_ForgetsTheTracks()
    {
        using var pipeline = new LanePipeline(Tracking);
        using Mat road = new SyntheticRoad { Width = 640, Height = 360, Seed = 6 }.Render();
        using Mat blank = new SyntheticRoad { Width = 640, Height = 360, Seed = 7, Blank = true }.Render();
        pipeline.Process(road, 0);
        pipeline.ResetSequence();
        Assert.Equal(0, pipeline.Process(blank, 0.1).LaneCount);
    }
}
