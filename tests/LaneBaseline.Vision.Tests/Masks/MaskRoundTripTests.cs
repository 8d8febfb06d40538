using LaneBaseline.Core.Geometry;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Metrics;
using LaneBaseline.Testing;
using LaneBaseline.Vision.Masks;
using OpenCvSharp;
using Xunit;

namespace LaneBaseline.Vision.Tests.Masks;

public sealed class MaskRoundTripTests
{
    // Stated tolerance of the lanes -> mask -> lanes round trip (docs/formats.md): at every row sampled every 10 px
    // inside the original lane's y-extent, away from the round caps (w/2 + 2 px from each end), the recovered x is
    // within 1.0 px of the original on straight lanes. Reasoning: the horizontal cross-section of a thick straight line is symmetric
    // about its centre line, so the row-wise centre is exact up to pixel quantisation (±0.5 px) and the ±2-row
    // moving average on a line is unbiased (common practice).
    // At a polyline corner the two thick segments' footprints overlap in the same rows, which moves the row centre
    // towards the inside of the bend; for the gentle bends of a lane (slope change under 0.3) the stated tolerance
    // is 2.5 px at 30 px width (measured worst case 1.9 px on the bending case below).
    public static TheoryData<double[], double> LaneShapes() => new()
    {
        { new double[] { 400, 589, 700, 250 }, 1.0 },                    // straight, leaning right
        { new double[] { 1300, 589, 900, 200 }, 1.0 },                   // straight, leaning left
        { new double[] { 820, 589, 822, 100 }, 1.0 },                    // almost vertical
        { new double[] { 300, 589, 420, 450, 560, 330, 720, 230 }, 2.5 }, // bending polyline
    };

    [Theory]
    [MemberData(nameof(LaneShapes))]
    public void LaneToMaskToLane_StaysWithinTolerance(double[] xy, double tolerancePx)
    {
        Lane lane = FromFlat(xy);
        const int w = 30; // the metric's width at 1640 px (docs/metrics.md), passed explicitly
        using Mat mask = LaneMaskPainter.Paint([lane], 1920, 1080, w);
        var dropped = new List<(int, int)>();
        IReadOnlyList<Lane> back = new MaskLaneExtractor().Extract(mask, 1920, 1080, dropped);

        Assert.Empty(dropped);
        Lane got = Assert.Single(back);
        AssertClose(lane, got, (w / 2) + 2, tolerancePx);
        Assert.True(got.Points[0].Y > got.Points[^1].Y, "near to far: y decreasing");
    }

    [Fact]
    public void HalfResolutionMask_IsRescaledToTheFrame()
    {
        // A network's reduced-size output: the mask is painted at 960x540 and read back for a 1920x1080 frame.
        // Tolerance doubles with the scale factor 2 (one mask pixel = 2 frame pixels): 2.0 px.
        Lane lane = FromFlat([400, 589, 700, 250]);
        Lane half = FromFlat([199.75, 294.25, 349.75, 124.75]); // (x + 0.5) / 2 - 0.5, same for y (exact halving of 1920x1080)
        using Mat mask = LaneMaskPainter.Paint([half], 960, 540, 15);
        IReadOnlyList<Lane> back = new MaskLaneExtractor().Extract(mask, 1920, 1080, []);
        AssertClose(lane, Assert.Single(back), 20, 2.0);
    }

    [Fact]
    public void SixteenBitMask_ManyIds_AndShortIdDropped()
    {
        using var mask = new Mat(100, 400, MatType.CV_16UC1, Scalar.All(0));
        Cv2.Line(mask, new Point(50, 99), new Point(60, 0), Scalar.All(1000), 5);
        Cv2.Line(mask, new Point(300, 99), new Point(320, 0), Scalar.All(300), 5);
        Cv2.Rectangle(mask, new Rect(200, 40, 10, 4), Scalar.All(7), -1); // 4 rows: fewer than MinRows 10
        var dropped = new List<(int Id, int Rows)>();
        IReadOnlyList<Lane> lanes = new MaskLaneExtractor().Extract(mask, 400, 100, dropped);
        Assert.Equal(2, lanes.Count);
        Assert.True(lanes[0].Points[0].X > 250, "ids in ascending order: id 300 first");
        Assert.Equal((7, 4), Assert.Single(dropped));
    }

    [Fact]
    public void MaskIou_SameMask_IsOne_AndShiftedLane_MatchesHandCount()
    {
        // Two vertical 31-px-wide bars (thickness 30 draws 2*ceil(30/2)+1 = 31 px, docs/checks.md) over 1080 rows, 15 px
        // apart: IoU = (31-15)/(31+15) = 16/46 over the full height (docs/metrics.md worked check), caps clipped away.
        using Mat a = LaneMaskPainter.Paint([Lanes.Vertical(400, 1080)], 1920, 1080, 30);
        using Mat b = LaneMaskPainter.Paint([Lanes.Vertical(415, 1080)], 1920, 1080, 30);
        (List<MaskLaneIou> same, _) = MaskIou.Compare("f", a, a);
        Assert.Equal(1.0, Assert.Single(same).Iou);
        (List<MaskLaneIou> shifted, int predLanes) = MaskIou.Compare("f", a, b);
        Assert.Equal(1, predLanes);
        Assert.Equal(16.0 / 46.0, Assert.Single(shifted).Iou, 12);
    }

    [Fact]
    public void MaskIou_PredictionAtHalfSize_IsResizedNearest()
    {
        using Mat truth = LaneMaskPainter.Paint([Lanes.Vertical(400, 1080)], 1920, 1080, 30);
        using var small = new Mat();
        Cv2.Resize(truth, small, new Size(960, 540), 0, 0, InterpolationFlags.Nearest);
        (List<MaskLaneIou> r, _) = MaskIou.Compare("f", truth, small);
        Assert.True(Assert.Single(r).Iou > 0.9, "a nearest-neighbour down/up scale of a 31 px bar keeps IoU above 0.9");
    }

    private static Lane FromFlat(double[] xy)
    {
        var pts = new List<LanePoint>();
        for (int i = 0; i < xy.Length; i += 2)
        {
            pts.Add(new LanePoint(xy[i], xy[i + 1]));
        }

        return new Lane { Points = pts };
    }

    private static void AssertClose(Lane original, Lane got, double capPx, double tolerancePx)
    {
        (double lo, double hi) = Polylines.YExtent(original.Points);
        (double glo, double ghi) = Polylines.YExtent(got.Points);
        Assert.InRange(glo, lo - capPx - 1, lo + capPx + 1);
        Assert.InRange(ghi, hi - capPx - 1, hi + capPx + 1);
        int checkedRows = 0;
        double worst = 0;
        for (double y = hi - capPx; y >= lo + capPx; y -= 10)
        {
            Assert.True(Polylines.TryXAt(original.Points, y, out double x0));
            Assert.True(Polylines.TryXAt(got.Points, y, out double x1), $"row {y} missing from the recovered lane");
            worst = Math.Max(worst, Math.Abs(x1 - x0));
            Assert.True(Math.Abs(x1 - x0) <= tolerancePx, $"row {y}: |{x1} - {x0}| > {tolerancePx}");
            checkedRows++;
        }

        Assert.True(checkedRows >= 10);
        Console.WriteLine($"round trip worst |dx| = {worst:0.###} px");
    }
}
