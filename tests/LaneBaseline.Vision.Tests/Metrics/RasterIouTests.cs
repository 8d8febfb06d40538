using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Metrics;
using LaneBaseline.Testing;
using LaneBaseline.Vision.Metrics;
using OpenCvSharp;
using Xunit;

namespace LaneBaseline.Vision.Tests.Metrics;

public sealed class RasterIouTests : IDisposable
{
    private readonly OpenCvLaneRasterizer rasterizer = new();

    public void Dispose() => rasterizer.Dispose();

    // Source: docs/checks.md (OpenCV line footprint) / docs/metrics.md: OpenCV draws thickness t >= 2 as 2*ceil(t/2)+1 pixels across.
    // Checked against OpenCV itself drawing the same line on a full canvas (the library is the oracle).
    [Theory]
    [InlineData(30, 31)]
    [InlineData(23, 25)]
    [InlineData(8, 9)]
    [InlineData(6, 7)]
    public void VerticalFullHeightLane_HasFootprint2CeilHalfPlus1(int thickness, int across)
    {
        using var full = new Mat(1080, 1920, MatType.CV_8UC1, Scalar.All(0));
        Cv2.Line(full, new Point(100, 1079), new Point(100, 0), Scalar.All(1), thickness, LineTypes.Link8);
        using Mat row = full.Row(300);
        Assert.Equal(across, Cv2.CountNonZero(row));
        (long inter, long areaT, long _) = Measure(1920, 1080, thickness, Lanes.Vertical(100, 1080), Lanes.Vertical(100, 1080));
        Assert.Equal(Cv2.CountNonZero(full), areaT);                 // round caps beyond the frame are clipped
        Assert.Equal(across * 1080L, areaT);
        Assert.Equal(areaT, inter);
    }

    // Source: docs/metrics.md worked check: two full-height vertical lanes d px apart on a 1920x1080 frame have
    // IoU (31-d)/(31+d): rows are 31 px wide, overlap 31-d, union 31+d per row, caps clipped. d=15 -> 8/23, d=30 -> 1/61.
    [Theory]
    [InlineData(15, 8, 23)]
    [InlineData(30, 1, 61)]
    [InlineData(31, 0, 1)]
    public void TwoVerticalLanes_IouIs31MinusDOver31PlusD(int d, int num, int den)
    {
        (long inter, long areaT, long areaP) = Measure(1920, 1080, 30, Lanes.Vertical(400, 1080), Lanes.Vertical(400 + d, 1080));
        double iou = (double)inter / (areaT + areaP - inter);
        Assert.Equal((double)num / den, iou, 15);
    }

    // Hand-derived exact threshold cases: thickness 8 is 9 px across; d = 3 gives 6/12 = 0.50 exactly (TP at 0.50, not
    // 0.55); thickness 6 is 7 px across; d = 1 gives 6/8 = 0.75 exactly (TP at 0.75, not 0.80).
    [Theory]
    [InlineData(8, 3, "0.50", "0.55")]
    [InlineData(6, 1, "0.75", "0.80")]
    public void ExactThresholdCases_AreDecidedExactly(int thickness, int d, string met, string notMet)
    {
        var scorer = new FrameScorer(rasterizer, new ScoreSettings { LaneWidthPx = thickness });
        FrameScore f = scorer.Score(Lanes.Truth("a", 640, 360, Lanes.Vertical(200, 360)), Lanes.Pred("a", Lanes.Vertical(200 + d, 360)));
        IReadOnlyList<IouThreshold> th = scorer.Thresholds;
        Assert.Equal(1, f.IouF1.TruePositives[IndexOf(th, met)]);
        Assert.Equal(0, f.IouF1.TruePositives[IndexOf(th, notMet)]);
    }

    // Source: docs/metrics.md: points are rounded half to even (C# Math.Round default); 412.5 -> 412, 413.5 -> 414.
    [Theory]
    [InlineData(412.5, 412, true)]
    [InlineData(413.5, 414, true)]
    [InlineData(413.5, 413, false)]
    public void Rounding_IsHalfToEven(double x, double sameAs, bool identical)
    {
        (long inter, long areaT, long areaP) = Measure(1280, 720, 23, Lanes.Vertical(x, 720), Lanes.Vertical(sameAs, 720));
        Assert.Equal(identical, inter == areaT && inter == areaP);
    }

    // Source: docs/metrics.md, line width round(30*width/1640): 1640 -> 30, 1280 -> 23 (23.41), 820 -> 15, 1920 -> 35 (35.12), tiny -> 1.
    [Theory]
    [InlineData(1640, 30)]
    [InlineData(1280, 23)]
    [InlineData(820, 15)]
    [InlineData(1920, 35)] // 35.12
    [InlineData(10, 1)]
    public void LaneWidth_FollowsSpecification(int frameWidth, int expected) =>
        Assert.Equal(expected, new ScoreSettings().LaneWidthFor(frameWidth));

    // Bounding-box rasterisation must equal full-canvas rasterisation (OpenCV on the whole frame is the oracle), also for
    // slanted, curved and partly out-of-frame lanes.
    [Fact]
    public void BoundingBoxCounts_EqualFullCanvasCounts()
    {
        var rng = new Core.Random.SplitMix64(11);
        for (int trial = 0; trial < 40; trial++)
        {
            Lane a = RandomLane(ref rng, 1920, 1080), b = RandomLane(ref rng, 1920, 1080);
            int t = 1 + rng.NextInt(40);
            (long inter, long areaA, long areaB) = Measure(1920, 1080, t, a, b);
            using Mat fa = Full(a, 1920, 1080, t), fb = Full(b, 1920, 1080, t), both = new Mat();
            Cv2.BitwiseAnd(fa, fb, both);
            Assert.Equal(Cv2.CountNonZero(fa), areaA);
            Assert.Equal(Cv2.CountNonZero(fb), areaB);
            Assert.Equal(Cv2.CountNonZero(both), inter);
        }
    }

    internal static Lane RandomLane(ref Core.Random.SplitMix64 rng, int w, int h)
    {
        int n = 2 + rng.NextInt(6);
        var pts = new (double, double)[n];
        double x = rng.NextDouble(-0.5 * w, 1.5 * w), y = rng.NextDouble(0.5 * h, 1.5 * h);
        for (int i = 0; i < n; i++)
        {
            pts[i] = (x, y);
            x += rng.NextDouble(-150, 150);
            y -= rng.NextDouble(0, 200);
        }

        return Lanes.Of(pts);
    }

    private static Mat Full(Lane lane, int w, int h, int t)
    {
        var m = new Mat(h, w, MatType.CV_8UC1, Scalar.All(0));
        for (int i = 0; i + 1 < lane.Points.Count; i++)
        {
            Cv2.Line(m, P(lane.Points[i]), P(lane.Points[i + 1]), Scalar.All(1), t, LineTypes.Link8);
        }

        return m;
    }

    private static Point P(LanePoint p) => new((int)Math.Round(p.X), (int)Math.Round(p.Y));

    private static int IndexOf(IReadOnlyList<IouThreshold> th, string key) => th.ToList().IndexOf(IouThreshold.Parse(key));

    private (long Inter, long AreaT, long AreaP) Measure(int w, int h, int t, Lane truth, Lane pred)
    {
        var inter = new long[1];
        var at = new long[1];
        var ap = new long[1];
        rasterizer.Measure(w, h, t, [truth], [pred], inter, at, ap);
        return (inter[0], at[0], ap[0]);
    }
}
