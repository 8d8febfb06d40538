using System.Globalization;
using LaneBaseline.Reporting;
using Xunit;

namespace LaneBaseline.Reporting.Tests;

public sealed class PaletteTests
{
    private static readonly string[] Marks =
        [.. Palette.Systems, Palette.Truth, Palette.Prediction, Palette.Error, Palette.Warning, Palette.Grey, Palette.Info];

    // Source: Ottosson 2020, "A perceptual color space for image processing" (OKLab -> linear sRGB matrices), and
    // IEC 61966-2-1 (sRGB transfer function): every system colour is the 8-bit rounding of its stated OKLCH point.
    [Fact]
    public void SystemColours_AreTheirOklchPoints_ConvertedToSrgb()
    {
        Assert.Equal(Palette.Systems.Count, Palette.SystemsOklch.Count);
        for (int i = 0; i < Palette.Systems.Count; i++)
        {
            (double l, double c, double h) = Palette.SystemsOklch[i];
            Assert.Equal(Palette.Systems[i], Hex(OklchToSrgb8(l, c, h)));
        }

        // Evenly spaced hues, 60 degrees apart (the palette's derivation).
        double[] hues = [.. Palette.SystemsOklch.Select(p => p.H).Order()];
        for (int i = 1; i < hues.Length; i++)
        {
            Assert.Equal(60, hues[i] - hues[i - 1], 9);
        }
    }

    // Source: W3C WCAG 2.1, Success Criterion 1.4.11 (non-text contrast >= 3:1) with the relative luminance and
    // contrast ratio definitions of WCAG 2.1; white page background.
    [Fact]
    public void Marks_HaveAtLeastThreeToOneContrastOnTheWhitePage()
    {
        foreach (string hex in Marks)
        {
            Assert.True(Contrast(Rgb(hex), (255, 255, 255)) >= 3.0, hex + " has less than 3:1 contrast on white");
        }

        Assert.True(Contrast(Rgb(Palette.Ink), Rgb(Palette.CautionBackground)) >= 7.0, "caution text must stay readable (WCAG 1.4.6, 7:1)");
    }

    // Source: Machado, Oliveira & Fernandes 2009, "A physiologically-based model for simulation of color vision
    // deficiency", IEEE TVCG 15(6), simulation matrices at severity 1.0 (linear RGB); distances in OKLab (Ottosson 2020).
    // Threshold 0.05 OKLab: common practice for "clearly distinguishable" (from memory; a just-noticeable difference is
    // about 0.02).
    [Fact]
    public void SystemColours_StaySeparated_UnderProtanopiaAndDeuteranopia()
    {
        double[,] protan = { { 0.152286, 1.052583, -0.204868 }, { 0.114503, 0.786281, 0.099216 }, { -0.003882, -0.048116, 1.051998 } };
        double[,] deutan = { { 0.367322, 0.860646, -0.227968 }, { 0.280085, 0.672501, 0.047413 }, { -0.011820, 0.042940, 0.968881 } };
        string[] colours = [.. Palette.Systems];
        for (int i = 0; i < colours.Length; i++)
        {
            for (int j = i + 1; j < colours.Length; j++)
            {
                foreach (double[,] m in new[] { protan, deutan })
                {
                    double d = Distance(Oklab(Simulate(Rgb(colours[i]), m)), Oklab(Simulate(Rgb(colours[j]), m)));
                    Assert.True(d >= 0.05, $"{colours[i]} and {colours[j]} are only {d:F3} apart under a colour-vision deficiency");
                }
            }
        }

        // Truth and prediction overlays must also stay apart.
        foreach (double[,] m in new[] { protan, deutan })
        {
            Assert.True(Distance(Oklab(Simulate(Rgb(Palette.Truth), m)), Oklab(Simulate(Rgb(Palette.Prediction), m))) >= 0.05);
        }
    }

    private static (int R, int G, int B) OklchToSrgb8(double l, double c, double hDeg)
    {
        double a = c * Math.Cos(hDeg * Math.PI / 180), b = c * Math.Sin(hDeg * Math.PI / 180);
        double l_ = l + (0.3963377774 * a) + (0.2158037573 * b);
        double m_ = l - (0.1055613458 * a) - (0.0638541728 * b);
        double s_ = l - (0.0894841775 * a) - (1.2914855480 * b);
        double L = l_ * l_ * l_, M = m_ * m_ * m_, S = s_ * s_ * s_;
        double r = (4.0767416621 * L) - (3.3077115913 * M) + (0.2309699292 * S);
        double g = (-1.2684380046 * L) + (2.6097574011 * M) - (0.3413193965 * S);
        double bl = (-0.0041960863 * L) - (0.7034186147 * M) + (1.7076147010 * S);
        return (Encode(r), Encode(g), Encode(bl));
    }

    private static int Encode(double linear)
    {
        double x = Math.Clamp(linear, 0, 1);
        double v = x <= 0.0031308 ? 12.92 * x : (1.055 * Math.Pow(x, 1 / 2.4)) - 0.055;
        return (int)Math.Round(v * 255, MidpointRounding.AwayFromZero);
    }

    private static double Linear(int c8)
    {
        double c = c8 / 255.0;
        return c <= 0.04045 ? c / 12.92 : Math.Pow((c + 0.055) / 1.055, 2.4);
    }

    private static double Luminance((int R, int G, int B) c) => (0.2126 * Linear(c.R)) + (0.7152 * Linear(c.G)) + (0.0722 * Linear(c.B));

    private static double Contrast((int, int, int) a, (int, int, int) b)
    {
        double la = Luminance(a), lb = Luminance(b);
        return (Math.Max(la, lb) + 0.05) / (Math.Min(la, lb) + 0.05);
    }

    private static double[] Simulate((int R, int G, int B) c, double[,] m)
    {
        double[] v = [Linear(c.R), Linear(c.G), Linear(c.B)];
        var o = new double[3];
        for (int i = 0; i < 3; i++)
        {
            o[i] = Math.Clamp((m[i, 0] * v[0]) + (m[i, 1] * v[1]) + (m[i, 2] * v[2]), 0, 1);
        }

        return o;
    }

    private static double[] Oklab(double[] rgbLinear)
    {
        double r = rgbLinear[0], g = rgbLinear[1], b = rgbLinear[2];
        double l = Math.Cbrt((0.4122214708 * r) + (0.5363325363 * g) + (0.0514459929 * b));
        double m = Math.Cbrt((0.2119034982 * r) + (0.6806995451 * g) + (0.1073969566 * b));
        double s = Math.Cbrt((0.0883024619 * r) + (0.2817188376 * g) + (0.6299787005 * b));
        return
        [
            (0.2104542553 * l) + (0.7936177850 * m) - (0.0040720468 * s),
            (1.9779984951 * l) - (2.4285922050 * m) + (0.4505937099 * s),
            (0.0259040371 * l) + (0.7827717662 * m) - (0.8086757660 * s),
        ];
    }

    private static double Distance(double[] p, double[] q) => Math.Sqrt(((p[0] - q[0]) * (p[0] - q[0])) + ((p[1] - q[1]) * (p[1] - q[1])) + ((p[2] - q[2]) * (p[2] - q[2])));

    private static (int R, int G, int B) Rgb(string hex) =>
        (int.Parse(hex.AsSpan(1, 2), NumberStyles.HexNumber, CultureInfo.InvariantCulture),
         int.Parse(hex.AsSpan(3, 2), NumberStyles.HexNumber, CultureInfo.InvariantCulture),
         int.Parse(hex.AsSpan(5, 2), NumberStyles.HexNumber, CultureInfo.InvariantCulture));

    private static string Hex((int R, int G, int B) c) => string.Create(CultureInfo.InvariantCulture, $"#{c.R:X2}{c.G:X2}{c.B:X2}");
}
