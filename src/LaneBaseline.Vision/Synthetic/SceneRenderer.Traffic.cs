using LaneBaseline.Core.Random;
using OpenCvSharp;

namespace LaneBaseline.Vision.Synthetic;

/// <summary>Vehicles, bridges and the light sources they carry.</summary>
public sealed partial class SceneRenderer
{
    private readonly List<CarPlacement> cars = new(16);
    private readonly List<LightSource> lights = new(64);
    private readonly (double X, double Y, double Z)[] corners = new (double X, double Y, double Z)[8];

    private readonly record struct CarPlacement(double S, double Lateral, double Heading, double LengthM, double WidthM, double HeightM, bool Truck, bool Opposing, double B, double G, double R, double DistanceM);

    /// <summary>A light for night glows: image position and radius, colour, and where its wet-road reflection runs
    /// (from the road point below it to its mirror image under the road).</summary>
    private readonly record struct LightSource(double U, double V, double RadiusPx, double B, double G, double R, double BaseU, double BaseV, double MirrorU, double MirrorV);

    private bool TryLight(double x, double y, double z, double radiusM, double b, double g, double r, out LightSource light)
    {
        light = default;
        if (!projection.TryProject(x, y, z, out double u, out double v) ||
            !projection.TryProject(x, y, 0, out double bu, out double bv) ||
            !projection.TryProject(x, y, -z, out double mu, out double mv))
        {
            return false;
        }

        light = new LightSource(u, v, Math.Max(1.2, camera.Fx * radiusM / Math.Max(x, 1)), b, g, r, bu, bv, mu, mv);
        return true;
    }

    private static readonly (double B, double G, double R)[] Paints =
    [
        (200, 200, 205), (40, 40, 45), (150, 150, 150), (40, 40, 160), (120, 60, 30), (220, 225, 230), (90, 90, 95), (60, 110, 60), (30, 120, 200),
    ];

    private void PlaceTraffic(in FrameContext ctx, double egoLateral)
    {
        cars.Clear();
        SceneSpec scene = ctx.Scene;
        double sev = scene.SeverityOf(KnownConditions.Traffic);
        if (sev <= 0)
        {
            return;
        }

        double[] b = scene.BoundaryOffsetsM();
        SplitMix64 rng = SplitMix64.ForStream(scene.SceneSeed, 4);
        int lanes = scene.LaneWidthsM.Count;
        for (int i = 0; i < 14; i++)
        {
            double u = rng.NextDouble();
            int lane = rng.NextInt(lanes);
            double gap0 = rng.NextDouble(9, 110), rel = rng.NextDouble(-3, 3), jitter = rng.NextDouble(-0.25, 0.25);
            bool straddle = rng.NextDouble() < 0.3;
            bool truck = rng.NextDouble() < 0.2;
            (double cb, double cg, double cr) = Paints[rng.NextInt(Paints.Length)];
            if (u >= sev * 0.85)
            {
                continue;
            }

            bool opposing = scene.OpposingBoundary >= 0 && lane < scene.OpposingBoundary;
            double lateral = ((b[lane] + b[lane + 1]) / 2) + jitter;
            if (straddle && lane > 0 && lane != scene.OpposingBoundary)
            {
                lateral = b[lane] + (jitter * 1.2);
            }

            double s = opposing
                ? scene.StartSM + (gap0 * 1.5) - ((scene.SpeedMps + rel) * ctx.TimeS)
                : scene.StartSM + gap0 + ((scene.SpeedMps + rel) * ctx.TimeS);
            double ahead = s - ctx.SV;
            double length = truck ? 11 : 4.5, widthM = truck ? 2.5 : 1.8;
            if (ahead < 4 + (length / 2) || ahead > 170 || (Math.Abs(lateral - egoLateral) < 2.4 && ahead < 8 + length))
            {
                continue;
            }

            bool clash = false;
            foreach (CarPlacement c in cars)
            {
                if (Math.Abs(c.S - s) < ((c.LengthM + length) / 2) + 2 && Math.Abs(c.Lateral - lateral) < 2.3)
                {
                    clash = true;
                    break;
                }
            }

            if (clash)
            {
                continue;
            }

            double heading = ctx.Road.Evaluate(s).Heading + (opposing ? Math.PI : 0) + (straddle ? 0.02 : 0);
            cars.Add(new CarPlacement(s, lateral, heading, length, widthM, truck ? 3.6 : 1.45, truck, opposing, cb, cg, cr, ahead));
        }

        cars.Sort((p, q) => q.DistanceM.CompareTo(p.DistanceM));
    }

    private void DrawContactShadows(in FrameContext ctx)
    {
        foreach (CarPlacement c in cars)
        {
            SetBox(ctx, c, -c.LengthM * 0.55, c.LengthM * 0.55, -c.WidthM * 0.58, c.WidthM * 0.58, 0, 0);
            groundPoly.Clear();
            groundPoly.Add((corners[0].X, corners[0].Y));
            groundPoly.Add((corners[1].X, corners[1].Y));
            groundPoly.Add((corners[3].X, corners[3].Y));
            groundPoly.Add((corners[2].X, corners[2].Y));
            FillGroundPolygon(shadowMask, Scalar.All(170));
        }
    }

    private void DrawTraffic(in FrameContext ctx, Mat output)
    {
        lights.Clear();
        foreach ((double s, double depth) in Bridges(ctx))
        {
            DrawBridge(ctx, output, s, depth);
        }

        foreach (CarPlacement c in cars)
        {
            double l2 = c.LengthM / 2, w2 = c.WidthM / 2;
            var tyre = new Scalar(22, 22, 24);
            // Wheels, then the lower body, then the cabin (or the truck's box).
            DrawBox(ctx, output, c, l2 - 1.2, l2 - 0.5, w2 - 0.3, w2, 0, 0.62, tyre);
            DrawBox(ctx, output, c, l2 - 1.2, l2 - 0.5, -w2, -w2 + 0.3, 0, 0.62, tyre);
            DrawBox(ctx, output, c, -l2 + 0.5, -l2 + 1.2, w2 - 0.3, w2, 0, 0.62, tyre);
            DrawBox(ctx, output, c, -l2 + 0.5, -l2 + 1.2, -w2, -w2 + 0.3, 0, 0.62, tyre);
            var body = new Scalar(c.B, c.G, c.R);
            if (c.Truck)
            {
                DrawBox(ctx, output, c, -l2, l2, -w2, w2, 0.45, 1.1, new Scalar(35, 35, 38));
                DrawBox(ctx, output, c, -l2, l2 - 2.2, -w2, w2, 1.1, c.HeightM, body);
                DrawBox(ctx, output, c, l2 - 2.0, l2, -w2 + 0.05, w2 - 0.05, 1.1, 2.9, new Scalar(c.B * 0.6, c.G * 0.6, c.R * 0.6));
            }
            else
            {
                DrawBox(ctx, output, c, -l2, l2, -w2, w2, 0.28, 0.92, body);
                DrawBox(ctx, output, c, -l2 + 0.9, l2 - 1.3, -w2 + 0.12, w2 - 0.12, 0.92, c.HeightM, new Scalar(45 + (c.B * 0.15), 45 + (c.G * 0.15), 48 + (c.R * 0.15)));
            }

            // Lamps on the end that faces the camera: red tail lights, or white headlights of oncoming traffic.
            double end = c.Opposing ? l2 : -l2;
            double lampZ0 = c.Truck ? 0.6 : 0.68, lampZ1 = lampZ0 + 0.16;
            var lamp = c.Opposing ? new Scalar(200, 225, 235) : new Scalar(25, 25, 190);
            for (int side = -1; side <= 1; side += 2)
            {
                double y0 = side * (w2 - 0.38), y1 = side * (w2 - 0.08);
                double x0 = end + (c.Opposing ? 0.005 : -0.005);
                DrawBox(ctx, output, c, Math.Min(x0, end), Math.Max(x0, end), Math.Min(y0, y1), Math.Max(y0, y1), lampZ0, lampZ1, lamp);
                SetBox(ctx, c, end, end, (y0 + y1) / 2, (y0 + y1) / 2, (lampZ0 + lampZ1) / 2, (lampZ0 + lampZ1) / 2);
                (double X, double Y, double Z) p = corners[0];
                if (c.Opposing ? TryLight(p.X, p.Y, p.Z, 0.12, 230, 245, 255, out LightSource light) : TryLight(p.X, p.Y, p.Z, 0.09, 40, 40, 255, out light))
                {
                    lights.Add(light);
                }
            }
        }
    }

    /// <summary>Fills <see cref="corners"/> with a box in the car's local frame (x forward, y left, z up).</summary>
    private void SetBox(in FrameContext ctx, in CarPlacement c, double x0, double x1, double y0, double y1, double z0, double z1)
    {
        (double cx, double cy) = ctx.Road.Offset(c.S, c.Lateral);
        double ch = Math.Cos(c.Heading), sh = Math.Sin(c.Heading);
        int k = 0;
        for (int iz = 0; iz < 2; iz++)
        {
            for (int ix = 0; ix < 2; ix++)
            {
                for (int iy = 0; iy < 2; iy++)
                {
                    double lx = ix == 0 ? x0 : x1, ly = iy == 0 ? y0 : y1;
                    (double vx, double vy) = ctx.Pose.ToVehicle(cx + (ch * lx) - (sh * ly), cy + (sh * lx) + (ch * ly));
                    corners[k++] = (vx, vy, iz == 0 ? z0 : z1);
                }
            }
        }
    }

    // Faces as corner indices (index = iz*4 + ix*2 + iy), listed counter-clockwise seen from outside.
    private static readonly int[][] Faces =
    [
        [0, 1, 5, 4], // rear (x0)
        [2, 6, 7, 3], // front (x1)
        [1, 3, 7, 5], // left (y1)
        [0, 4, 6, 2], // right (y0)
        [4, 5, 7, 6], // top
    ];

    private void DrawBox(in FrameContext ctx, Mat output, in CarPlacement c, double x0, double x1, double y0, double y1, double z0, double z1, Scalar colour)
    {
        SetBox(ctx, c, x0, x1, y0, y1, z0, z1);
        DrawCorners(output, colour);
    }

    private void DrawCorners(Mat output, Scalar colour)
    {
        double camZ = camera.MountHeightM;
        double mx = 0, my = 0, mz = 0;
        for (int i = 0; i < 8; i++)
        {
            if (corners[i].X < NearClipM)
            {
                return;
            }

            mx += corners[i].X / 8;
            my += corners[i].Y / 8;
            mz += corners[i].Z / 8;
        }

        double[] shades = [0.95, 0.95, 0.78, 0.78, 1.12];
        for (int f = 0; f < Faces.Length; f++)
        {
            int[] face = Faces[f];
            (double X, double Y, double Z) a = corners[face[0]];
            double fx = 0, fy = 0, fz = 0;
            foreach (int idx in face)
            {
                fx += corners[idx].X / 4;
                fy += corners[idx].Y / 4;
                fz += corners[idx].Z / 4;
            }

            // Outward normal = face centre minus box centre (a box is convex); visible when it faces the camera.
            double nx = fx - mx, ny = fy - my, nz = fz - mz;
            if ((nx * (0 - a.X)) + (ny * (0 - a.Y)) + (nz * (camZ - a.Z)) <= 0)
            {
                continue;
            }

            imagePoly.Clear();
            foreach (int idx in face)
            {
                AddImagePoint(corners[idx].X, corners[idx].Y, corners[idx].Z);
            }

            double k = shades[f];
            FillImagePolygon(output, new Scalar(Math.Min(255, colour.Val0 * k), Math.Min(255, colour.Val1 * k), Math.Min(255, colour.Val2 * k)));
        }
    }

    private void DrawBridge(in FrameContext ctx, Mat output, double s, double depth)
    {
        const double Clear = 5.4, Deck = 6.9;
        double[] b = ctx.Scene.BoundaryOffsetsM();
        double left = b[0] + ctx.Scene.ShoulderM + 2, right = b[^1] - ctx.Scene.ShoulderM - 2;
        // Piers beside the road.
        var pier = new CarPlacement(s + (depth / 2), 0, ctx.Road.Evaluate(s + (depth / 2)).Heading, depth, 1, Clear, false, false, 0, 0, 0, 0);
        SetBoxAt(ctx, pier, left, left + 1.2, depth, 0, Clear);
        DrawCorners(output, new Scalar(150, 152, 155));
        SetBoxAt(ctx, pier, right - 1.2, right, depth, 0, Clear);
        DrawCorners(output, new Scalar(150, 152, 155));
        // Deck: a long box across the road.
        SetBoxAt(ctx, pier, right - 40, left + 40, depth, Clear, Deck);
        DrawCorners(output, new Scalar(128, 130, 134));
        // Its underside, seen from below.
        imagePoly.Clear();
        for (int i = 0; i <= 10; i++)
        {
            double lat = left + 40 - ((left - right + 80) * i / 10.0);
            (double X, double Y) p = ToVehicle(ctx, s, lat);
            if (p.X > NearClipM)
            {
                AddImagePoint(p.X, p.Y, Clear);
            }
        }

        for (int i = 10; i >= 0; i--)
        {
            double lat = left + 40 - ((left - right + 80) * i / 10.0);
            (double X, double Y) p = ToVehicle(ctx, s + depth, lat);
            if (p.X > NearClipM)
            {
                AddImagePoint(p.X, p.Y, Clear);
            }
        }

        FillImagePolygon(output, new Scalar(62, 64, 66));
    }

    private void SetBoxAt(in FrameContext ctx, in CarPlacement centre, double lat0, double lat1, double depth, double z0, double z1)
    {
        CarPlacement c = centre with { Lateral = (lat0 + lat1) / 2 };
        double w = lat1 - lat0;
        SetBox(ctx, c, -depth / 2, depth / 2, -w / 2, w / 2, z0, z1);
    }
}
