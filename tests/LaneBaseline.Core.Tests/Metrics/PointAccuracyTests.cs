using LaneBaseline.Core.Geometry;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Metrics;
using LaneBaseline.Core.Metrics.PointAccuracy;
using LaneBaseline.Testing;
using Xunit;

namespace LaneBaseline.Core.Tests.Metrics;

public sealed class PointAccuracyTests
{
    // Source: docs/metrics.md worked check: on a 1280-wide frame a lane x = 0.75*y + 100 has tolerance
    // 20 / cos(atan(0.75)) = 20 / 0.8 = 25 px (cos(atan(3/4)) = 4/5 from the 3-4-5 triangle).
    [Fact]
    public void Tolerance_SlantedLaneOn1280Frame_Is25()
    {
        Lane lane = Lanes.Of((0.75 * 719 + 100, 719), (100, 0));
        var rows = new List<int>();
        var xs = new List<double>();
        RowSampling.SampleRows(lane.Points, 720, rows, xs);
        double a = RowSampling.FitSlope(rows, xs);
        Assert.Equal(0.75, a, 12);
        Assert.Equal(25.0, RowSampling.Tolerance(new ScoreSettings().ToleranceFor(1280), a), 9);
    }

    // Hand-derived: rows sampled are height-1, height-11, ... ; a 720-high frame gives rows 719, 709, ..., 9 = 72 rows.
    [Fact]
    public void SampleRows_FullHeightLane_Every10PxFromBottom()
    {
        var rows = new List<int>();
        var xs = new List<double>();
        RowSampling.SampleRows(Lanes.Vertical(50, 720).Points, 720, rows, xs);
        Assert.Equal(72, rows.Count);
        Assert.Equal(719, rows[0]);
        Assert.Equal(9, rows[^1]);
    }

    // Hand-derived: a lane spanning y in [100.2, 100.8] holds no sample row (rows are ..., 99, 109, ... on 720 high),
    // so it is counted with accuracy 0 and is a false negative.
    [Fact]
    public void FrameScorer_TruthWithoutSampleRow_CountsAsUnmatched()
    {
        var scorer = new FrameScorer(new NoRaster(), new ScoreSettings());
        Lane thin = Lanes.Of((10, 100.8), (20, 100.2));
        FrameScore f = scorer.Score(Lanes.Truth("a", 1280, 720, thin), Lanes.Pred("a", thin));
        Assert.Equal(1, f.TruthLanes);
        Assert.Equal(0, f.Points.AccuracySum);
        Assert.Equal(0, f.Points.Matched);
    }

    // Hand-derived: truth vertical at x=100 (72 rows); prediction at x=119.9 is within 20 px (strict <), at x=120 is not.
    [Theory]
    [InlineData(119.9, 1.0, 1)]
    [InlineData(120.0, 0.0, 0)]
    public void FrameScorer_ToleranceIsStrict(double predX, double expectedAcc, int expectedMatched)
    {
        var scorer = new FrameScorer(new NoRaster(), new ScoreSettings());
        FrameScore f = scorer.Score(Lanes.Truth("a", 1280, 720, Lanes.Vertical(100, 720)), Lanes.Pred("a", Lanes.Vertical(predX, 720)));
        Assert.Equal(expectedAcc, f.Points.AccuracySum, 12);
        Assert.Equal(expectedMatched, f.Points.Matched);
    }

    // Hand-derived: a prediction covering only the lower 62 of 72 sample rows (rows 719..109) scores 62/72 = 0.861 >= 0.85,
    // matched; covering 61 rows (719..119) scores 0.847 < 0.85, not matched.
    [Theory]
    [InlineData(109, 62)]
    [InlineData(119, 61)]
    public void FrameScorer_PartialPrediction_UsesShareOfTruthRows(double topY, int rowsCovered)
    {
        var scorer = new FrameScorer(new NoRaster(), new ScoreSettings());
        FrameScore f = scorer.Score(Lanes.Truth("a", 1280, 720, Lanes.Vertical(100, 720)), Lanes.Pred("a", Lanes.Of((100, 719), (100, topY))));
        Assert.Equal(rowsCovered / 72.0, f.Points.AccuracySum, 12);
        Assert.Equal(rowsCovered * 20 >= 17 * 72 ? 1 : 0, f.Points.Matched);
    }

    // Specification: x at a row comes from the first segment (in point order) whose closed y-range holds the row.
    [Fact]
    public void TryXAt_UsesFirstSegmentHoldingTheRow()
    {
        // Segment 0 goes from (0,100) to (10,50); segment 1 folds back from (10,50) to (40,100).
        Lane lane = Lanes.Of((0, 100), (10, 50), (40, 100));
        Assert.True(Polylines.TryXAt(lane.Points, 75, out double x));
        Assert.Equal(5.0, x, 12);
    }

    private sealed class NoRaster : ILaneRasterizer
    {
        public void Measure(int width, int height, int lineWidthPx, IReadOnlyList<Lane> truth, IReadOnlyList<Lane> predictions, Span<long> intersections, Span<long> truthAreas, Span<long> predictionAreas)
        {
            truthAreas.Fill(1);
            predictionAreas.Fill(1);
        }
    }
}
