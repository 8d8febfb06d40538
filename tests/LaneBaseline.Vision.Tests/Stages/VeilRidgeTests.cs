using LaneBaseline.Core.Options;
using LaneBaseline.Vision.Pipeline;
using LaneBaseline.Vision.Stages;
using OpenCvSharp;
using Xunit;

namespace LaneBaseline.Vision.Tests.Stages;

/// <summary>
/// The veil-headroom ridge of stage <c>color</c> (color.veilRidgeMinStep, color.veilRidgeMinBackground) on small drawn
/// frames (320x180). Source of the expected behaviour: Koschmieder's law (H. Koschmieder, Beitr. Phys. freien Atm. 12,
/// 1924), I = J·t + A·(1 − t): a veil that lifts the background towards white shrinks a marking's step in proportion
/// to the headroom below white, so a step of 5 grey levels at a background of 238 (headroom 17) is as strong a marking
/// as a step of 25 at a background of 170 (headroom 85) (derived).
/// </summary>
public sealed class VeilRidgeTests
{
    private const int W = 320, H = 180;

    private static FrameWorkspace Workspace(PipelineOptions o) => StageFactory.CreateWorkspace(o, WorkingScale.For(W, H, 0));

    private static void RunColor(FrameWorkspace ws, PipelineOptions o, Mat frame)
    {
        ws.Frame = frame;
        List<IFrameStage> all = StageFactory.CreateStages(o, WorkingScale.For(W, H, 0), null);
        Assert.Equal("color", all[3].Name);
        for (int i = 0; i < 4; i++)
        {
            all[i].Process(ws);
        }

        foreach (IFrameStage s in all)
        {
            s.Dispose();
        }
    }

    /// <summary>
    /// A road of grey <paramref name="road"/> (with a deterministic texture of ±4) and, around a line through the preset
    /// vanishing point, a wide band of grey 238 (the sun's reflection on the road) holding a 6 px line of grey 243: a
    /// step of 5, which CLAHE with clip limit 2 (the mapping's slope at most about twice the identity's, Zuiderveld
    /// 1994) cannot lift to color.ridgeMinStep (14).
    /// </summary>
    private static Mat Scene(int road)
    {
        var frame = new Mat(H, W, MatType.CV_8UC3);
        for (int y = 0; y < H; y++)
        {
            for (int x = 0; x < W; x++)
            {
                byte v = (byte)(road - 4 + (((x * 7) + (y * 13)) % 9));
                frame.Set(y, x, new Vec3b(v, v, v));
            }
        }

        Point[] band = [new Point(10, 179), new Point(150, 90), new Point(170, 90), new Point(110, 179)];
        Cv2.FillConvexPoly(frame, band, Scalar.All(238));
        Cv2.Line(frame, new Point(60, 179), new Point(160, 90), Scalar.All(243), 6);  // through the preset point
        return frame;
    }

    private static int LinePixels(FrameWorkspace ws)
    {
        using Mat line = new Mat(ws.Color.Evidence, new Rect(60, 130, 70, 50));
        return Cv2.CountNonZero(line);
    }

    [Fact]
    public void Color_FaintLineInAStrongVeil_IsEvidence_OnlyWithTheHeadroomRidge()
    {
        var on = new PipelineOptions();
        var off = on with { Color = on.Color with { VeilRidgeMinStep = 255 } };
        using Mat frame = Scene(172);
        using FrameWorkspace wsOff = Workspace(off);
        RunColor(wsOff, off, frame);
        using FrameWorkspace wsOn = Workspace(on);
        RunColor(wsOn, on, frame);
        Assert.True(wsOn.Color.Veiled, "a road of grey 172 is veiled (color.claheMinVeilLightness 150)");
        int without = LinePixels(wsOff), with = LinePixels(wsOn);
        Assert.True(without < 20, $"without the headroom ridge {without} line pixels");
        Assert.True(with > 100, $"with the headroom ridge {with} line pixels");
    }

    [Fact]
    public void Color_HeadroomRidge_ChangesNothing_OnARoadThatIsNotVeiled()
    {
        // The same drawn band and line on a road of grey 120: not veiled, so the evidence is byte-identical either way.
        var on = new PipelineOptions();
        var off = on with { Color = on.Color with { VeilRidgeMinStep = 255 } };
        using Mat frame = Scene(120);
        using FrameWorkspace wsOff = Workspace(off);
        RunColor(wsOff, off, frame);
        using FrameWorkspace wsOn = Workspace(on);
        RunColor(wsOn, on, frame);
        Assert.False(wsOn.Color.Veiled);
        using Mat diff = new Mat();
        Cv2.Absdiff(wsOn.Color.Evidence, wsOff.Color.Evidence, diff);
        Assert.Equal(0, Cv2.CountNonZero(diff));
    }

    [Fact]
    public void Color_HeadroomRidge_KeepsTheStepFloor()
    {
        // A step of 3 grey levels (below color.veilRidgeMinStep 4) in the same veil is not evidence (common practice:
        // a floor against JPEG noise where the headroom threshold becomes tiny).
        var o = new PipelineOptions();
        using Mat frame = Scene(172);
        Cv2.Line(frame, new Point(60, 179), new Point(160, 90), Scalar.All(241), 6);
        using FrameWorkspace ws = Workspace(o);
        RunColor(ws, o, frame);
        Assert.True(LinePixels(ws) < 20, $"{LinePixels(ws)} line pixels for a step of 3");
    }
}
