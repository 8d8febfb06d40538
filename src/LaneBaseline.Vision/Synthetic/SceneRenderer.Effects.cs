using LaneBaseline.Core.Random;
using OpenCvSharp;

namespace LaneBaseline.Vision.Synthetic;

/// <summary>Night, rain, glare, blur, noise and JPEG conditions, applied to the composed frame.</summary>
public sealed partial class SceneRenderer
{
    private unsafe void ApplyNight(in FrameContext ctx, Mat output)
    {
        double sev = ctx.Scene.SeverityOf(KnownConditions.Night);
        if (sev <= 0)
        {
            // A wet night is also a night (the wet road is added by ApplyWetNight).
            sev = ctx.Scene.SeverityOf(KnownConditions.WetNight);
        }

        if (sev <= 0)
        {
            return;
        }

        // Street lamps every 45 m on the right verge, 9 m high, reaching 2 m over the road (common practice).
        lightMask.SetTo(Scalar.All(0));
        double[] b = ctx.Scene.BoundaryOffsetsM();
        double lampLat = b[^1] - ctx.Scene.ShoulderM + 0.8;
        const double Spacing = 45;
        for (long k = (long)Math.Floor((ctx.SV - 20) / Spacing); k * Spacing < ctx.SV + 250; k++)
        {
            double s = (k * Spacing) + 12;
            (double X, double Y) head = ToVehicle(ctx, s, lampLat);
            if (head.X < 2)
            {
                continue;
            }

            groundPoly.Clear();
            for (int i = 0; i < 16; i++)
            {
                double a = 2 * Math.PI * i / 16;
                groundPoly.Add(ToVehicle(ctx, s + (8 * Math.Cos(a)), lampLat + (6 * Math.Sin(a))));
            }

            FillGroundPolygon(lightMask, Scalar.All(170));
            if (TryLight(head.X, head.Y, 9, 0.25, 170, 215, 255, out LightSource lamp))
            {
                lights.Add(lamp);
            }
        }

        // Soft pools: blur at 1/8 resolution (sigma width/60 at full size) and scale back up.
        Cv2.Resize(lightMask, lightSmall, lightSmall.Size(), 0, 0, InterpolationFlags.Area);
        Cv2.GaussianBlur(lightSmall, lightSmall, new Size(0, 0), width / 480.0);
        Cv2.Resize(lightSmall, lightMask, lightMask.Size(), 0, 0, InterpolationFlags.Linear);
        byte* img = (byte*)output.DataPointer;
        byte* lm = (byte*)lightMask.DataPointer;
        long step = output.Step(), step1 = lightMask.Step();
        double keep = 1 - sev;
        for (int y = 0; y < height; y++)
        {
            byte* row = img + (y * step);
            for (int x = 0; x < width; x++)
            {
                int i = (y * width) + x;
                double pool = lm[(y * step1) + x] / 255.0;
                if (groundDistanceM[i] > 0)
                {
                    double hl = 0.75 * headlightGain[i];
                    double fB = keep + (sev * (0.04 + hl + (0.45 * pool)));
                    double fG = keep + (sev * (0.04 + hl + (0.6 * pool)));
                    double fR = keep + (sev * (0.04 + hl + (0.8 * pool)));
                    row[3 * x] = ToByte(row[3 * x] * fB);
                    row[(3 * x) + 1] = ToByte(row[(3 * x) + 1] * fG);
                    row[(3 * x) + 2] = ToByte(row[(3 * x) + 2] * fR);
                }
                else
                {
                    row[3 * x] = ToByte((row[3 * x] * keep) + (sev * 22));
                    row[(3 * x) + 1] = ToByte((row[(3 * x) + 1] * keep) + (sev * 12));
                    row[(3 * x) + 2] = ToByte((row[(3 * x) + 2] * keep) + (sev * 9));
                }
            }
        }

        DrawGlows(output, sev, Math.Max(ctx.Scene.SeverityOf(KnownConditions.Rain), ctx.Scene.SeverityOf(KnownConditions.WetNight)));
    }

    private void DrawGlows(Mat output, double strength, double wet)
    {
        glow.SetTo(Scalar.All(0));
        foreach (LightSource l in lights)
        {
            var centre = new Point(ToFixed(l.U), ToFixed(l.V));
            Cv2.Circle(glow, centre, ToFixed(l.RadiusPx * 2), new Scalar(l.B * 0.5, l.G * 0.5, l.R * 0.5), -1, LineTypes.AntiAlias, Shift);
            if (wet > 0 && l.MirrorV > l.BaseV)
            {
                // Reflection on the wet road: a smear from the road below the light to its mirror image.
                Cv2.Line(glow, new Point(ToFixed(l.BaseU), ToFixed(l.BaseV)), new Point(ToFixed(l.MirrorU), ToFixed(l.MirrorV)), new Scalar(l.B * 0.35 * wet, l.G * 0.35 * wet, l.R * 0.35 * wet), Math.Max(1, (int)l.RadiusPx), LineTypes.AntiAlias, Shift);
            }
        }

        Cv2.GaussianBlur(glow, glow, new Size(0, 0), Math.Max(2, width / 320.0));
        Cv2.AddWeighted(output, 1, glow, strength * 1.6, 0, output);
        foreach (LightSource l in lights)
        {
            Cv2.Circle(output, new Point(ToFixed(l.U), ToFixed(l.V)), ToFixed(l.RadiusPx * 0.7), new Scalar(Math.Min(255, l.B + 60), Math.Min(255, l.G + 40), 255), -1, LineTypes.AntiAlias, Shift);
        }
    }

    private unsafe void ApplyRain(in FrameContext ctx, Mat output)
    {
        double sev = ctx.Scene.SeverityOf(KnownConditions.Rain);
        if (sev <= 0)
        {
            return;
        }

        double night = ctx.Scene.SeverityOf(KnownConditions.Night);
        if (night <= 0 && lights.Count > 0)
        {
            // Daytime rain: car lamps still mirror on the wet road, faintly.
            DrawGlows(output, 0.35 * sev, sev);
        }

        // Streaks: short bright slanted lines, a new set every frame.
        lightMask.SetTo(Scalar.All(0));
        SplitMix64 rng = SplitMix64.ForStream(ctx.Scene.SceneSeed, 2_000_000UL + (ulong)ctx.FrameIndex);
        int count = (int)(320 * sev * width / 1280.0);
        double scale = width / 1280.0;
        for (int i = 0; i < count; i++)
        {
            double x = rng.NextDouble(0, width), y = rng.NextDouble(0, height), len = rng.NextDouble(8, 24) * scale, a = rng.NextDouble(1.65, 1.85);
            Cv2.Line(lightMask, new Point(ToFixed(x), ToFixed(y)), new Point(ToFixed(x + (len * Math.Cos(a))), ToFixed(y + (len * Math.Sin(a)))), Scalar.All(rng.NextDouble(20, 60)), 1, LineTypes.AntiAlias, Shift);
        }

        double horizon = HorizonRow;
        byte* img = (byte*)output.DataPointer;
        byte* st = (byte*)lightMask.DataPointer;
        long step = output.Step(), step1 = lightMask.Step();
        double veil = 0.28 * sev, wetDark = 1 - (0.22 * sev);
        double grey = 150 * (1 - (0.8 * night));
        for (int y = 0; y < height; y++)
        {
            byte* row = img + (y * step);
            double sheen = y > horizon ? sev * 75 * (1 - (0.8 * night)) * Math.Exp(-(y - horizon) / (0.12 * height)) : 0;
            for (int x = 0; x < width; x++)
            {
                bool ground = groundDistanceM[(y * width) + x] > 0;
                double streak = st[(y * step1) + x] * 0.7;
                for (int ch = 0; ch < 3; ch++)
                {
                    double v = row[(3 * x) + ch];
                    if (ground)
                    {
                        v = (v * wetDark) + sheen;
                    }

                    v = (v * (1 - veil)) + (grey * veil) + streak;
                    row[(3 * x) + ch] = ToByte(v);
                }
            }
        }

        Cv2.GaussianBlur(output, output, new Size(0, 0), 0.5 + (0.9 * sev));
    }

    private unsafe void ApplyGlare(in FrameContext ctx, Mat output)
    {
        double sev = ctx.Scene.SeverityOf(KnownConditions.Glare);
        if (sev <= 0)
        {
            return;
        }

        double us = look.SunColumnFraction * width, vs = HorizonRow - (0.07 * height);
        SunField(us, vs, 0.035 * width, 0.22 * width, 0.05 * width, 150, 170, 0.22, widenRoad: false);
        float* field = (float*)glareField.DataPointer;
        long fieldStep = glareField.Step() / sizeof(float);
        byte* img = (byte*)output.DataPointer;
        long step = output.Step();
        double veil = 0.3 * sev;
        for (int y = 0; y < height; y++)
        {
            byte* row = img + (y * step);
            for (int x = 0; x < width; x++)
            {
                double add = field[(y * fieldStep) + x] * sev;
                row[3 * x] = ToByte((row[3 * x] * (1 - veil)) + (veil * 190) + (add * 0.82));
                row[(3 * x) + 1] = ToByte((row[(3 * x) + 1] * (1 - veil)) + (veil * 200) + (add * 0.94));
                row[(3 * x) + 2] = ToByte((row[(3 * x) + 2] * (1 - veil)) + (veil * 205) + add);
            }
        }

        // Flare ghosts along the line from the sun through the image centre.
        glow.SetTo(Scalar.All(0));
        double cx = width / 2.0, cy = height / 2.0;
        double[] at = [0.55, 1.25, 1.7];
        double[] size = [0.018, 0.01, 0.03];
        for (int i = 0; i < at.Length; i++)
        {
            double gx = us + ((cx - us) * at[i] * 2), gy = vs + ((cy - vs) * at[i] * 2);
            Cv2.Circle(glow, new Point(ToFixed(gx), ToFixed(gy)), ToFixed(size[i] * width), new Scalar(45, 55, 50), -1, LineTypes.AntiAlias, Shift);
        }

        Cv2.GaussianBlur(glow, glow, new Size(0, 0), width / 400.0);
        Cv2.AddWeighted(output, 1, glow, sev, 0, output);
    }

    private static void ApplyBlur(in FrameContext ctx, Mat output)
    {
        double sev = ctx.Scene.SeverityOf(KnownConditions.Blur);
        if (sev <= 0)
        {
            return;
        }

        double scale = output.Cols / 1280.0;
        Cv2.GaussianBlur(output, output, new Size(0, 0), (0.3 + (2.7 * sev)) * scale);
        int motion = 1 + (int)Math.Round(8 * sev * scale);
        if (motion > 1)
        {
            Cv2.Blur(output, output, new Size(1, motion));
        }
    }

    private unsafe void ApplyNoise(in FrameContext ctx, Mat output)
    {
        double sev = ctx.Scene.SeverityOf(KnownConditions.Noise);
        if (sev <= 0)
        {
            return;
        }

        // Irwin–Hall: the sum of four uniform bytes has mean 510 and standard deviation 147.2.
        double sigma = 30 * sev / 147.2;
        SplitMix64 rng = SplitMix64.ForStream(ctx.Scene.SceneSeed, 3_000_000UL + (ulong)ctx.FrameIndex);
        byte* img = (byte*)output.DataPointer;
        long step = output.Step();
        for (int y = 0; y < height; y++)
        {
            byte* row = img + (y * step);
            for (int x = 0; x < width; x++)
            {
                ulong w = rng.NextUInt64();
                double lum = ((double)((w & 0xFF) + ((w >> 8) & 0xFF) + ((w >> 16) & 0xFF) + ((w >> 24) & 0xFF)) - 510) * sigma;
                double chroma = ((double)(((w >> 32) & 0xFF) + ((w >> 40) & 0xFF) + ((w >> 48) & 0xFF) + (w >> 56)) - 510) * sigma * 0.35;
                row[3 * x] = ToByte(row[3 * x] + lum + chroma);
                row[(3 * x) + 1] = ToByte(row[(3 * x) + 1] + lum);
                row[(3 * x) + 2] = ToByte(row[(3 * x) + 2] + lum - chroma);
            }
        }
    }

    private static void ApplyJpeg(in FrameContext ctx, Mat output)
    {
        double sev = ctx.Scene.SeverityOf(KnownConditions.Jpeg);
        if (sev <= 0)
        {
            return;
        }

        int quality = Math.Max(4, (int)Math.Round(90 - (84 * sev)));
        Cv2.ImEncode(".jpg", output, out byte[] encoded, new ImageEncodingParam(ImwriteFlags.JpegQuality, quality));
        using Mat decoded = Cv2.ImDecode(encoded, ImreadModes.Color);
        decoded.CopyTo(output);
    }
}
