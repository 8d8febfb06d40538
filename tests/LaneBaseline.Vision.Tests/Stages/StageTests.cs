using LaneBaseline.Core.Options;
using LaneBaseline.Core.Results;
using LaneBaseline.Vision.Pipeline;
using LaneBaseline.Vision.Stages;
using OpenCvSharp;
using Xunit;

namespace LaneBaseline.Vision.Tests.Stages;

/// <summary>Single-stage checks on small frames drawn here (T1: 320x180, milliseconds each).</summary>
public sealed class StageTests
{
    private const int W = 320, H = 180;

    // The workspace and stages are built by the pipeline's own factory, at the frame's size (no enlargement), so these
    // checks run exactly the stages detect runs, in its order.
    private static FrameWorkspace Workspace(PipelineOptions o) => StageFactory.CreateWorkspace(o, WorkingScale.For(W, H, 0));

    private static void RunUpTo(FrameWorkspace ws, PipelineOptions o, Mat frame, int stages)
    {
        ws.Frame = frame;
        List<IFrameStage> all = StageFactory.CreateStages(o, WorkingScale.For(W, H, 0), null);
        Assert.Equal(["gradient", "hough", "region", "color", "warp", "search"], all.Take(6).Select(s => s.Name));
        for (int i = 0; i < stages; i++)
        {
            all[i].Process(ws);
        }

        foreach (IFrameStage s in all)
        {
            s.Dispose();
        }
    }

    [Fact]
    public void Hough_BlankFrame_FindsNoSegments()
    {
        var o = new PipelineOptions();
        using FrameWorkspace ws = Workspace(o);
        using var frame = new Mat(H, W, MatType.CV_8UC3, new Scalar(80, 80, 80));
        RunUpTo(ws, o, frame, 2);
        Assert.Equal(0, ws.Hough.SegmentCount);
    }

    [Fact]
    public void Hough_DrawnLine_SegmentsLieOnIt()
    {
        // A 3 px white line from (60, 179) to (150, 70) on grey: every segment's midpoint must lie within 6 px of the
        // drawn line and its direction within 5 degrees of it. Canny finds the line's two borders 1.5 px either side,
        // the 5x5 blur widens them by about 1 px, the half-resolution Hough quantises to 2 px and its 1-degree
        // angle step lets a segment drift by up to another 1-2 px along its length (common practice).
        var o = new PipelineOptions();
        using FrameWorkspace ws = Workspace(o);
        using var frame = new Mat(H, W, MatType.CV_8UC3, new Scalar(80, 80, 80));
        Cv2.Line(frame, new Point(60, 179), new Point(150, 70), Scalar.All(230), 3);
        RunUpTo(ws, o, frame, 2);
        Assert.True(ws.Hough.SegmentCount >= 1);
        double dx = 90, dy = -109, len = Math.Sqrt((dx * dx) + (dy * dy));
        for (int i = 0; i < ws.Hough.SegmentCount; i++)
        {
            HoughSegment s = ws.Hough.Segments[i];
            double mx = (s.X1 + s.X2) / 2, my = (s.Y1 + s.Y2) / 2;
            double dist = Math.Abs((dy * (mx - 60)) - (dx * (my - 179))) / len;
            Assert.True(dist <= 6, $"segment midpoint ({mx}, {my}) is {dist:0.0} px off the line");
            double cos = Math.Abs((((s.X2 - s.X1) * dx) + ((s.Y2 - s.Y1) * dy)) / (s.Length * len));
            Assert.True(cos >= Math.Cos(5 * Math.PI / 180), "segment direction differs from the line");
        }
    }

    [Fact]
    public void Hough_HorizontalLine_IsFilteredByAngle()
    {
        // hough.minAngleDeg (10°) rejects horizontal clutter such as shadows across the road or the horizon.
        var o = new PipelineOptions();
        using FrameWorkspace ws = Workspace(o);
        using var frame = new Mat(H, W, MatType.CV_8UC3, new Scalar(80, 80, 80));
        Cv2.Line(frame, new Point(20, 120), new Point(300, 125), Scalar.All(230), 3);
        RunUpTo(ws, o, frame, 2);
        Assert.Equal(0, ws.Hough.SegmentCount);
    }

    [Fact]
    public void Region_WithoutLineEvidence_FallsBackToThePresetPoint()
    {
        var o = new PipelineOptions();
        using FrameWorkspace ws = Workspace(o);
        using var frame = new Mat(H, W, MatType.CV_8UC3, new Scalar(80, 80, 80));
        RunUpTo(ws, o, frame, 3);
        Assert.Equal(VanishingSource.Preset, ws.Region.VanishingSource);
        Assert.Equal(o.Region.DefaultHorizonFraction * H, ws.Region.VanishingY);
        Assert.Equal(o.Region.DefaultVanishingXFraction * W, ws.Region.VanishingX);
    }

    [Fact]
    public void Color_MarkingOutsideTheRegion_YieldsNoEvidence()
    {
        // A bright bar above the horizon (sky) and one below: only the one inside the region may give evidence.
        var o = new PipelineOptions();
        using FrameWorkspace ws = Workspace(o);
        using var frame = new Mat(H, W, MatType.CV_8UC3, new Scalar(80, 80, 80));
        Cv2.Line(frame, new Point(100, 10), new Point(110, 60), Scalar.All(230), 4);    // above the preset horizon (90)
        Cv2.Line(frame, new Point(100, 179), new Point(140, 120), Scalar.All(230), 5);  // on the road
        RunUpTo(ws, o, frame, 4);
        using Mat top = ws.Color.Evidence.RowRange(0, 90);
        using Mat bottom = ws.Color.Evidence.RowRange(120, 180);
        Assert.Equal(0, Cv2.CountNonZero(top));
        Assert.True(Cv2.CountNonZero(bottom) > 50);
    }

    [Fact]
    public void Color_WideBrightArea_IsNotAMarking()
    {
        // The ridge gate needs a darker road on both sides within two marking widths: a bright patch much wider
        // than a marking (a sunlit area, a white car roof) must not produce evidence in its interior.
        var o = new PipelineOptions();
        using FrameWorkspace ws = Workspace(o);
        using var frame = new Mat(H, W, MatType.CV_8UC3, new Scalar(80, 80, 80));
        Cv2.Rectangle(frame, new Rect(100, 130, 120, 50), Scalar.All(230), -1);
        RunUpTo(ws, o, frame, 4);
        using Mat inner = new Mat(ws.Color.Evidence, new Rect(130, 140, 60, 40));
        Assert.Equal(0, Cv2.CountNonZero(inner));
    }

    [Fact]
    public void Color_VerticalStreakAwayFromTheVanishingColumn_IsCleared_LineThroughTheVanishingPointIsKept()
    {
        // Road lines parallel to the vehicle image as lines through the vanishing point (projective geometry, Hartley &
        // Zisserman 2003, Sec. 8.6); a specular streak under a lamp on a wet road runs image-vertically. Its structure
        // tensor orientation (Bigün & Granlund 1987) is 90 degrees, the direction to the vanishing point from (250, 150)
        // is atan2(60, 90) = 33.7 degrees from the horizontal (56.3 from the vertical), beyond the 8 + 12 * 0.6 = 15.2
        // degree tolerance, so the streak is cleared; the line through the vanishing point is kept.
        var o = new PipelineOptions();
        using FrameWorkspace ws = Workspace(o);
        using var frame = new Mat(H, W, MatType.CV_8UC3, new Scalar(80, 80, 80));
        Cv2.Line(frame, new Point(60, 179), new Point(160, 90), Scalar.All(230), 4);  // through the preset point (160, 90)
        Cv2.Line(frame, new Point(250, 115), new Point(250, 179), Scalar.All(230), 4); // vertical streak
        RunUpTo(ws, o, frame, 4);
        Assert.Equal(160, ws.Region.VanishingX, 6);
        using (Mat streak = new Mat(ws.Color.Evidence, new Rect(240, 125, 21, 50)))
        using (Mat line = new Mat(ws.Color.Evidence, new Rect(60, 125, 100, 50)))
        {
            Assert.Equal(0, Cv2.CountNonZero(streak));
            Assert.True(Cv2.CountNonZero(line) > 50);
        }

        Assert.True(ws.Color.EvidenceKeptShare < 0.9);

        // With the test switched off the same streak is evidence: the check above is the orientation test's doing.
        var off = o with { Gradient = o.Gradient with { OrientationToleranceDeg = 90 } };
        using FrameWorkspace ws2 = Workspace(off);
        RunUpTo(ws2, off, frame, 4);
        using Mat streak2 = new Mat(ws2.Color.Evidence, new Rect(240, 125, 21, 50));
        Assert.True(Cv2.CountNonZero(streak2) > 50);
        Assert.Equal(1, ws2.Color.EvidenceKeptShare);
    }

    [Fact]
    public void Color_GreyWorld_RemovesASodiumCast_SoTheLitRoadIsNotYellow()
    {
        // Grey world (Buchsbaum, J. Franklin Inst. 310(1), 1980): the average reflectance of a scene is achromatic, so
        // per-channel gains grey / channel mean undo a colour cast. Road grey 80 under an orange cast (B x 0.25,
        // G x 0.7, R x 1.1; low-pressure sodium light is nearly monochromatic at 589 nm, from memory) is (20, 56, 88);
        // a lit patch of road grey 110 along the bottom rows, wider than any marking, is (28, 77, 121): min(R, G) - B = 49 >= 28 and lightness
        // 74.5 >= road 54 + 8, so without the gains it passes the yellow-paint test. The wedge mean of mostly road
        // gives gains near (54.7 / 20, 54.7 / 56, 54.7 / 88) = (2.73, 0.98, 0.62) (derived), which make both greys
        // achromatic again: no yellow evidence inside the patch.
        var o = new PipelineOptions();
        using FrameWorkspace ws = Workspace(o);
        using var frame = new Mat(H, W, MatType.CV_8UC3, new Scalar(20, 56, 88));
        Cv2.Rectangle(frame, new Rect(60, 168, 200, 12), new Scalar(28, 77, 121), -1);
        RunUpTo(ws, o, frame, 4);
        using (Mat inner = new Mat(ws.Color.Evidence, new Rect(100, 170, 120, 8)))
        {
            Assert.Equal(0, Cv2.CountNonZero(inner));
        }

        Assert.True(ws.Color.GreyWorldGains.B > 2.0 && ws.Color.GreyWorldGains.B < 3.2, $"blue gain {ws.Color.GreyWorldGains.B}");
        Assert.True(ws.Color.GreyWorldGains.R > 0.5 && ws.Color.GreyWorldGains.R < 0.75, $"red gain {ws.Color.GreyWorldGains.R}");

        // Without the gains the cast patch is "yellow paint": the check above is the grey world's doing.
        var off = o with { Color = o.Color with { GreyWorld = false } };
        using FrameWorkspace ws2 = Workspace(off);
        RunUpTo(ws2, off, frame, 4);
        using Mat inner2 = new Mat(ws2.Color.Evidence, new Rect(100, 170, 120, 8));
        Assert.True(Cv2.CountNonZero(inner2) > 400);
        Assert.Equal((1.0, 1.0, 1.0), ws2.Color.GreyWorldGains);
    }

    [Fact]
    public void Color_Clahe_InADarkScene_RecoversFaintPaintThePlainRidgeMisses()
    {
        // CLAHE (Zuiderveld, "Contrast Limited Adaptive Histogram Equalization", Graphics Gems IV, 1994) maps each tile
        // through its clipped cumulative histogram, so the slope of the mapping over a densely used grey range (a
        // textured road) approaches the clip limit + 1 while a sparse range keeps a slope near 1 (derived). A dark road
        // (grey 26-34, a deterministic texture) with paint at 42, a step of 12 below gradient.ridgeMinStep (14), gives no
        // ridge on the plain band; equalised, the road's 8 levels spread over about 20 and the step exceeds 14.
        var o = new PipelineOptions();
        using var frame = new Mat(H, W, MatType.CV_8UC3);
        for (int y = 0; y < H; y++)
        {
            for (int x = 0; x < W; x++)
            {
                byte v = (byte)(26 + (((x * 7) + (y * 13)) % 9));
                frame.Set(y, x, new Vec3b(v, v, v));
            }
        }

        Cv2.Line(frame, new Point(60, 179), new Point(160, 90), Scalar.All(42), 6);  // through the preset point
        var off = o with { Color = o.Color with { ClaheMaxRoadLightness = 0, ClaheMinVeilLightness = 255 } };
        using FrameWorkspace plain = Workspace(off);
        RunUpTo(plain, off, frame, 4);
        using FrameWorkspace equalised = Workspace(o);
        RunUpTo(equalised, o, frame, 4);
        Assert.False(plain.Color.Equalised);
        Assert.True(equalised.Color.Equalised);
        using Mat linePlain = new Mat(plain.Color.Evidence, new Rect(60, 130, 70, 50));
        using Mat lineEq = new Mat(equalised.Color.Evidence, new Rect(60, 130, 70, 50));
        Assert.True(Cv2.CountNonZero(linePlain) < 20, $"plain ridge found {Cv2.CountNonZero(linePlain)} pixels");
        Assert.True(Cv2.CountNonZero(lineEq) > 100, $"equalised ridge found {Cv2.CountNonZero(lineEq)} pixels");

        // A road of ordinary lightness (grey 100-108) is neither dark nor veiled: no equalisation.
        using var day = new Mat(H, W, MatType.CV_8UC3, Scalar.All(104));
        using FrameWorkspace dayWs = Workspace(o);
        RunUpTo(dayWs, o, day, 4);
        Assert.False(dayWs.Color.Equalised);
    }

    [Fact]
    public void Color_StreakStraightBelowALamp_IsCleared_InADarkScene()
    {
        // A flat wet road is a horizontal mirror: by the law of reflection the mirror image of a light lies on the
        // vertical through the light in a camera without roll (derived), smeared into a streak by the road's roughness.
        // A lamp (grey 255) above the horizon at column 250 and a streak of grey 200 below it: the streak is cleared; a
        // line through the vanishing point is kept. The orientation test is off so the mirror test alone is checked.
        var o = new PipelineOptions();
        o = o with { Gradient = o.Gradient with { OrientationToleranceDeg = 90 } };
        using var frame = new Mat(H, W, MatType.CV_8UC3, Scalar.All(30));
        Cv2.Rectangle(frame, new Rect(0, 0, W, 90), Scalar.All(15), -1);                 // night sky
        Cv2.Circle(frame, new Point(250, 50), 3, Scalar.All(255), -1);                    // street lamp
        Cv2.Line(frame, new Point(250, 115), new Point(250, 179), Scalar.All(200), 4);   // its reflection
        Cv2.Line(frame, new Point(60, 179), new Point(160, 90), Scalar.All(200), 4);     // a lane line
        using FrameWorkspace ws = Workspace(o);
        RunUpTo(ws, o, frame, 4);
        Assert.Equal(160, ws.Region.VanishingX, 6);
        using (Mat streak = new Mat(ws.Color.Evidence, new Rect(240, 125, 21, 50)))
        using (Mat line = new Mat(ws.Color.Evidence, new Rect(60, 125, 100, 50)))
        {
            Assert.Equal(0, Cv2.CountNonZero(streak));
            Assert.True(Cv2.CountNonZero(line) > 50);
        }

        // With the test off (lightSourceLightness 255) the same streak is evidence.
        var off = o with { Color = o.Color with { LightSourceLightness = 255 } };
        using FrameWorkspace ws2 = Workspace(off);
        RunUpTo(ws2, off, frame, 4);
        using Mat streak2 = new Mat(ws2.Color.Evidence, new Rect(240, 125, 21, 50));
        Assert.True(Cv2.CountNonZero(streak2) > 50);
    }

    [Fact]
    public void Warp_MapsRoadLinesThroughTheVanishingPointToColumns()
    {
        // Lines through the vanishing point are images of road lines parallel to the vehicle; the warp must make them
        // vertical: the bird's-eye x of two points of such a line agree (projective geometry, Hartley & Zisserman 2.3).
        var o = new PipelineOptions();
        using FrameWorkspace ws = Workspace(o);
        using var frame = new Mat(H, W, MatType.CV_8UC3, new Scalar(80, 80, 80));
        RunUpTo(ws, o, frame, 3);
        double vx = ws.Region.VanishingX, vy = ws.Region.VanishingY;
        foreach (double bottomX in new[] { -100.0, 40, 160, 300, 500 })
        {
            double x1 = bottomX, y1 = H - 1;
            double x2 = vx + ((x1 - vx) * 0.3), y2 = vy + ((y1 - vy) * 0.3);
            Assert.True(ws.Region.ImageToBirdsEye.TryMap(x1, y1, out double u1, out _));
            Assert.True(ws.Region.ImageToBirdsEye.TryMap(x2, y2, out double u2, out _));
            Assert.Equal(u1, u2, 6);
        }
    }
}
