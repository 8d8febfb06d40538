namespace LaneBaseline.Reporting;

/// <summary>
/// The project's one colour palette (report pages, charts, overlays and their legends).
/// </summary>
/// <remarks>
/// Derived, not copied: every colour is a point in OKLCH (Ottosson 2020, "A perceptual color space for image
/// processing"), converted to sRGB and rounded to 8 bits. System colours: six hues evenly spaced 60° apart starting
/// at 54° (54, 114, 174, 234, 294, 354), chroma 0.13, lightness alternating 0.50 / 0.66 so that neighbours also
/// differ in lightness; listed starting at the 234° blue. The start hue and the lightness pair were chosen by
/// searching for the largest smallest pairwise OKLab distance under simulated protanopia and deuteranopia
/// (Machado, Oliveira &amp; Fernandes 2009, severity 1.0) while every colour keeps a WCAG 2.1 contrast of at least
/// 3:1 against the white page (Success Criterion 1.4.11, graphical objects). <c>PaletteTests</c> recomputes the
/// conversion, the separation and the contrast. The OKLCH coordinates are given beside each value.
/// </remarks>
public static class Palette
{
    /// <summary>Series colours, one per system in file order (cycles after six).</summary>
    public static readonly IReadOnlyList<string> Systems =
    [
        "#219ED5", // oklch(0.66 0.13 234)
        "#6951A5", // oklch(0.50 0.13 294)
        "#CE6E98", // oklch(0.66 0.13 354)
        "#9A4A00", // oklch(0.50 0.13 54)
        "#929A2D", // oklch(0.66 0.13 114)
        "#007A5D", // oklch(0.50 0.13 174)
    ];

    /// <summary>OKLCH coordinates (L, C, h°) of <see cref="Systems"/>, in the same order.</summary>
    public static readonly IReadOnlyList<(double L, double C, double H)> SystemsOklch =
        [(0.66, 0.13, 234), (0.50, 0.13, 294), (0.66, 0.13, 354), (0.50, 0.13, 54), (0.66, 0.13, 114), (0.50, 0.13, 174)];

    /// <summary>Neutral grey: oklch(0.50 0 0).</summary>
    public const string Grey = "#636363";

    /// <summary>Ground truth in overlays: oklch(0.64 0.15 150).</summary>
    public const string Truth = "#36A558";

    /// <summary>Predictions in overlays: oklch(0.58 0.20 350).</summary>
    public const string Prediction = "#CA358B";

    /// <summary>Severity "error": oklch(0.50 0.16 30).</summary>
    public const string Error = "#AC3225";

    /// <summary>Severity "warning": oklch(0.66 0.11 85).</summary>
    public const string Warning = "#B18C39";

    /// <summary>Severity "info" and other neutral marks: oklch(0.58 0.02 250).</summary>
    public const string Info = "#727C86";

    /// <summary>Caution banner background: oklch(0.97 0.02 75).</summary>
    public const string CautionBackground = "#FDF4E7";

    /// <summary>Caution banner edge: oklch(0.55 0.13 50).</summary>
    public const string CautionEdge = "#AC571D";

    /// <summary>Body text: oklch(0.25 0.02 250).</summary>
    public const string Ink = "#1A222B";

    /// <summary>Secondary text: oklch(0.50 0.02 250).</summary>
    public const string Muted = "#5B646F";

    /// <summary>Table rules: oklch(0.88 0.01 250).</summary>
    public const string Rule = "#D3D8DE";

    /// <summary>Table bands: oklch(0.97 0.005 250).</summary>
    public const string Band = "#F3F5F8";

    /// <summary>Chart zero line: oklch(0.38 0 0).</summary>
    public const string ZeroLine = "#424242";

    /// <summary>Chart dots: oklch(0.20 0 0).</summary>
    public const string Dots = "#161616";

    /// <summary>The page's CSS custom properties for this palette.</summary>
    public static string CssVariables =>
        ":root { --ink:" + Ink + "; --muted:" + Muted + "; --rule:" + Rule + "; --band:" + Band + "; --accent:" + Systems[0]
        + "; --caution-bg:" + CautionBackground + "; --caution-edge:" + CautionEdge + "; --truth:" + Truth + "; --pred:" + Prediction + "; --miss:" + Error + "; --fp:" + Warning + "; }\n";
}
