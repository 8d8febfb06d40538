using LaneBaseline.Core.Random;
using OpenCvSharp;

namespace LaneBaseline.Vision.Synthetic;

/// <summary>Sky, verge and road surface: asphalt or concrete slabs, repaired patches, tar seams and cracks.</summary>
public sealed partial class SceneRenderer
{
    private const double PaintPieceM = 0.5;

    private unsafe void DrawBackground(in FrameContext ctx, Mat output)
    {
        SceneLook l = look;
        byte* data = (byte*)output.DataPointer;
        long step = output.Step();
        for (int y = 0; y < height; y++)
        {
            byte* row = data + (y * step);
            for (int x = 0; x < width; x++)
            {
                double horizon = Math.Max(horizonAt[x], 1);
                double t = Math.Pow(Math.Clamp((horizon - y) / horizon, 0, 1), 0.6);
                row[3 * x] = (byte)Math.Clamp(l.SkyLowB + ((l.SkyTopB - l.SkyLowB) * t), 0, 255);
                row[(3 * x) + 1] = (byte)Math.Clamp(l.SkyLowG + ((l.SkyTopG - l.SkyLowG) * t), 0, 255);
                row[(3 * x) + 2] = (byte)Math.Clamp(l.SkyLowR + ((l.SkyTopR - l.SkyLowR) * t), 0, 255);
            }
        }

        // Verge: the whole ground plane.
        groundPoly.Clear();
        groundPoly.Add((NearClipM, 3000));
        groundPoly.Add((3000, 3000));
        groundPoly.Add((3000, -3000));
        groundPoly.Add((NearClipM, -3000));
        FillGroundPolygon(output, Bgr(l.VergeB, l.VergeG, l.VergeR));

        // A distant tree line on the horizon, shaped by the scene seed.
        SplitMix64 rng = SplitMix64.ForStream(ctx.Scene.SceneSeed, 2);
        double p1 = rng.NextDouble(0, 6.28), p2 = rng.NextDouble(0, 6.28), p3 = rng.NextDouble(0, 6.28);
        double scale = width / 1280.0;
        imagePoly.Clear();
        for (int x = 0; x <= width + 5; x += 6)
        {
            int col = Math.Min(x, width - 1);
            double hgt = scale * (9 + (5 * Math.Sin((x * 0.011) + p1)) + (3 * Math.Sin((x * 0.037) + p2)) + (2 * Math.Sin((x * 0.13) + p3)));
            imagePoly.Add(new Point(ToFixed(x), ToFixed(horizonAt[col] - Math.Max(1, hgt))));
        }

        for (int x = ((width + 5) / 6) * 6; x >= 0; x -= 6)
        {
            imagePoly.Add(new Point(ToFixed(x), ToFixed(horizonAt[Math.Min(x, width - 1)] + 1.5)));
        }
        FillImagePolygon(output, Bgr(l.VergeB * 0.55, l.VergeG * 0.6, l.VergeR * 0.5));
    }

    private void DrawRoadSurface(in FrameContext ctx, Mat output)
    {
        SceneSpec scene = ctx.Scene;
        SceneLook l = look;
        double[] b = scene.BoundaryOffsetsM();
        double left = b[0] + scene.ShoulderM, right = b[^1] - scene.ShoulderM;
        double s0 = ctx.SV - 5, sFar = ctx.SV + RoadRangeM;
        BuildStrip(ctx, s0, sFar, (left + right) / 2, (left - right) / 2);
        FillGroundPolygon(output, Bgr(l.SurfaceB, l.SurfaceG, l.SurfaceR));

        // Shoulders: a slightly different tone beyond the edge lines.
        double shoulderTone = scene.Concrete ? -8 : 7;
        Scalar shoulder = Bgr(l.SurfaceB + shoulderTone, l.SurfaceG + shoulderTone, l.SurfaceR + shoulderTone);
        BuildStrip(ctx, s0, ctx.SV + 400, (left + b[0]) / 2, (left - b[0]) / 2);
        FillGroundPolygon(output, shoulder);
        BuildStrip(ctx, s0, ctx.SV + 400, (right + b[^1]) / 2, (b[^1] - right) / 2);
        FillGroundPolygon(output, shoulder);

        if (scene.Concrete)
        {
            DrawConcreteSlabs(ctx, output, b, joints: false);
        }

        // Wheel paths: two slightly darker bands in every lane (tyre polishing and oil), common practice.
        double wear = scene.Concrete ? -4 : -3.5;
        Scalar path = Bgr(l.SurfaceB + wear, l.SurfaceG + wear, l.SurfaceR + wear);
        for (int i = 0; i < b.Length - 1; i++)
        {
            double centre = (b[i] + b[i + 1]) / 2;
            BuildStrip(ctx, s0, ctx.SV + 250, centre + 0.85, 0.25);
            FillGroundPolygon(output, path);
            BuildStrip(ctx, s0, ctx.SV + 250, centre - 0.85, 0.25);
            FillGroundPolygon(output, path);
        }

        if (scene.Concrete)
        {
            DrawConcreteSlabs(ctx, output, b, joints: true);
        }

        double cracks = scene.SeverityOf(KnownConditions.Cracks);
        if (cracks > 0)
        {
            DrawCracks(ctx, output, b, cracks);
        }

        double heavy = scene.SeverityOf(KnownConditions.HeavyWear);
        if (heavy > 0)
        {
            DrawRepairs(ctx, output, b, heavy);
        }
    }

    /// <summary>
    /// Heavy wear: repaired patches of fresh (darker) asphalt that straddle a lane line, and dark tar seams that run
    /// along the lane a little beside each line, so the strongest long edges near a line are not the paint.
    /// </summary>
    private void DrawRepairs(in FrameContext ctx, Mat output, double[] b, double severity)
    {
        SceneLook l = look;
        const double BinM = 18;
        long first = (long)Math.Floor((ctx.SV - 20) / BinM), last = (long)Math.Ceiling((ctx.SV + 150) / BinM);
        Scalar tar = Bgr(l.SurfaceB * 0.42, l.SurfaceG * 0.42, l.SurfaceR * 0.42);
        for (long k = first; k <= last; k++)
        {
            SplitMix64 rng = BinStream(ctx.Scene, 60, k);
            for (int i = 0; i < b.Length; i++)
            {
                double u = rng.NextDouble(), ps = (k * BinM) + rng.NextDouble(0, BinM), plen = rng.NextDouble(4, 14);
                double pshift = rng.NextDouble(-0.6, 0.6), pw = rng.NextDouble(0.5, 1.4), ptone = rng.NextDouble(-30, -12);
                if (u < 0.5 * severity)
                {
                    BuildStrip(ctx, ps, ps + plen, b[i] + pshift, pw);
                    FillGroundPolygon(output, Bgr(l.SurfaceB + ptone, l.SurfaceG + ptone, l.SurfaceR + ptone));
                }

                u = rng.NextDouble();
                double ss = (k * BinM) + rng.NextDouble(0, BinM), slen = rng.NextDouble(10, 35);
                double side = rng.NextDouble() < 0.5 ? -1 : 1, soff = rng.NextDouble(0.25, 0.7), sw = rng.NextDouble(0.03, 0.07);
                if (u < 0.8 * severity)
                {
                    BuildStrip(ctx, ss, ss + slen, b[i] + (side * soff), sw);
                    FillGroundPolygon(output, tar);
                }
            }
        }
    }

    private void DrawConcreteSlabs(in FrameContext ctx, Mat output, double[] b, bool joints)
    {
        SceneLook l = look;
        const double SlabM = 4.5; // common practice: jointed plain concrete pavement, joints every 4-6 m
        long first = (long)Math.Floor((ctx.SV - 5) / SlabM), last = (long)Math.Ceiling((ctx.SV + 160) / SlabM);
        for (long k = first; k <= last; k++)
        {
            double sa = k * SlabM, sb = sa + SlabM;
            for (int i = 0; i < b.Length - 1 && !joints; i++)
            {
                SplitMix64 rng = BinStream(ctx.Scene, 40 + i, k);
                double tone = rng.NextDouble(-7, 7);
                BuildStrip(ctx, sa + 0.01, sb - 0.01, (b[i] + b[i + 1]) / 2, ((b[i] - b[i + 1]) / 2) - 0.01);
                FillGroundPolygon(output, Bgr(l.SurfaceB + tone, l.SurfaceG + tone, l.SurfaceR + tone));
            }

            if (joints)
            {
                // Transverse joint across the carriageway.
                BuildTransverse(ctx, sa, b[0], b[^1], 0.012);
                FillGroundPolygon(output, Bgr(l.SurfaceB * 0.6, l.SurfaceG * 0.6, l.SurfaceR * 0.6));
            }
        }
    }

    /// <summary>A thin band across the road at arc length s between two lateral offsets.</summary>
    private void BuildTransverse(in FrameContext ctx, double s, double fromLateral, double toLateral, double halfWidthM)
    {
        groundPoly.Clear();
        groundPoly.Add(ToVehicle(ctx, s - halfWidthM, fromLateral));
        groundPoly.Add(ToVehicle(ctx, s + halfWidthM, fromLateral));
        groundPoly.Add(ToVehicle(ctx, s + halfWidthM, toLateral));
        groundPoly.Add(ToVehicle(ctx, s - halfWidthM, toLateral));
    }

    private static (double X, double Y) ToVehicle(in FrameContext ctx, double s, double lateral)
    {
        (double wx, double wy) = ctx.Road.Offset(s, lateral);
        return ctx.Pose.ToVehicle(wx, wy);
    }

    private void DrawCracks(in FrameContext ctx, Mat output, double[] b, double severity)
    {
        SceneLook l = look;
        const double BinM = 20;
        double roadLeft = b[0] + ctx.Scene.ShoulderM, roadRight = b[^1] - ctx.Scene.ShoulderM;
        long first = (long)Math.Floor((ctx.SV - 20) / BinM), last = (long)Math.Ceiling((ctx.SV + 140) / BinM);
        Scalar sealant = Bgr(l.SurfaceB * 0.5, l.SurfaceG * 0.5, l.SurfaceR * 0.5);
        Scalar crack = Bgr(l.SurfaceB * 0.62, l.SurfaceG * 0.62, l.SurfaceR * 0.62);
        for (long k = first; k <= last; k++)
        {
            SplitMix64 rng = BinStream(ctx.Scene, 30, k);
            // Patch (repaired area) over part of a lane.
            double u = rng.NextDouble();
            double ps = (k * BinM) + rng.NextDouble(0, BinM), plen = rng.NextDouble(3, 10), plat = rng.NextDouble(roadRight + 1, roadLeft - 1), pw = rng.NextDouble(0.8, 2.5), ptone = rng.NextDouble(-18, 10);
            if (u < 0.45 * severity)
            {
                BuildStrip(ctx, ps, ps + plen, plat, pw);
                FillGroundPolygon(output, Bgr(l.SurfaceB + ptone, l.SurfaceG + ptone, l.SurfaceR + ptone));
            }

            // Longitudinal sealant seams that meander, often near and parallel to lane lines.
            for (int j = 0; j < 2; j++)
            {
                u = rng.NextDouble();
                double ss = (k * BinM) + rng.NextDouble(0, BinM), len = rng.NextDouble(6, 22), lat = rng.NextDouble(roadRight + 0.3, roadLeft - 0.3);
                double w = rng.NextDouble(0.025, 0.06);
                ulong walkSeed = rng.NextUInt64();
                if (u < 0.9 * severity)
                {
                    DrawWalk(ctx, output, walkSeed, ss, len, lat, w, true, sealant);
                }
            }

            // Transverse cracks.
            for (int j = 0; j < 3; j++)
            {
                u = rng.NextDouble();
                double ss = (k * BinM) + rng.NextDouble(0, BinM), lat = rng.NextDouble(roadRight, roadLeft), len = rng.NextDouble(1, 6);
                ulong walkSeed = rng.NextUInt64();
                if (u < severity)
                {
                    DrawWalk(ctx, output, walkSeed, ss, Math.Min(len, lat - roadRight), lat, 0.015, false, crack);
                }
            }
        }
    }

    /// <summary>A jagged polyline (along or across the road) drawn as thin ground quads.</summary>
    private void DrawWalk(in FrameContext ctx, Mat output, ulong seed, double s, double length, double lateral, double widthM, bool along, Scalar colour)
    {
        var rng = new SplitMix64(seed);
        const int Steps = 8;
        double ps = s, pl = lateral;
        for (int i = 1; i <= Steps; i++)
        {
            double ns, nl;
            if (along)
            {
                ns = s + (length * i / Steps);
                nl = pl + rng.NextDouble(-0.12, 0.12);
            }
            else
            {
                ns = ps + rng.NextDouble(-0.15, 0.15);
                nl = lateral - (length * i / Steps);
            }

            (double X, double Y) a = ToVehicle(ctx, ps, pl), c = ToVehicle(ctx, ns, nl);
            double dx = c.X - a.X, dy = c.Y - a.Y, len = Math.Sqrt((dx * dx) + (dy * dy));
            if (len > 1e-6)
            {
                double nx = -dy / len * widthM / 2, ny = dx / len * widthM / 2;
                groundPoly.Clear();
                groundPoly.Add((a.X + nx, a.Y + ny));
                groundPoly.Add((c.X + nx, c.Y + ny));
                groundPoly.Add((c.X - nx, c.Y - ny));
                groundPoly.Add((a.X - nx, a.Y - ny));
                FillGroundPolygon(output, colour);
            }

            ps = ns;
            pl = nl;
        }
    }
}
