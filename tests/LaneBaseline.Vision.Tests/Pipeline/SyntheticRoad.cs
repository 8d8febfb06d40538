using LaneBaseline.Core.Random;
using OpenCvSharp;

namespace LaneBaseline.Vision.Tests.Pipeline;

/// <summary>
/// Draws simple synthetic road frames for tests: a pinhole camera (f = 1000 px at 1280 px width, principal point at
/// the centre, height 1.5 m, pitch down) over a flat road with 3.6 m lanes (boundaries at ±1.8 m and ±5.4 m),
/// 0.15 m wide markings, optional curvature, dashes, a yellow left line, shadows, dimming and Gaussian noise.
/// Ground (X forward, Y left) maps to the image by H = K·[[0,−1,0],[−sinθ,0,h cosθ],[cosθ,0,h sinθ]]
/// (Hartley and Zisserman, Multiple View Geometry, 2nd ed., plane-induced homography; the worked values in
/// docs/checks.md: θ = 0, (20 m, 0) → (640, 435)).
/// </summary>
internal sealed record SyntheticRoad
{
    public int Width { get; init; } = 1280;
    public int Height { get; init; } = 720;
    public double PitchDeg { get; init; } = 2;
    public double CameraHeightM { get; init; } = 1.5;

    /// <summary>Curvature of the lane lines, 1/m (Y = Y0 + c X² / 2).</summary>
    public double Curvature { get; init; }

    /// <summary>Camera lateral offset in the lane, metres (positive = left).</summary>
    public double OffsetM { get; init; }

    public double Brightness { get; init; } = 1.0;
    public bool Shadows { get; init; }
    public bool Dashed { get; init; } = true;
    public bool YellowLeft { get; init; }
    public double NoiseSigma { get; init; } = 6;
    public ulong Seed { get; init; } = 1;
    public bool Blank { get; init; }

    /// <summary>Lateral positions (m, left positive) of the boundaries and their slots.</summary>
    public static readonly (double Y, int Slot)[] Boundaries = [(5.4, -2), (1.8, -1), (-1.8, 1), (-5.4, 2)];

    public double Focal => 1000.0 * Width / 1280.0;

    /// <summary>Projects a ground point (X forward, Y left, metres) to the image; false behind the camera.</summary>
    public bool Project(double x, double y, out double u, out double v)
    {
        double t = PitchDeg * Math.PI / 180, h = CameraHeightM;
        double a = -y, b = (-Math.Sin(t) * x) + (h * Math.Cos(t)), c = (Math.Cos(t) * x) + (h * Math.Sin(t));
        if (c <= 0.1)
        {
            u = v = 0;
            return false;
        }

        u = (Focal * a / c) + ((Width - 1) / 2.0);
        v = (Focal * b / c) + ((Height - 1) / 2.0);
        return true;
    }

    /// <summary>Lateral position of a boundary at distance x (curved road).</summary>
    public double LateralAt(double y0, double x) => y0 + (Curvature * x * x / 2) - OffsetM;

    /// <summary>Truth polyline of a boundary in image pixels, near to far, inside the frame, 3 m to 60 m.</summary>
    public List<Point2d> Truth(double y0)
    {
        var pts = new List<Point2d>();
        for (double x = 3; x <= 60; x += 0.5)
        {
            if (Project(x, LateralAt(y0, x), out double u, out double v) && u >= 0 && u <= Width - 1 && v >= 0 && v <= Height - 1)
            {
                pts.Add(new Point2d(u, v));
            }
        }

        return pts;
    }

    /// <summary>Renders the frame; the caller owns it.</summary>
    public Mat Render()
    {
        var img = new Mat(Height, Width, MatType.CV_8UC3, Scalar.All(0));
        double t = PitchDeg * Math.PI / 180;
        double horizon = ((Height - 1) / 2.0) - (Focal * Math.Tan(t));
        double k = Brightness;
        Cv2.Rectangle(img, new Rect(0, 0, Width, Math.Max(1, (int)horizon)), new Scalar(200 * k, 170 * k, 140 * k), -1);
        Cv2.Rectangle(img, new Rect(0, (int)horizon, Width, Height - (int)horizon), new Scalar(60 * k, 110 * k, 70 * k), -1);
        if (!Blank)
        {
            // Asphalt between Y = +7.5 and -7.5 m.
            FillStrip(img, 7.5, -7.5, 0, 200, 1e9, new Scalar(85 * k, 85 * k, 88 * k));
            if (Shadows)
            {
                var rng = new SplitMix64(Seed * 7919);
                for (int s = 0; s < 5; s++)
                {
                    double x0 = rng.NextDouble(5, 40);
                    double y0 = rng.NextDouble(-8, 8);
                    double len = rng.NextDouble(2, 6), wid = rng.NextDouble(2, 6);
                    FillQuad(img, x0, y0, x0 + len, y0 - wid, new Scalar(40 * k, 40 * k, 42 * k));
                }
            }

            foreach ((double y0, int slot) in Boundaries)
            {
                bool yellow = YellowLeft && slot == -1;
                var color = yellow ? new Scalar(40 * k, 190 * k, 225 * k) : new Scalar(230 * k, 230 * k, 230 * k);
                bool dashed = Dashed && Math.Abs(slot) == 1 && !yellow;
                FillStrip(img, y0 + 0.075, y0 - 0.075, 0, 200, dashed ? 3 : 1e9, color, dashed ? 12 : 0);
            }
        }

        if (NoiseSigma > 0)
        {
            AddNoise(img);
        }

        return img;
    }

    private void FillStrip(Mat img, double yLeft, double yRight, double x0, double x1, double onM, Scalar color, double periodM = 0)
    {
        double step = 0.25;
        for (double x = Math.Max(x0, 1.0); x < x1; x += step)
        {
            double xe = x + step;
            if (periodM > 0 && ((x + (Seed % 7)) % periodM) >= onM)
            {
                continue;
            }

            if (!Project(x, LateralAt(yLeft, x), out double u0, out double v0) || !Project(x, LateralAt(yRight, x), out double u1, out double v1)
                || !Project(xe, LateralAt(yRight, xe), out double u2, out double v2) || !Project(xe, LateralAt(yLeft, xe), out double u3, out double v3))
            {
                continue;
            }

            if (Math.Min(v0, v2) > Height + 50 && Math.Max(v0, v2) > Height + 50)
            {
                continue;
            }

            Point[] poly = [P(u0, v0), P(u1, v1), P(u2, v2), P(u3, v3)];
            Cv2.FillConvexPoly(img, poly, color, LineTypes.AntiAlias);
        }
    }

    private void FillQuad(Mat img, double xa, double ya, double xb, double yb, Scalar color)
    {
        if (Project(xa, ya, out double u0, out double v0) && Project(xa, yb, out double u1, out double v1)
            && Project(xb, yb, out double u2, out double v2) && Project(xb, ya, out double u3, out double v3))
        {
            Point[] poly = [P(u0, v0), P(u1, v1), P(u2, v2), P(u3, v3)];
            Cv2.FillConvexPoly(img, poly, color, LineTypes.AntiAlias);
        }
    }

    private unsafe void AddNoise(Mat img)
    {
        var rng = new SplitMix64(Seed);
        byte* b = (byte*)img.DataPointer;
        long step = img.Step();
        for (int y = 0; y < Height; y++)
        {
            byte* row = b + (y * step);
            for (int x = 0; x < Width * 3; x++)
            {
                row[x] = (byte)Math.Clamp(row[x] + (NoiseSigma * rng.NextGaussian()), 0, 255);
            }
        }
    }

    private static Point P(double u, double v) => new((int)Math.Round(Math.Clamp(u, -1e5, 1e5)), (int)Math.Round(Math.Clamp(v, -1e5, 1e5)));
}
