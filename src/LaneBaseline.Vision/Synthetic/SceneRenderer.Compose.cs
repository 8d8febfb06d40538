using LaneBaseline.Core.Random;
using OpenCvSharp;

namespace LaneBaseline.Vision.Synthetic;

/// <summary>Composing the layers (surface, paint, shadows) into the output frame.</summary>
public sealed partial class SceneRenderer
{
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
