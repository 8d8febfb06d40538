using System.Globalization;
using LaneBaseline.Core.Geometry;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Random;
using OpenCvSharp;

namespace LaneBaseline.Vision.Synthetic;

/// <summary>
/// Renders road scenes described by a <see cref="SceneSpec"/> through a <see cref="CameraModel"/>, together with
/// their exact ground truth. One instance per thread; it owns and reuses its buffers across frames.
/// </summary>
/// <remarks>
/// <para>Every surface is a polygon on the ground (or a box in 3D) in world coordinates, moved into the vehicle
/// frame (X forward, Y left, Z up, metres) and projected through the camera, distortion included, then filled with
/// anti-aliased <c>Cv2.FillPoly</c>, far to near. Paint is drawn into coverage masks and composited, so the truth
/// (the projected centreline of the same paint strips) lies on the painted pixels by construction.</para>
/// <para>Pixels: (x, y) = (column, row), origin top-left, y down. Randomness comes only from
/// <see cref="SplitMix64"/> streams keyed by the scene seed, an object's position along the road and the frame
/// index, so a frame does not depend on which thread renders it or on which frames were rendered before.</para>
/// </remarks>
public sealed partial class SceneRenderer : IDisposable
{
    /// <summary>Polygons are clipped at this forward distance (metres) before projection.</summary>
    private const double NearClipM = 0.8;

    /// <summary>How far ahead the road surface is drawn, metres.</summary>
    private const double RoadRangeM = 1500;

    /// <summary>Fixed-point bits for sub-pixel polygon vertices.</summary>
    private const int Shift = 3;

    /// <summary>Visibility distance of the clear-weather haze, metres.</summary>
    private const double ClearVisibilityM = 900;

    private readonly CameraModel camera;

    private readonly GroundProjection projection;

    private readonly int width, height;

    private readonly Mat whiteCoverage = new Mat();

    private readonly Mat yellowCoverage = new Mat();

    private readonly Mat whiteFine = new Mat();

    private readonly Mat yellowFine = new Mat();

    private readonly int paintScale;

    private readonly Mat shadowMask = new Mat();

    private readonly Mat lightMask = new Mat();

    private readonly Mat glow = new Mat();

    private readonly float[] groundDistanceM;

    private readonly float[] headlightGain;

    private readonly float[] grainAmplitude;

    private readonly float[] clearHaze;

    private readonly Mat lightSmall = new Mat();

    private readonly Mat glareSmall = new Mat();

    private readonly Mat glareField = new Mat();

    private readonly int firstGroundRow;

    private readonly double[] horizonAt;

    private readonly byte[] noise;

    private readonly List<(double X, double Y)> groundPoly = new(512);

    private readonly List<(double X, double Y)> clipped = new(512);

    private readonly List<Point> imagePoly = new(1024);

    private readonly List<(double U, double V)> dense = new(1024);

    private readonly List<(double U, double V)> run = new(1024);

    private SceneSpec? cachedScene;

    private RoadCentreline? road;

    private SceneLook look;

    /// <summary>Creates a renderer for one camera; the frame size is the camera's image size.</summary>
    public SceneRenderer(CameraModel camera)
    {
        ArgumentNullException.ThrowIfNull(camera);
        this.camera = camera;
        projection = camera.ToProjection();
        width = camera.ImageWidth;
        height = camera.ImageHeight;
        whiteCoverage.Create(height, width, MatType.CV_8UC1);
        yellowCoverage.Create(height, width, MatType.CV_8UC1);
        paintScale = width <= 1920 ? 4 : 2;
        shadowMask.Create(height, width, MatType.CV_8UC1);
        lightMask.Create(height, width, MatType.CV_8UC1);
        glow.Create(height, width, MatType.CV_8UC3);
        groundDistanceM = new float[width * height];
        headlightGain = new float[width * height];
        grainAmplitude = new float[width * height];
        clearHaze = new float[width * height];
        firstGroundRow = height;
        noise = new byte[width * height];
        HorizonRow = camera.HorizonRowAtCentre();
        horizonAt = TraceHorizon();
        lightSmall.Create((height + 7) / 8, (width + 7) / 8, MatType.CV_8UC1);
        glareSmall.Create((height + 3) / 4, (width + 3) / 4, MatType.CV_32FC1);
        glareField.Create(height, width, MatType.CV_32FC1);
        for (int y = 0; y < height; y++)
        {
            for (int x = 0; x < width; x++)
            {
                int i = (y * width) + x;
                if (projection.TryImageToGround(x, y, out double gx, out double gy) && gx > 0)
                {
                    groundDistanceM[i] = (float)gx;
                    firstGroundRow = Math.Min(firstGroundRow, y);
                    grainAmplitude[i] = (float)((7 * Math.Exp(-gx / 35.0)) + 1.5);
                    clearHaze[i] = (float)(1 - Math.Exp(-Math.Min(gx, 350) / ClearVisibilityM));
                    // Low-beam pattern (common practice, shape only): bright from ~8 m, fading beyond ~45 m,
                    // a cone widening with distance.
                    double lateral = gy / ((0.32 * gx) + 1.2);
                    double along = Math.Min(1, gx / 8) * Math.Min(1, (45 / gx) * (45 / gx));
                    headlightGain[i] = (float)(along * Math.Exp(-lateral * lateral));
                }
                else
                {
                    groundDistanceM[i] = -1;
                }
            }
        }

        whiteFine.Create(PaintRows * paintScale, width * paintScale, MatType.CV_8UC1);
        yellowFine.Create(PaintRows * paintScale, width * paintScale, MatType.CV_8UC1);
    }

    /// <summary>
    /// The horizon row at every column (it tilts with roll and bends with distortion): the image of ground points
    /// 10 km away, traced over ±85° of bearing and interpolated per column.
    /// </summary>
    private double[] TraceHorizon()
    {
        var us = new List<double>();
        var vs = new List<double>();
        for (double a = -85; a <= 85; a += 0.25)
        {
            double r = a * Math.PI / 180;
            if (projection.TryProjectGround(1e4 * Math.Cos(r), 1e4 * Math.Sin(r), out double u, out double v))
            {
                us.Add(u);
                vs.Add(v);
            }
        }

        var rows = new double[width];
        for (int x = 0; x < width; x++)
        {
            rows[x] = HorizonRow;
            double best = double.MaxValue;
            for (int k = 1; k < us.Count; k++)
            {
                double u0 = us[k - 1], u1 = us[k];
                if ((x - u0) * (x - u1) <= 0 && u0 != u1)
                {
                    rows[x] = vs[k - 1] + ((vs[k] - vs[k - 1]) * (x - u0) / (u1 - u0));
                    break;
                }

                double d = Math.Min(Math.Abs(x - u0), Math.Abs(x - u1));
                if (d < best)
                {
                    best = d;
                    rows[x] = Math.Abs(x - u0) < Math.Abs(x - u1) ? vs[k - 1] : vs[k];
                }
            }
        }

        return rows;
    }

    /// <summary>Rows of the frame that can show paint (from the first ground row down).</summary>
    private int PaintRows => height - PaintTop;

    private int PaintTop => Math.Min(firstGroundRow, height - 1);

    /// <summary>Image row of the horizon at the principal column.</summary>
    public double HorizonRow { get; }

    /// <summary>How far ahead paint and truth reach, metres (default 150).</summary>
    public double MaxRangeM { get; init; } = 150;

    /// <summary>Truth points are spaced about this many pixels apart along the projected line (default 10).</summary>
    public double TruthSpacingPx { get; init; } = 10;

    /// <summary>White-paint coverage of the last frame (0–255); a loan valid until the next call.</summary>
    internal Mat WhiteCoverage => whiteCoverage;

    /// <summary>Yellow-paint coverage of the last frame (0–255); a loan valid until the next call.</summary>
    internal Mat YellowCoverage => yellowCoverage;

    /// <summary>
    /// Renders frame <paramref name="frameIndex"/> of <paramref name="scene"/> into <paramref name="output"/>
    /// (reallocated to the camera size, 8-bit BGR) and returns its ground truth.
    /// </summary>
    public RenderedFrame Render(SceneSpec scene, int frameIndex, Mat output)
    {
        ArgumentNullException.ThrowIfNull(scene);
        ArgumentNullException.ThrowIfNull(output);
        if (!ReferenceEquals(scene, cachedScene))
        {
            road = new RoadCentreline(scene.Pieces);
            look = SceneLook.From(scene);
            cachedScene = scene;
        }

        RoadCentreline r = road!;
        double t = scene.TimeOf(frameIndex);
        (double sV, double lateral, double relHeading) = scene.EgoPose(t);
        (double ex, double ey) = r.Offset(sV, lateral);
        var pose = new VehiclePose(ex, ey, r.Evaluate(sV).Heading + relHeading);
        var ctx = new FrameContext(scene, r, pose, sV, frameIndex, t);

        output.Create(height, width, MatType.CV_8UC3);
        DrawBackground(ctx, output);
        DrawRoadSurface(ctx, output);
        DrawPaint(ctx);
        PlaceTraffic(ctx, lateral);
        DrawShadows(ctx);
        Compose(ctx, output);
        DrawTraffic(ctx, output);
        ApplyNight(ctx, output);
        ApplyWetNight(ctx, output);
        ApplySodiumDusk(ctx, output);
        ApplyRain(ctx, output);
        ApplyGlare(ctx, output);
        ApplyLowSun(ctx, output);
        ApplyBlur(ctx, output);
        ApplyNoise(ctx, output);
        ApplyJpeg(ctx, output);

        List<Lane> lanes = BuildTruth(ctx, lateral);
        return new RenderedFrame(lanes, BuildTags(ctx));
    }

    /// <inheritdoc />
    public void Dispose()
    {
        whiteCoverage.Dispose();
        yellowCoverage.Dispose();
        whiteFine.Dispose();
        yellowFine.Dispose();
        shadowMask.Dispose();
        lightMask.Dispose();
        glow.Dispose();
        lightSmall.Dispose();
        glareSmall.Dispose();
        glareField.Dispose();
    }

    private readonly record struct FrameContext(SceneSpec Scene, RoadCentreline Road, VehiclePose Pose, double SV, int FrameIndex, double TimeS);

    private static double StepAt(double distanceAheadM) => Math.Clamp(0.02 * Math.Abs(distanceAheadM), 0.25, 5);

    /// <summary>Fills the ground polygon in <see cref="groundPoly"/> (vehicle frame) on <paramref name="target"/>.</summary>
    private void FillGroundPolygon(Mat target, Scalar colour)
    {
        ClipNear(groundPoly, clipped);
        if (clipped.Count < 3)
        {
            return;
        }

        imagePoly.Clear();
        for (int i = 0; i < clipped.Count; i++)
        {
            (double x0, double y0) = clipped[i];
            (double x1, double y1) = clipped[(i + 1) % clipped.Count];
            double len = Math.Sqrt(((x1 - x0) * (x1 - x0)) + ((y1 - y0) * (y1 - y0)));
            double step = Math.Max(0.5, 0.1 * Math.Min(x0, x1));
            int n = Math.Clamp((int)Math.Ceiling(len / step), 1, 400);
            for (int k = 0; k < n; k++)
            {
                double f = (double)k / n;
                AddImagePoint(x0 + ((x1 - x0) * f), y0 + ((y1 - y0) * f), 0);
            }
        }

        FillImagePolygon(target, colour);
    }

    private void AddImagePoint(double x, double y, double z)
    {
        if (projection.TryProject(x, y, z, out double u, out double v))
        {
            imagePoly.Add(new Point(ToFixed(u), ToFixed(v)));
        }
    }

    private static int ToFixed(double p) => (int)Math.Round(Math.Clamp(p, -200000, 200000) * (1 << Shift));

    private void FillImagePolygon(Mat target, Scalar colour)
    {
        if (imagePoly.Count >= 3)
        {
            Cv2.FillPoly(target, new[] { imagePoly }, colour, LineTypes.AntiAlias, Shift);
        }
    }

    /// <summary>Sutherland–Hodgman clip of a ground polygon to X ≥ <see cref="NearClipM"/>.</summary>
    private static void ClipNear(List<(double X, double Y)> input, List<(double X, double Y)> output)
    {
        output.Clear();
        int n = input.Count;
        for (int i = 0; i < n; i++)
        {
            (double X, double Y) a = input[i], b = input[(i + 1) % n];
            bool ina = a.X >= NearClipM, inb = b.X >= NearClipM;
            if (ina)
            {
                output.Add(a);
            }

            if (ina != inb)
            {
                double f = (NearClipM - a.X) / (b.X - a.X);
                output.Add((NearClipM, a.Y + ((b.Y - a.Y) * f)));
            }
        }
    }

    /// <summary>Puts a strip along the road (lateral centre and half-width in metres, arc lengths s0..s1) in <see cref="groundPoly"/>.</summary>
    private void BuildStrip(in FrameContext ctx, double s0, double s1, double lateralM, double halfWidthM)
    {
        groundPoly.Clear();
        double s = s0;
        while (true)
        {
            (double wx, double wy) = ctx.Road.Offset(s, lateralM + halfWidthM);
            groundPoly.Add(ctx.Pose.ToVehicle(wx, wy));
            if (s >= s1)
            {
                break;
            }

            s = Math.Min(s1, s + StepAt(s - ctx.SV));
        }

        // Back along the other side at the same arc lengths, far to near.
        s = s0;
        int insertAt = groundPoly.Count;
        while (true)
        {
            (double wx, double wy) = ctx.Road.Offset(s, lateralM - halfWidthM);
            groundPoly.Insert(insertAt, ctx.Pose.ToVehicle(wx, wy));
            if (s >= s1)
            {
                break;
            }

            s = Math.Min(s1, s + StepAt(s - ctx.SV));
        }
    }

    /// <summary>A random stream for an object bin along the road (bin = floor(s / binLength)).</summary>
    private static SplitMix64 BinStream(SceneSpec scene, int kind, long bin) =>
        SplitMix64.ForStream(scene.SceneSeed ^ ((ulong)kind * 0xD1B54A32D192ED03UL), unchecked((ulong)bin));

    private static Scalar Bgr(double b, double g, double r) => new(Math.Clamp(b, 0, 255), Math.Clamp(g, 0, 255), Math.Clamp(r, 0, 255));
}
