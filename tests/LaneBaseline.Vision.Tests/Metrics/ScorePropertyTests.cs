using CsCheck;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Metrics;
using LaneBaseline.Testing;
using LaneBaseline.Vision.Metrics;
using Xunit;

namespace LaneBaseline.Vision.Tests.Metrics;

public sealed class ScorePropertyTests
{
    private static readonly Gen<Lane> GenLane =
        Gen.Select(Gen.Double[100, 1500], Gen.Double[-0.8, 0.8], Gen.Double[150, 400], Gen.Double[-60, 60])
            .Select((x, slope, top, bend) => Lanes.Of((x, 589), (x + (slope * 250) + (bend / 2), 339), (x + (slope * (589 - top)) + bend, top)));

    private static readonly Gen<Lane[]> GenLanes = GenLane.Array[0, 5];

    // Property (metric definition): scores do not depend on the order lanes are listed in.
    [Fact]
    public void Score_IsInvariantUnderLaneOrder()
    {
        using var rasterizer = new OpenCvLaneRasterizer();
        var scorer = new FrameScorer(rasterizer, new ScoreSettings());
        Gen.Select(GenLanes, GenLanes).Sample((truth, pred) =>
        {
            FrameScore a = scorer.Score(Lanes.Truth("f", 1920, 1080, truth), Lanes.Pred("f", pred));
            FrameScore b = scorer.Score(Lanes.Truth("f", 1920, 1080, [.. truth.Reverse()]), Lanes.Pred("f", [.. pred.Reverse()]));
            Assert.Equal(a.IouF1.TruePositives, b.IouF1.TruePositives);
            Assert.Equal(a.Points.AccuracySum, b.Points.AccuracySum, 9);
        }, iter: 60, threads: 1);
    }

    // Property: predictions identical to the truth score F1 = 1 at every threshold and accuracy 1 (for lanes tall
    // enough to hold sample rows, which every generated lane is).
    [Fact]
    public void Score_PerfectPredictions_ScoreOne()
    {
        using var rasterizer = new OpenCvLaneRasterizer();
        var scorer = new FrameScorer(rasterizer, new ScoreSettings());
        GenLanes.Sample(lanes =>
        {
            FrameScore f = scorer.Score(Lanes.Truth("f", 1920, 1080, lanes), Lanes.Pred("f", lanes));
            var tally = new ScoreTally(scorer.Thresholds);
            tally.Add(f);
            Assert.All(Enumerable.Range(0, scorer.Thresholds.Count), k => Assert.Equal(1.0, tally.IouF1.At(k).F1));
            Assert.Equal(1.0, tally.Points.Accuracy, 12);
        }, iter: 40, threads: 1);
    }

    // Property: adding a prediction far from every truth lane (in another part of the frame) lowers precision and
    // leaves recall unchanged.
    [Fact]
    public void Score_FarAwayExtraLane_LowersPrecision_KeepsRecall()
    {
        using var rasterizer = new OpenCvLaneRasterizer();
        var scorer = new FrameScorer(rasterizer, new ScoreSettings());
        Lane far = Lanes.Of((-1000, 589), (-1000, 300));
        GenLanes.Where(l => l.Length > 0).Sample(lanes =>
        {
            var before = new ScoreTally(scorer.Thresholds);
            before.Add(scorer.Score(Lanes.Truth("f", 1920, 1080, lanes), Lanes.Pred("f", lanes)));
            var after = new ScoreTally(scorer.Thresholds);
            after.Add(scorer.Score(Lanes.Truth("f", 1920, 1080, lanes), Lanes.Pred("f", [.. lanes, far])));
            DetectionCounts b = before.IouF1.At(IouThreshold.Half), a = after.IouF1.At(IouThreshold.Half);
            Assert.True(a.Precision < b.Precision);
            Assert.Equal(b.Recall, a.Recall);
        }, iter: 40, threads: 1);
    }

    // Property: IoU is symmetric and within [0, 1].
    [Fact]
    public void Iou_IsSymmetric_AndBounded()
    {
        using var rasterizer = new OpenCvLaneRasterizer();
        Gen.Select(GenLane, GenLane, Gen.Int[1, 40]).Sample((a, b, t) =>
        {
            var i1 = new long[1];
            var a1 = new long[1];
            var b1 = new long[1];
            var i2 = new long[1];
            var a2 = new long[1];
            var b2 = new long[1];
            rasterizer.Measure(1920, 1080, t, [a], [b], i1, a1, b1);
            rasterizer.Measure(1920, 1080, t, [b], [a], i2, a2, b2);
            double iou1 = (double)i1[0] / (a1[0] + b1[0] - i1[0]), iou2 = (double)i2[0] / (a2[0] + b2[0] - i2[0]);
            Assert.Equal(iou1, iou2);
            Assert.InRange(iou1, 0.0, 1.0);
        }, iter: 100, threads: 1);
    }
}
