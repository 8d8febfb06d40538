using LaneBaseline.Core.Options;
using LaneBaseline.Core.Results;
using LaneBaseline.Vision.Pipeline;
using LaneBaseline.Vision.Stages;
using OpenCvSharp;
using Xunit;

namespace LaneBaseline.Vision.Tests.Stages;

/// <summary>
/// The marking profile of a lane (<see cref="MarkingProfileStage"/>) on hand-drawn grey and evidence images: a painted
/// line whose width follows the perspective against an image-vertical streak of constant width.
/// </summary>
public sealed class MarkingProfileStageTests
{
    private const int W = 320, H = 180, BandTop = 60;
    private const double VanishingX = 160, VanishingY = 60;

    // Marking width d at row y as the ridge gate uses it: markingWidthFraction (0.025) x 320 = 8 px at the bottom row,
    // shrinking linearly to 0 at the horizon row (flat road, pinhole camera: image width of a ground strip is
    // proportional to the row's distance below the horizon; Hartley & Zisserman, 2nd ed., Sec. 8.6), at least 2 px.
    private static int D(int y) => Math.Max(2, (int)Math.Round(8.0 * (y - VanishingY) / (H - 1 - VanishingY)));

    private static LaneEstimate Profile(Func<int, double> centreX, Func<int, int> width, byte paintGrey, byte roadGrey, byte evidenceValue)
    {
        var o = new PipelineOptions();
        using var ws = new FrameWorkspace(W, H, o.Warp.WidthPx, o.Warp.HeightPx, BandTop, o.Hough.MaxSegments, o.Hough.ImageScale);
        ws.Region.VanishingX = VanishingX;
        ws.Region.VanishingY = VanishingY;
        ws.Region.RoiTop = 70;
        ws.Gradient.Blurred.SetTo(Scalar.All(roadGrey));
        ws.Color.Evidence.SetTo(Scalar.All(0));
        for (int y = 70; y < H; y++)
        {
            int wpx = width(y);
            int x0 = (int)Math.Round(centreX(y)) - (wpx / 2);
            for (int x = x0; x < x0 + wpx; x++)
            {
                ws.Gradient.Blurred.Set(y - BandTop, x, paintGrey);
                ws.Color.Evidence.Set(y, x, evidenceValue);
            }
        }

        // The lane polyline, near to far, every 10 rows from the bottom row to the region's far edge.
        double[] pts = ws.LanePoints[0];
        int n = 0;
        for (int y = H - 1; y >= 70; y -= 10)
        {
            pts[2 * n] = centreX(y);
            pts[(2 * n) + 1] = y;
            n++;
        }

        ws.Lanes[0] = new LaneEstimate(1, 0.9, new Quadratic(0, 0, 0), 100, 1, 1, n);
        ws.LaneCount = 1;
        using var stage = new MarkingProfileStage(o.Gradient);
        stage.Process(ws);
        return ws.Lanes[0];
    }

    [Fact]
    public void PaintedLine_OfThePerspectiveWidth_HasItsWeberContrast_NoWidthMismatch_AndFullSupport()
    {
        // Paint grey 150 on road grey 75: Weber contrast (150 - 75) / 75 = 1.0 (Weber contrast, dL / L of the
        // background: common practice in vision science). Its width is d at every row, so log2(width / d) = 0.
        LaneEstimate lane = Profile(y => VanishingX + ((y - VanishingY) * 0.7), D, 150, 75, 255);
        Assert.Equal(1.0, lane.MarkingContrast, 3);
        Assert.Equal(0.0, lane.WidthMismatch, 3);
        Assert.Equal(1.0, lane.PaintShare, 3);
        Assert.Equal(1.0, lane.NearSupport, 3);
    }

    [Fact]
    public void VerticalStreak_OfConstantWidth_MismatchesThePerspectiveWidth()
    {
        // A lamp's streak on a wet road keeps its image width (3 px here) at every row, while d runs from 8 px at the
        // bottom to 2 px near the region's far edge: |log2(3 / d)| is 1.42 near the camera (3 vs 8), 0 where d = 3 and
        // 0.58 where d = 2. Hand count over the 55 sampled rows (every other row, 179 down to 71): about 7 rows each at
        // d = 3, 4, 5, 6, 7, 4 at d = 8 and 14 at d = 2, so the median row lies among the d = 2 rows: 0.58 >= 0.4.
        // Its evidence passed the ridge test only (160), so no paint share.
        LaneEstimate streak = Profile(_ => 230, _ => 3, 150, 75, 160);
        Assert.True(streak.WidthMismatch >= 0.4, $"width mismatch {streak.WidthMismatch}");
        Assert.Equal(0.0, streak.PaintShare, 3);
        Assert.Equal(1.0, streak.MarkingContrast, 3);
    }

    [Fact]
    public void LaneWithoutEvidenceInItsNearHalf_HasLowNearSupport_AndNoEvidenceGivesZeroContrast()
    {
        // Evidence only above the midpoint between the region's far edge (70) and the bottom row (179), i.e. rows < 124.
        LaneEstimate far = Profile(y => VanishingX + ((y - VanishingY) * 0.7), y => y < 124 ? D(y) : 0, 150, 75, 255);
        Assert.Equal(0.0, far.NearSupport, 3);
        LaneEstimate none = Profile(y => VanishingX + ((y - VanishingY) * 0.7), _ => 0, 150, 75, 255);
        Assert.Equal(0.0, none.MarkingContrast, 3);
        Assert.True(double.IsNaN(none.WidthMismatch));
    }
    [Fact]
    public void LaneMeasuredOnlyFarAway_HasALargerExtrapolationThanTheSameLaneMeasuredNear()
    {
        // The same line, once painted over its whole length and once only in rows < 100 (far, near the vanishing point).
        // Sampled rows run 179, 177, ..., 79 (every other row, from the bottom row to the polyline's far end at 79).
        Func<int, double> line = y => VanishingX + ((y - VanishingY) * 0.7);
        LaneEstimate whole = Profile(line, D, 150, 75, 255);
        LaneEstimate far = Profile(line, y => y < 100 ? D(y) : 0, 150, 75, 255);

        // Whole: the nearest supported row is the bottom row, nothing is extrapolated; rows evenly spread over the
        // length put the bottom row sqrt(3) = 1.73 standard deviations from their mean (uniform distribution: sd =
        // length / sqrt(12), bottom at length / 2 from the mean; common practice), a little less with the discrete rows.
        Assert.Equal(0.0, whole.ExtrapolatedShare, 3);
        Assert.InRange(whole.BottomLeverage, 1.6, 1.8);

        // Far: nearest supported row 99, rows 179..79 scanned, so (179 - 99) / (179 - 79) = 0.8 of the image length is
        // extrapolated (hand count). Supported rows 99, 97, ..., 79 (11 rows): mean 89, i.e. 90 rows above the bottom;
        // population sd of 11 rows 2 apart = 2 * sqrt((11^2 - 1) / 12) = 6.32 (discrete uniform variance, from memory),
        // so the leverage is 90 / 6.32 = 14.2.
        Assert.Equal(0.8, far.ExtrapolatedShare, 3);
        Assert.Equal(90.0 / (2 * Math.Sqrt(120.0 / 12)), far.BottomLeverage, 2);
        Assert.True(far.BottomLeverage > 5 * whole.BottomLeverage);
    }

    [Fact]
    public void LaneWithoutEvidence_IsFullyExtrapolated_AtTheLeverageCap()
    {
        LaneEstimate none = Profile(y => VanishingX + ((y - VanishingY) * 0.7), _ => 0, 150, 75, 255);
        Assert.Equal(1.0, none.ExtrapolatedShare, 3);
        Assert.Equal(MarkingProfileStage.MaxLeverage, none.BottomLeverage, 3);
    }

    [Theory]
    [InlineData(1, -10.0, 100.0)] // one row: nothing to extrapolate from
    [InlineData(3, -30.0, 300.0)] // three rows all at 10 above the bottom: spread 0
    public void Leverage_WithoutASpreadOfRows_IsTheCap(int n, double sumY, double sumYY)
    {
        Assert.Equal(MarkingProfileStage.MaxLeverage, MarkingProfileStage.Leverage(n, sumY, sumYY), 6);
    }
}
