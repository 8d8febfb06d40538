using LaneBaseline.Core.Random;
using OpenCvSharp;

namespace LaneBaseline.Vision.Synthetic;

/// <summary>Shadows of roadside casters and bridges on the road.</summary>
public sealed partial class SceneRenderer
{
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
}
