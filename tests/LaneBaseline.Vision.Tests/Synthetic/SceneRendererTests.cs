using LaneBaseline.Core.Geometry;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Vision.Synthetic;
using OpenCvSharp;
using Xunit;

namespace LaneBaseline.Vision.Tests.Synthetic;

public sealed class SceneRendererTests
{
    private static byte[] Bytes(Mat m)
    {
        m.GetArray(out Vec3b[] px);
        var bytes = new byte[px.Length * 3];
        for (int i = 0; i < px.Length; i++)
        {
            bytes[3 * i] = px[i].Item0;
            bytes[(3 * i) + 1] = px[i].Item1;
            bytes[(3 * i) + 2] = px[i].Item2;
        }

        return bytes;
    }

    [Fact]
    public void Truth_PointsAreInsideTheFrameNearToFar()
    {
        // Source: docs/lane-file.md: points ordered near to far (y decreasing), at least two, inside the frame.
        CameraModel cam = SceneFixtures.Camera();
        using var renderer = new SceneRenderer(cam);
        using var frame = new Mat();
        for (int i = 0; i < 6; i++)
        {
            SceneSpec scene = SceneSpec.Create(99, i, [], 3, 10);
            RenderedFrame truth = renderer.Render(scene, 2, frame);
            Assert.NotEmpty(truth.Lanes);
            Assert.Contains(truth.Lanes, l => l.Slot == -1);
            Assert.Contains(truth.Lanes, l => l.Slot == 1);
            foreach (Lane lane in truth.Lanes)
            {
                Assert.True(lane.Points.Count >= 2);
                Assert.True(LaneKinds.IsValid(lane.Kind!));
                for (int k = 0; k < lane.Points.Count; k++)
                {
                    LanePoint p = lane.Points[k];
                    Assert.InRange(p.X, 0, cam.ImageWidth - 1);
                    Assert.InRange(p.Y, 0, cam.ImageHeight - 1);
                    if (k > 0)
                    {
                        Assert.True(p.Y < lane.Points[k - 1].Y, "y must decrease from near to far");
                    }
                }
            }
        }
    }

    [Theory]
    [InlineData(false)]
    [InlineData(true)]
    public void Truth_SolidLinesLieOnBrightPaint_InCleanDayFrames(bool distortedTiltedCamera)
    {
        // Source: common practice (issue 3 acceptance): mean brightness on the truth polyline exceeds that at
        // ±1 m lateral offsets (mapped through the camera) by a clear margin, for solid markings on day frames;
        // also through a camera with barrel distortion, yaw and roll.
        CameraModel cam = distortedTiltedCamera
            ? SceneFixtures.Camera() with { PitchDeg = 3, YawDeg = 2, RollDeg = 1.5, K1 = -0.25, K2 = 0.03, Fx = 380, Fy = 380 }
            : SceneFixtures.Camera();
        using var renderer = new SceneRenderer(cam);
        using var frame = new Mat();
        using var grey = new Mat();
        int checkedLanes = 0;
        for (int i = 0; i < 5; i++)
        {
            SceneSpec scene = SceneSpec.Create(4242, i, [], 1, 10);
            RenderedFrame truth = renderer.Render(scene, 0, frame);
            Cv2.CvtColor(frame, grey, ColorConversionCodes.BGR2GRAY);
            foreach (Lane lane in truth.Lanes.Where(l => l.Kind == LaneKinds.Solid))
            {
                double on = 0, off = 0;
                int n = 0;
                foreach (LanePoint p in lane.Points)
                {
                    (double gx, double gy) = cam.ImageToGround(p.X, p.Y);
                    if (gx > 40)
                    {
                        continue; // keep to where a 0.1 m line is several pixels wide
                    }

                    (double lu, double lv) = cam.ProjectGroundToImage(gx, gy + 1);
                    (double ru, double rv) = cam.ProjectGroundToImage(gx, gy - 1);
                    if (!Inside(cam, lu, lv) || !Inside(cam, ru, rv))
                    {
                        continue;
                    }

                    on += Sample(grey, p.X, p.Y);
                    off += (Sample(grey, lu, lv) + Sample(grey, ru, rv)) / 2;
                    n++;
                }

                if (n >= 3)
                {
                    checkedLanes++;
                    Assert.True(on / n > (off / n) + 40, $"scene {i} slot {lane.Slot}: on-line {on / n:0.0} vs off-line {off / n:0.0}");
                }
            }
        }

        Assert.True(checkedLanes >= 5, "expected several solid lines to check");
    }

    [Theory]
    [InlineData("us", 3.6576, 0.1524)] // Source: AASHTO 12 ft Interstate lanes; MUTCD 2009 3A.06 6 in line
    [InlineData("uk", 3.65, 0.10)]     // Source: DMRB TD 27/96 3.65 m; UK TSM ch. 5 Table 4-2 100 mm line
    [InlineData("eu", 2.75, 0.20)]     // Source: urban minimum ~2.75 m (FHWA lane width note); Vienna Convention lines ≥ 0.10 m
    public void Truth_MappedToGround_KeepsLaneWidth(string standardName, double laneWidth, double lineWidth)
    {
        MarkingStandard standard = KnownMarkingStandards.All.Single(s => s.Name == standardName);
        CameraModel cam = SceneFixtures.Camera();
        using var renderer = new SceneRenderer(cam);
        using var frame = new Mat();
        RenderedFrame truth = renderer.Render(SceneFixtures.Straight(standard, laneWidth, lineWidth), 0, frame);
        Lane left = truth.Lanes.Single(l => l.Slot == -1), right = truth.Lanes.Single(l => l.Slot == 1);
        int compared = 0;
        foreach (LanePoint p in left.Points)
        {
            (double gx, double gy) = cam.ImageToGround(p.X, p.Y);
            if (gx > 60)
            {
                continue;
            }

            // The right line at the same image row, interpolated.
            double? ru = InterpolateX(right, p.Y);
            if (ru is null)
            {
                continue;
            }

            (double rx, double ry) = cam.ImageToGround(ru.Value, p.Y);
            Assert.Equal(gx, rx, 6);
            Assert.Equal(laneWidth, gy - ry, 0.005); // within 5 mm
            Assert.Equal(laneWidth / 2, gy, 0.005);  // ego centred
            compared++;
        }

        Assert.True(compared >= 10);
    }

    [Theory]
    [InlineData("us", 0.1524)] // Source: MUTCD 2009, Sec. 3A.06: 4–6 in lines
    [InlineData("uk", 0.10)]   // Source: UK Traffic Signs Manual ch. 5 (2009), Table 4-2: 100 mm
    [InlineData("eu", 0.15)]   // Source: Vienna Convention (1968), Annex 2: at least 0.10 m
    public void Paint_HasTheRequestedWidthOnTheGround(string standardName, double lineWidth)
    {
        MarkingStandard standard = KnownMarkingStandards.All.Single(s => s.Name == standardName);
        CameraModel cam = SceneFixtures.Camera(1280, 720);
        using var renderer = new SceneRenderer(cam);
        using var frame = new Mat();
        renderer.Render(SceneFixtures.Straight(standard, 3.5, lineWidth), 0, frame);
        // The right edge line (solid white) crossed by image rows near the bottom: coverage summed across the
        // line, times the ground width of one pixel on that row, is the painted width.
        Mat cov = renderer.WhiteCoverage;
        foreach (double gx in new[] { 10.0, 15, 22 })
        {
            (double eu, double ev) = cam.ProjectGroundToImage(gx, -3.5 * 1.5);
            int v = (int)Math.Round(ev);
            double sum = 0;
            for (int u = (int)eu - 40; u <= (int)eu + 40; u++)
            {
                sum += cov.At<byte>(v, u) / 255.0;
            }

            (_, double y0) = cam.ImageToGround(eu, v);
            (_, double y1) = cam.ImageToGround(eu + 1, v);
            double metres = sum * Math.Abs(y1 - y0);
            Assert.Equal(lineWidth, metres, 0.01); // within 1 cm
        }
    }

    [Theory]
    [InlineData("us", 3.048, 9.144)] // Source: MUTCD 2003, Sec. 3A.05: 10 ft segments, 30 ft gaps
    [InlineData("uk", 2.0, 7.0)]     // Source: UK Traffic Signs Manual ch. 5 (2009), Table 4-2: 2 m mark, 7 m gap
    [InlineData("eu", 3.0, 9.0)]     // Source: Vienna Convention (1968), Annex 2: strokes 2–10 m (3 m / 9 m chosen)
    public void DashedLine_HasTheStandardStrokeAndGapOnTheGround(string standardName, double dash, double gap)
    {
        MarkingStandard standard = KnownMarkingStandards.All.Single(s => s.Name == standardName);
        CameraModel cam = SceneFixtures.Camera(2560, 1440);
        using var renderer = new SceneRenderer(cam);
        using var frame = new Mat();
        SceneSpec scene = SceneFixtures.Straight(standard, 3.5, 0.15);
        RenderedFrame truth = renderer.Render(scene, 0, frame);
        Assert.Equal(LaneKinds.Dashed, truth.Lanes.Single(l => l.Slot == 1).Kind);
        // Walk the ground along the right ego boundary (Y = -1.75 m) and read the paint coverage.
        Mat cov = renderer.WhiteCoverage;
        var runs = new List<(bool Paint, double Length)>();
        bool? state = null;
        double start = 0;
        const double FarM = 32;
        for (double x = 4; x <= FarM; x += 0.005)
        {
            (double u, double v) = cam.ProjectGroundToImage(x, -1.75);
            bool paint = Bilinear(cov, u, v) > 127.5;
            if (state != paint)
            {
                if (state is bool s)
                {
                    runs.Add((s, x - start));
                }

                state = paint;
                start = x;
            }
        }

        List<(bool Paint, double Length)> inner = runs.Skip(1).ToList(); // the first run may be cut at 4 m
        Assert.Contains(inner, r => r.Paint);
        Assert.Contains(inner, r => !r.Paint);
        // One image row spans X² / (f·h) metres of road (0.34 m at 32 m here); the anti-aliased edge is located to
        // well under a third of a row, so the tolerance is 0.03 m plus a third of a row at the far end.
        double tolerance = 0.03 + (FarM * FarM / (cam.Fy * cam.MountHeightM) / 3);
        foreach ((bool paintRun, double length) in inner)
        {
            Assert.Equal(paintRun ? dash : gap, length, tolerance);
        }
    }

    [Fact]
    public void Render_SameSceneTwice_IsByteIdentical_AndIndependentOfHistory()
    {
        // Source: common practice (determinism rule: same seed, same bytes, whatever renders first).
        CameraModel cam = SceneFixtures.Camera(320, 180);
        IReadOnlyList<RenderCondition> all = KnownConditions.All.Select(c => new RenderCondition(c, 0.7)).ToList();
        SceneSpec a = SceneSpec.Create(5, 3, all, 4, 10);
        SceneSpec b = SceneSpec.Create(5, 3, all, 4, 10);
        using var r1 = new SceneRenderer(cam);
        using var r2 = new SceneRenderer(cam);
        using var f1 = new Mat();
        using var f2 = new Mat();
        for (int i = 0; i < 3; i++)
        {
            r1.Render(a, i, f1);
        }

        RenderedFrame t1 = r1.Render(a, 3, f1);
        RenderedFrame t2 = r2.Render(b, 3, f2);
        Assert.Equal(Bytes(f1), Bytes(f2));
        Assert.Equal(
            string.Join("\n", t1.Lanes.Select(l => string.Join(";", l.Points))),
            string.Join("\n", t2.Lanes.Select(l => string.Join(";", l.Points))));
        Assert.Equal(t1.Tags, t2.Tags);
    }

    [Theory]
    [InlineData("shadows")]
    [InlineData("traffic")]
    [InlineData("night")]
    [InlineData("rain")]
    [InlineData("glare")]
    [InlineData("worn-paint")]
    [InlineData("cracks")]
    [InlineData("noise")]
    [InlineData("blur")]
    [InlineData("jpeg")]
    [InlineData("wet-night")]
    [InlineData("sodium-dusk")]
    [InlineData("low-sun")]
    [InlineData("heavy-wear")]
    public void Condition_AtSeverityZero_IsTheCleanFrame_AndChangesItAtOne(string condition)
    {
        // Source: common practice (a sweep's severity 0 must be the clean baseline for its scenes).
        CameraModel cam = SceneFixtures.Camera(320, 180);
        using var renderer = new SceneRenderer(cam);
        using var clean = new Mat();
        using var zero = new Mat();
        using var full = new Mat();
        renderer.Render(SceneSpec.Create(77, 1, [], 1, 10), 0, clean);
        renderer.Render(SceneSpec.Create(77, 1, [new RenderCondition(condition, 0)], 1, 10), 0, zero);
        RenderedFrame t = renderer.Render(SceneSpec.Create(77, 1, [new RenderCondition(condition, 1)], 1, 10), 0, full);
        Assert.Equal(Bytes(clean), Bytes(zero));
        Assert.NotEqual(Bytes(clean), Bytes(full));
        Assert.Contains(condition, t.Tags);
    }

    [Fact]
    public void Truth_DoesNotDependOnAppearanceConditions()
    {
        // Source: common practice (annotators draw lanes through occluders, shadows and darkness alike).
        CameraModel cam = SceneFixtures.Camera(320, 180);
        using var renderer = new SceneRenderer(cam);
        using var frame = new Mat();
        string clean = Describe(renderer.Render(SceneSpec.Create(8, 2, [], 1, 10), 0, frame));
        IReadOnlyList<RenderCondition> all = KnownConditions.Every.Select(c => new RenderCondition(c, 1)).ToList();
        Assert.Equal(clean, Describe(renderer.Render(SceneSpec.Create(8, 2, all, 1, 10), 0, frame)));
    }

    [Fact]
    public void SodiumDusk_TurnsTheRoadOrange()
    {
        // Source: from memory — low-pressure sodium lamps emit almost only near 589 nm (the sodium D lines), which an
        // RGB camera records mostly in red, partly in green and hardly in blue: road pixels must have B well below R.
        CameraModel cam = SceneFixtures.Camera(320, 180);
        using var renderer = new SceneRenderer(cam);
        using var clean = new Mat();
        using var dusk = new Mat();
        renderer.Render(SceneSpec.Create(5, 0, [], 1, 10), 0, clean);
        renderer.Render(SceneSpec.Create(5, 0, [new RenderCondition(KnownConditions.SodiumDusk, 1)], 1, 10), 0, dusk);
        using Mat roadClean = new Mat(clean, new Rect(110, 150, 100, 30));
        using Mat roadDusk = new Mat(dusk, new Rect(110, 150, 100, 30));
        Scalar c = Cv2.Mean(roadClean), d = Cv2.Mean(roadDusk);
        Assert.True(c.Val0 > 0.8 * c.Val2, $"clean road is grey: B {c.Val0:F1}, R {c.Val2:F1}");
        Assert.True(d.Val0 < 0.4 * d.Val2, $"sodium road is orange: B {d.Val0:F1}, R {d.Val2:F1}");
    }

    [Fact]
    public void OptInConditions_AreNotInTheDefaultMix()
    {
        // Source: common practice (new test conditions must not change an existing data set's frames).
        Assert.Equal(10, KnownConditions.All.Count);
        Assert.Empty(KnownConditions.All.Intersect(KnownConditions.OptIn));
        Assert.All(KnownConditions.OptIn, c => Assert.True(KnownConditions.IsKnown(c)));
    }

    [Fact]
    public void Sequence_WithLaneChange_ShiftsTheEgoSlots()
    {
        // Source: common practice (after a lane change the ego boundaries are a lane further over).
        SceneSpec scene = SceneFixtures.Straight(KnownMarkingStandards.Europe, 3.5, 0.15) with
        {
            LaneChangeDirection = -1,
            LaneChangeStartS = 0.2,
            LaneChangeDurationS = 3,
        };
        CameraModel cam = SceneFixtures.Camera(320, 180);
        using var renderer = new SceneRenderer(cam);
        using var frame = new Mat();
        RenderedFrame before = renderer.Render(scene, 0, frame);
        RenderedFrame after = renderer.Render(scene, 40, frame);
        // Before: boundaries 0..3 with the ego in lane 1 -> slots -2, -1, 1, 2. After moving right: -3, -2, -1, 1.
        Assert.Equal([-2, -1, 1, 2], before.Lanes.Select(l => l.Slot!.Value).ToArray());
        Assert.Equal([-3, -2, -1, 1], after.Lanes.Select(l => l.Slot!.Value).ToArray());
        Assert.Contains("lane-change", renderer.Render(scene, 17, frame).Tags);
    }

    [Fact]
    public void Dispose_ReleasesEveryOwnedMat()
    {
        // Source: DEVELOPERS.md, conventions (whoever creates a Mat disposes it).
        using var frame = new Mat();
        Mat white, yellow;
        using (var renderer = new SceneRenderer(SceneFixtures.Camera(160, 90)))
        {
            renderer.Render(SceneSpec.Create(1, 0, [new RenderCondition(KnownConditions.Night, 1)], 1, 10), 0, frame);
            white = renderer.WhiteCoverage;
            yellow = renderer.YellowCoverage;
            Assert.False(white.IsDisposed);
        }

        Assert.True(white.IsDisposed);
        Assert.True(yellow.IsDisposed);
    }

    private static string Describe(RenderedFrame f) =>
        string.Join("\n", f.Lanes.Select(l => $"{l.Slot} {l.Kind} {string.Join(";", l.Points)}"));

    private static bool Inside(CameraModel cam, double u, double v) => u >= 0 && v >= 0 && u <= cam.ImageWidth - 1 && v <= cam.ImageHeight - 1;

    private static double Sample(Mat grey, double u, double v) => grey.At<byte>((int)Math.Round(v), (int)Math.Round(u));

    private static double Bilinear(Mat m, double u, double v)
    {
        int x0 = (int)Math.Floor(u), y0 = (int)Math.Floor(v);
        double fx = u - x0, fy = v - y0;
        return (m.At<byte>(y0, x0) * (1 - fx) * (1 - fy)) + (m.At<byte>(y0, x0 + 1) * fx * (1 - fy)) +
            (m.At<byte>(y0 + 1, x0) * (1 - fx) * fy) + (m.At<byte>(y0 + 1, x0 + 1) * fx * fy);
    }

    private static double? InterpolateX(Lane lane, double y)
    {
        for (int i = 1; i < lane.Points.Count; i++)
        {
            LanePoint a = lane.Points[i - 1], b = lane.Points[i];
            if (y <= a.Y && y >= b.Y)
            {
                double f = (a.Y - y) / (a.Y - b.Y);
                return a.X + ((b.X - a.X) * f);
            }
        }

        return null;
    }
}
