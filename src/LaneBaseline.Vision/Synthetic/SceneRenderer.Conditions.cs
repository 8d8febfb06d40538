using LaneBaseline.Core.Random;
using OpenCvSharp;

namespace LaneBaseline.Vision.Synthetic;

/// <summary>Wet night, sodium dusk and low sun: the hard conditions, applied to the composed frame.</summary>
public sealed partial class SceneRenderer
{
    /// <summary>
    /// Wet night: the wet asphalt darkens and mirrors every street lamp and oncoming headlight as a long, narrow,
    /// bright streak running down the image from the road point below the light (specular reflection stretched by
    /// the rough wet surface, common practice in night driving imagery). The streaks are nearly image-vertical, so
    /// away from the vanishing point's column they do not point at it as lane markings do.
    /// </summary>
    private unsafe void ApplyWetNight(in FrameContext ctx, Mat output)
    {
        double sev = ctx.Scene.SeverityOf(KnownConditions.WetNight);
        if (sev <= 0)
        {
            return;
        }

        // Oncoming headlights on the far side of the road (pairs 1.5 m apart, 0.7 m high), fixed per scene.
        double[] b = ctx.Scene.BoundaryOffsetsM();
        SplitMix64 rng = SplitMix64.ForStream(ctx.Scene.SceneSeed, 4_000_000UL);
        int pairs = 1 + (int)Math.Round(3 * sev);
        for (int k = 0; k < pairs; k++)
        {
            double x = rng.NextDouble(18, 90), lateral = b[0] - rng.NextDouble(0.8, 2.2);
            (double X, double Y) c = ToVehicle(ctx, ctx.SV + x, lateral);
            for (int side = -1; side <= 1; side += 2)
            {
                if (c.X > 3 && TryLight(c.X, c.Y + (side * 0.75), 0.7, 0.12, 230, 245, 255, out LightSource light))
                {
                    lights.Add(light);
                }
            }
        }

        glow.SetTo(Scalar.All(0));
        foreach (LightSource l in lights)
        {
            if (l.MirrorV <= l.BaseV)
            {
                continue;
            }

            double end = Math.Min(height + 10, l.MirrorV + (1.5 * (l.MirrorV - l.BaseV)));
            double endU = l.BaseU + ((l.MirrorU - l.BaseU) * (end - l.BaseV) / (l.MirrorV - l.BaseV));
            double k = 0.9 * sev;
            Cv2.Line(glow, new Point(ToFixed(l.BaseU), ToFixed(l.BaseV)), new Point(ToFixed(endU), ToFixed(end)), new Scalar(l.B * k, l.G * k, l.R * k), Math.Max(2, (int)Math.Round(l.RadiusPx * 1.3)), LineTypes.AntiAlias, Shift);
            Cv2.Circle(glow, new Point(ToFixed(l.U), ToFixed(l.V)), ToFixed(l.RadiusPx * 1.5), new Scalar(l.B * 0.5, l.G * 0.5, l.R * 0.5), -1, LineTypes.AntiAlias, Shift);
        }

        Cv2.GaussianBlur(glow, glow, new Size(0, 0), Math.Max(1, width / 900.0));
        byte* img = (byte*)output.DataPointer;
        long step = output.Step();
        double wetDark = 1 - (0.3 * sev);
        for (int y = 0; y < height; y++)
        {
            byte* row = img + (y * step);
            for (int x = 0; x < width; x++)
            {
                if (groundDistanceM[(y * width) + x] > 0)
                {
                    row[3 * x] = ToByte(row[3 * x] * wetDark);
                    row[(3 * x) + 1] = ToByte(row[(3 * x) + 1] * wetDark);
                    row[(3 * x) + 2] = ToByte(row[(3 * x) + 2] * wetDark);
                }
            }
        }

        Cv2.Add(output, glow, output);
    }

    /// <summary>
    /// Dusk under low-pressure sodium lamps (nearly monochromatic light near 589 nm, common practice): the scene
    /// darkens, colour collapses towards orange (white paint looks yellow-orange), and orange pools lie under lamps.
    /// </summary>
    private unsafe void ApplySodiumDusk(in FrameContext ctx, Mat output)
    {
        double sev = ctx.Scene.SeverityOf(KnownConditions.SodiumDusk);
        if (sev <= 0)
        {
            return;
        }

        lightMask.SetTo(Scalar.All(0));
        double[] b = ctx.Scene.BoundaryOffsetsM();
        double lampLat = b[^1] - ctx.Scene.ShoulderM + 0.8;
        const double Spacing = 40;
        for (long k = (long)Math.Floor((ctx.SV - 20) / Spacing); k * Spacing < ctx.SV + 250; k++)
        {
            double s = (k * Spacing) + 7;
            groundPoly.Clear();
            for (int i = 0; i < 16; i++)
            {
                double a = 2 * Math.PI * i / 16;
                groundPoly.Add(ToVehicle(ctx, s + (9 * Math.Cos(a)), lampLat + (7 * Math.Sin(a))));
            }

            FillGroundPolygon(lightMask, Scalar.All(200));
        }

        Cv2.Resize(lightMask, lightSmall, lightSmall.Size(), 0, 0, InterpolationFlags.Area);
        Cv2.GaussianBlur(lightSmall, lightSmall, new Size(0, 0), width / 400.0);
        Cv2.Resize(lightSmall, lightMask, lightMask.Size(), 0, 0, InterpolationFlags.Linear);
        byte* img = (byte*)output.DataPointer;
        byte* lm = (byte*)lightMask.DataPointer;
        long step = output.Step(), step1 = lightMask.Step();
        for (int y = 0; y < height; y++)
        {
            byte* row = img + (y * step);
            for (int x = 0; x < width; x++)
            {
                double bl = row[3 * x], g = row[(3 * x) + 1], r = row[(3 * x) + 2];
                double lum = (0.11 * bl) + (0.59 * g) + (0.3 * r);
                double light;
                if (groundDistanceM[(y * width) + x] > 0)
                {
                    light = 0.35 + (0.9 * lm[(y * step1) + x] / 255.0);
                }
                else
                {
                    light = 0.45;
                }

                // Sodium spectrum seen through an RGB camera: red strong, green about 0.6, blue very little.
                double sb = lum * light * 0.22, sg = lum * light * 0.62, sr = (lum * light * 1.05) + 6;
                row[3 * x] = ToByte((bl * (1 - sev)) + (sb * sev));
                row[(3 * x) + 1] = ToByte((g * (1 - sev)) + (sg * sev));
                row[(3 * x) + 2] = ToByte((r * (1 - sev)) + (sr * sev));
            }
        }
    }

    /// <summary>
    /// A low sun straight ahead near the vanishing point: the road is backlit (darker), a strong veil lowers contrast,
    /// and a wide bright reflection of the sun runs down the road towards the camera.
    /// </summary>
    private unsafe void ApplyLowSun(in FrameContext ctx, Mat output)
    {
        double sev = ctx.Scene.SeverityOf(KnownConditions.LowSun);
        if (sev <= 0)
        {
            return;
        }

        SunField((0.4 + (0.2 * look.SunColumnFraction)) * width, HorizonRow - (0.025 * height), 0.05 * width, 0.3 * width, 0.09 * width, 190, 200, 0.35, widenRoad: true);
        float* field = (float*)glareField.DataPointer;
        long fieldStep = glareField.Step() / sizeof(float);
        byte* img = (byte*)output.DataPointer;
        long step = output.Step();
        double veil = 0.45 * sev, backlit = 1 - (0.4 * sev);
        for (int y = 0; y < height; y++)
        {
            byte* row = img + (y * step);
            for (int x = 0; x < width; x++)
            {
                double add = field[(y * fieldStep) + x] * sev;
                double dark = groundDistanceM[(y * width) + x] > 0 ? backlit : 1;
                row[3 * x] = ToByte((row[3 * x] * dark * (1 - veil)) + (veil * 175) + (add * 0.78));
                row[(3 * x) + 1] = ToByte((row[(3 * x) + 1] * dark * (1 - veil)) + (veil * 195) + (add * 0.92));
                row[(3 * x) + 2] = ToByte((row[(3 * x) + 2] * dark * (1 - veil)) + (veil * 210) + add);
            }
        }
    }

    /// <summary>
    /// The light of a low sun into <c>glareField</c> (grey levels to add): a core and a halo around the sun at
    /// (<paramref name="us"/>, <paramref name="vs"/>) plus its reflection on the road below the horizon, which fades
    /// with distance below the horizon over <paramref name="belowFraction"/> of the height and, with
    /// <paramref name="widenRoad"/>, widens towards the camera. The field is smooth: it is computed at 1/4 resolution
    /// and scaled up.
    /// </summary>
    private unsafe void SunField(double us, double vs, double sc, double sh, double sr, double haloGain, double roadGain, double belowFraction, bool widenRoad)
    {
        int sw = glareSmall.Cols, shh = glareSmall.Rows;
        float* small = (float*)glareSmall.DataPointer;
        long smallStep = glareSmall.Step() / sizeof(float);
        for (int y = 0; y < shh; y++)
        {
            double fy = (y * 4) + 1.5, dy = fy - vs;
            double below = fy > HorizonRow ? Math.Exp(-(fy - HorizonRow) / (belowFraction * height)) : 0;
            double spread = widenRoad ? 2 * sr * sr * (1 + ((fy - HorizonRow) / (0.2 * height))) : 2 * sr * sr;
            for (int x = 0; x < sw; x++)
            {
                double fx = (x * 4) + 1.5, dx = fx - us;
                double r2 = (dx * dx) + (dy * dy);
                double add = (255 * Math.Exp(-r2 / (2 * sc * sc))) + (haloGain * Math.Exp(-Math.Sqrt(r2) / sh));
                double road = below > 0 ? roadGain * below * Math.Exp(-(dx * dx) / spread) : 0;
                small[(y * smallStep) + x] = (float)(add + road);
            }
        }

        Cv2.Resize(glareSmall, glareField, glareField.Size(), 0, 0, InterpolationFlags.Linear);
    }
}
