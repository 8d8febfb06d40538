using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Metrics;
using LaneBaseline.Core.Metrics.ConfidenceSweep;
using LaneBaseline.Testing;
using Xunit;

namespace LaneBaseline.Core.Tests.Metrics;

/// <summary>The confidence sweep unit: per-cutoff reassignment of the kept lanes (docs/metrics.md section 1).</summary>
public sealed class ConfidenceSweepTests
{
    // Hand-derived (common practice: precision-recall over a score threshold). Every footprint is 10 px. Overlaps:
    // T0-P0 8 px (IoU 8/12 = 0.667), T1-P0 9 px (9/11 = 0.818), T1-P1 7 px (7/13 = 0.538), T0-P1 none.
    // P0 scores 0.9, P1 0.2, P2 has no score and overlaps nothing.
    //  cutoffs 0.00-0.20 keep P0, P1, P2: the best total IoU pairs T0-P0 and T1-P1 (1.205 > 0.818): TP 2 of 3 kept;
    //  cutoffs 0.25-0.90 keep P0, P2: T1-P0 (0.818) beats T0-P0: TP 1 of 2 kept;
    //  cutoff 0.95 keeps P2 only: TP 0 of 1 kept.
    [Fact]
    public void Measure_ReassignsTheKeptLanesAtEveryCutoff()
    {
        Lane p0 = Scored(10, 0.9);
        Lane p1 = Scored(20, 0.2);
        Lane p2 = Lanes.Vertical(30, 100);
        FrameAssignment frame = FrameAssignment.Measure(new TableRaster(), 100, 100, 3, [Lanes.Vertical(1, 100), Lanes.Vertical(2, 100)], [p0, p1, p2]);

        FrameConfidenceSweep sweep = FrameConfidenceSweep.Measure(frame);

        Assert.True(sweep.HasConfidence);
        int[] tp = [.. Enumerable.Range(0, 20).Select(k => k <= 4 ? 2 : k <= 18 ? 1 : 0)];
        int[] kept = [.. Enumerable.Range(0, 20).Select(k => k <= 4 ? 3 : k <= 18 ? 2 : 1)];
        Assert.Equal(tp, sweep.TruePositives);
        Assert.Equal(kept, sweep.PredLanes);
    }

    // Hand-derived: without any score every cutoff keeps all three lanes and finds the assignment's two IoU 0.50 pairs.
    [Fact]
    public void Measure_WithoutConfidence_KeepsEveryLaneAtEveryCutoff()
    {
        FrameAssignment frame = FrameAssignment.Measure(new TableRaster(), 100, 100, 3, [Lanes.Vertical(1, 100), Lanes.Vertical(2, 100)], [Lanes.Vertical(10, 100), Lanes.Vertical(20, 100), Lanes.Vertical(30, 100)]);

        FrameConfidenceSweep sweep = FrameConfidenceSweep.Measure(frame);

        Assert.False(sweep.HasConfidence);
        Assert.All(sweep.TruePositives, v => Assert.Equal(2, v));
        Assert.All(sweep.PredLanes, v => Assert.Equal(3, v));
    }

    // Hand-derived: two frames of the first test give TP 4 of 6 kept at cutoff 0 against 4 truth lanes:
    // precision 4/6, recall 4/4.
    [Fact]
    public void Tally_SumsFramesAndDerivesTheRates()
    {
        Lane p0 = Scored(10, 0.9);
        Lane p1 = Scored(20, 0.2);
        FrameAssignment frame = FrameAssignment.Measure(new TableRaster(), 100, 100, 3, [Lanes.Vertical(1, 100), Lanes.Vertical(2, 100)], [p0, p1, Lanes.Vertical(30, 100)]);
        var tally = new ConfidenceSweepTally();
        for (int i = 0; i < 2; i++)
        {
            tally.Add(new FrameScore { Frame = "f", Tags = [], TruthLanes = 2, PredLanes = 3, Sweep = FrameConfidenceSweep.Measure(frame) });
        }

        DetectionCounts c = tally.At(0);
        Assert.Equal(4, c.TruePositives);
        Assert.Equal(2, c.FalsePositives);
        Assert.Equal(4.0 / 6.0, c.Precision, 12);
        Assert.Equal(1.0, c.Recall, 12);
        Assert.True(tally.AnyConfidence);
    }

    private static Lane Scored(double x, double score) => new() { Points = Lanes.Vertical(x, 100).Points, Score = score };

    /// <summary>Fixed footprints and overlaps by lane position (see the tests' comments).</summary>
    private sealed class TableRaster : ILaneRasterizer
    {
        public void Measure(int width, int height, int lineWidthPx, IReadOnlyList<Lane> truth, IReadOnlyList<Lane> predictions, Span<long> intersections, Span<long> truthAreas, Span<long> predictionAreas)
        {
            long[,] overlap = { { 8, 0, 0 }, { 9, 7, 0 } };
            truthAreas.Fill(10);
            predictionAreas.Fill(10);
            for (int i = 0; i < truth.Count; i++)
            {
                for (int j = 0; j < predictions.Count; j++)
                {
                    intersections[(i * predictions.Count) + j] = overlap[i, j];
                }
            }
        }
    }
}
