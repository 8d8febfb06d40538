using LaneBaseline.Core.Random;
using OpenCvSharp;

namespace LaneBaseline.Vision.Synthetic;

/// <summary>Sky, verge, road surface, paint, shadows and their composition.</summary>
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

    private void DrawPaint(in FrameContext ctx)
    {
        SceneSpec scene = ctx.Scene;
        whiteFine.SetTo(Scalar.All(0));
        double[] b = scene.BoundaryOffsetsM();
        bool anyYellow = false;
        for (int i = 0; i < b.Length; i++)
        {
            anyYellow |= IsYellow(scene, i);
        }

        if (anyYellow)
        {
            yellowFine.SetTo(Scalar.All(0));
        }

        double worn = Math.Max(scene.SeverityOf(KnownConditions.WornPaint), scene.SeverityOf(KnownConditions.HeavyWear));
        double sa = ctx.SV - 3, sb = ctx.SV + MaxRangeM;
        double half = scene.LineWidthM / 2;
        for (int i = 0; i < b.Length; i++)
        {
            Mat target = IsYellow(scene, i) ? yellowFine : whiteFine;
            switch (KindOf(scene, i))
            {
                case "dashed":
                    double period = scene.Standard.DashLengthM + scene.Standard.GapLengthM;
                    long k0 = (long)Math.Floor((sa - scene.DashPhaseM) / period);
                    for (long k = k0; ; k++)
                    {
                        double ds = scene.DashPhaseM + (k * period);
                        if (ds > sb)
                        {
                            break;
                        }

                        double d0 = Math.Max(ds, sa), d1 = Math.Min(ds + scene.Standard.DashLengthM, sb);
                        if (d1 > d0)
                        {
                            PaintStrip(ctx, target, i, d0, d1, b[i], half, worn);
                        }
                    }

                    break;
                case "double":
                    double off = (scene.Standard.DoubleLineGapM / 2) + half;
                    PaintStrip(ctx, target, i, sa, sb, b[i] + off, half, worn);
                    PaintStrip(ctx, target, i + 1000, sa, sb, b[i] - off, half, worn);
                    break;
                default:
                    PaintStrip(ctx, target, i, sa, sb, b[i], half, worn);
                    break;
            }
        }

        whiteCoverage.SetTo(Scalar.All(0));
        yellowCoverage.SetTo(Scalar.All(0));
        var rows = new Rect(0, PaintTop, width, PaintRows);
        using (var whiteRows = new Mat(whiteCoverage, rows))
        {
            Cv2.Resize(whiteFine, whiteRows, new Size(width, PaintRows), 0, 0, InterpolationFlags.Area);
        }

        if (anyYellow)
        {
            using var yellowRows = new Mat(yellowCoverage, rows);
            Cv2.Resize(yellowFine, yellowRows, new Size(width, PaintRows), 0, 0, InterpolationFlags.Area);
        }
    }

    private void PaintStrip(in FrameContext ctx, Mat target, int lineId, double s0, double s1, double lateral, double half, double worn)
    {
        if (worn <= 0)
        {
            FillPaintStrip(ctx, target, s0, s1, lateral, half, Scalar.All(255));
            return;
        }

        // Worn paint: 0.5 m pieces, each with its own remaining coverage, fixed to the road (stable in sequences).
        long first = (long)Math.Floor(s0 / PaintPieceM), last = (long)Math.Floor(s1 / PaintPieceM);
        for (long j = first; j <= last; j++)
        {
            double a = Math.Max(s0, j * PaintPieceM), c = Math.Min(s1, (j + 1) * PaintPieceM);
            if (c <= a)
            {
                continue;
            }

            SplitMix64 rng = BinStream(ctx.Scene, 50 + lineId, j);
            double u1 = rng.NextDouble(), u2 = rng.NextDouble();
            double alpha = u2 < 0.45 * worn ? 0 : 1 - (worn * (0.3 + (0.6 * Math.Pow(u1, 0.7))));
            if (alpha <= 0.02)
            {
                continue;
            }

            FillPaintStrip(ctx, target, a, c, lateral, half, Scalar.All(255 * alpha));
        }
    }

    private void DrawShadows(in FrameContext ctx)
    {
        shadowMask.SetTo(Scalar.All(0));
        SceneSpec scene = ctx.Scene;
        double sev = scene.SeverityOf(KnownConditions.Shadows);
        double[] b = scene.BoundaryOffsetsM();
        if (sev > 0)
        {
            Scalar dark = Scalar.All(255 * (0.3 + (0.25 * sev)));
            double elev = look.SunElevationRad, lengthPerM = 1 / Math.Tan(elev);
            const double BinM = 25;
            long first = (long)Math.Floor((ctx.SV - 60) / BinM), last = (long)Math.Ceiling((ctx.SV + 160) / BinM);
            for (long k = first; k <= last; k++)
            {
                for (int side = 0; side < 2; side++)
                {
                    SplitMix64 rng = BinStream(scene, 60 + side, k);
                    for (int j = 0; j < 2; j++)
                    {
                        double u = rng.NextDouble(), s = (k * BinM) + rng.NextDouble(0, BinM), off = rng.NextDouble(1, 7);
                        bool tree = rng.NextDouble() < 0.7;
                        double hgt = tree ? rng.NextDouble(6, 14) : rng.NextDouble(8, 11), radius = rng.NextDouble(1.8, 4.2);
                        ulong shapeSeed = rng.NextUInt64();
                        if (u >= 0.9 * sev)
                        {
                            continue;
                        }

                        double lat = side == 0 ? b[0] + scene.ShoulderM + off : b[^1] - scene.ShoulderM - off;
                        DrawCaster(ctx, s, lat, hgt, tree ? radius : 0, lengthPerM, shapeSeed, dark);
                    }
                }
            }

            foreach ((double s, double depth) in Bridges(ctx))
            {
                // The deck's shadow band, shifted along the road by the sun.
                double shift = 5.8 * lengthPerM * Math.Cos(look.SunAzimuthRad);
                BuildStrip(ctx, s + shift, s + depth + shift, 0, 60);
                FillGroundPolygon(shadowMask, Scalar.All(255 * (0.45 + (0.3 * sev))));
            }
        }

        DrawContactShadows(ctx);
        Cv2.GaussianBlur(shadowMask, shadowMask, new Size(0, 0), Math.Max(1.0, width / 900.0));
    }

    /// <summary>Shadow of a tree (canopy radius &gt; 0) or a pole standing at (s, lateral).</summary>
    private void DrawCaster(in FrameContext ctx, double s, double lateral, double heightM, double canopyM, double lengthPerM, ulong shapeSeed, Scalar dark)
    {
        (double bx, double by) = ctx.Road.Offset(s, lateral);
        double heading = ctx.Road.Evaluate(s).Heading + look.SunAzimuthRad;
        double dx = Math.Cos(heading), dy = Math.Sin(heading);
        double reach = (canopyM > 0 ? 0.65 : 1.0) * heightM * lengthPerM;
        // Trunk or pole: a thin quad from the base to the tip's shadow.
        double px = -dy * 0.15, py = dx * 0.15;
        groundPoly.Clear();
        groundPoly.Add(ctx.Pose.ToVehicle(bx + px, by + py));
        groundPoly.Add(ctx.Pose.ToVehicle(bx + px + (dx * reach), by + py + (dy * reach)));
        groundPoly.Add(ctx.Pose.ToVehicle(bx - px + (dx * reach), by - py + (dy * reach)));
        groundPoly.Add(ctx.Pose.ToVehicle(bx - px, by - py));
        FillGroundPolygon(shadowMask, dark);
        if (canopyM <= 0)
        {
            return;
        }

        var rng = new SplitMix64(shapeSeed);
        double p1 = rng.NextDouble(0, 6.3), p2 = rng.NextDouble(0, 6.3), p3 = rng.NextDouble(0, 6.3);
        double cx = bx + (dx * reach), cy = by + (dy * reach), stretch = 1 / Math.Sin(look.SunElevationRad);
        groundPoly.Clear();
        for (int i = 0; i < 40; i++)
        {
            // A lumpy but smooth crown outline.
            double a = 2 * Math.PI * i / 40;
            double r = canopyM * (1 + (0.14 * Math.Sin((2 * a) + p1)) + (0.09 * Math.Sin((3 * a) + p2)) + (0.05 * Math.Sin((7 * a) + p3)));
            double along = Math.Cos(a) * r * stretch, across = Math.Sin(a) * r;
            groundPoly.Add(ctx.Pose.ToVehicle(cx + (dx * along) - (dy * across), cy + (dy * along) + (dx * across)));
        }

        FillGroundPolygon(shadowMask, dark);
    }

    /// <summary>Bridges over the road near the ego vehicle: (arc length of the near face, depth along the road).</summary>
    private static IEnumerable<(double S, double Depth)> Bridges(FrameContext ctx)
    {
        double sev = ctx.Scene.SeverityOf(KnownConditions.Shadows);
        const double BinM = 300;
        long first = (long)Math.Floor((ctx.SV - 20) / BinM), last = (long)Math.Ceiling((ctx.SV + 300) / BinM);
        for (long k = first; k <= last; k++)
        {
            SplitMix64 rng = BinStream(ctx.Scene, 61, k);
            double u = rng.NextDouble(), s = (k * BinM) + rng.NextDouble(0, BinM), depth = rng.NextDouble(9, 15);
            if (u < 0.5 * sev && s + depth > ctx.SV - 10)
            {
                yield return (s, depth);
            }
        }
    }

    private unsafe void Compose(in FrameContext ctx, Mat output)
    {
        SceneSpec scene = ctx.Scene;
        SceneLook l = look;
        double worn = scene.SeverityOf(KnownConditions.WornPaint), rain = scene.SeverityOf(KnownConditions.Rain);
        double heavy = scene.SeverityOf(KnownConditions.HeavyWear);
        double paintK = l.PaintBrightness * (1 - (0.35 * worn)) * (1 - (0.45 * rain)) / 255.0;
        if (heavy > 0)
        {
            // Heavy wear: what paint is left is also dirtier (less bright).
            paintK *= 1 - (0.4 * heavy);
        }

        double wB = 232, wG = 236, wR = 238, yB = 40, yG = 182, yR = 228;
        if (scene.Concrete)
        {
            // Brighter paint on concrete keeps a little contrast, as real markings do.
            wB = wG = wR = 250;
        }

        double visibility = ClearVisibilityM / (1 + (5 * rain));
        double hazeB = l.SkyLowB, hazeG = l.SkyLowG, hazeR = l.SkyLowR, exposure = l.Exposure;
        SplitMix64 rng = SplitMix64.ForStream(scene.SceneSeed, 1_000_000UL + (ulong)ctx.FrameIndex);
        fixed (byte* nz = noise)
        {
            ulong* words = (ulong*)nz;
            int nWords = noise.Length / 8;
            for (int i = 0; i < nWords; i++)
            {
                words[i] = rng.NextUInt64();
            }
        }

        byte* img = (byte*)output.DataPointer;
        byte* wc = (byte*)whiteCoverage.DataPointer;
        byte* yc = (byte*)yellowCoverage.DataPointer;
        byte* sh = (byte*)shadowMask.DataPointer;
        long step = output.Step(), step1 = whiteCoverage.Step();
        for (int y = 0; y < height; y++)
        {
            byte* row = img + (y * step);
            for (int x = 0; x < width; x++)
            {
                int i = (y * width) + x;
                long m = (y * step1) + x;
                double b = row[3 * x], g = row[(3 * x) + 1], r = row[(3 * x) + 2];
                double aw = wc[m] * paintK, ay = yc[m] * paintK;
                if (aw + ay > 0)
                {
                    double keep = Math.Max(0, 1 - aw - ay);
                    b = (b * keep) + (wB * aw) + (yB * ay);
                    g = (g * keep) + (wG * aw) + (yG * ay);
                    r = (r * keep) + (wR * aw) + (yR * ay);
                }

                double shade = 1 - (sh[m] / 255.0);
                float d = groundDistanceM[i];
                if (d > 0)
                {
                    double grain = (noise[i] - 127.5) / 127.5 * grainAmplitude[i];
                    double haze = rain > 0 ? 1 - Math.Exp(-Math.Min(d, 350) / visibility) : clearHaze[i];
                    b = ((b * shade) + grain) * (1 - haze) + (hazeB * haze);
                    g = ((g * shade) + grain) * (1 - haze) + (hazeG * haze);
                    r = ((r * shade) + grain) * (1 - haze) + (hazeR * haze);
                }
                else
                {
                    b *= shade;
                    g *= shade;
                    r *= shade;
                }

                row[3 * x] = ToByte(b * exposure);
                row[(3 * x) + 1] = ToByte(g * exposure);
                row[(3 * x) + 2] = ToByte(r * exposure);
            }
        }
    }

    private static byte ToByte(double v) => v <= 0 ? (byte)0 : v >= 255 ? (byte)255 : (byte)(v + 0.5);
}
