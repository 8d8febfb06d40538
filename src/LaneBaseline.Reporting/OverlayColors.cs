namespace LaneBaseline.Reporting;

/// <summary>The colours of the overlays, shared by the drawing code and the page's legend.</summary>
public static class OverlayColors
{
    /// <summary>Ground truth: a broad sea-green band.</summary>
    public const string TruthHex = Palette.Truth;

    /// <summary>Prediction: a thinner magenta line with dots at its points.</summary>
    public const string PredictionHex = Palette.Prediction;

    /// <summary>Regression gallery: a truth lane nobody found (a miss), a broad brick-red band with ticks across it.</summary>
    public const string MissHex = Palette.Error;

    /// <summary>Regression gallery: a prediction matching no truth lane (a false positive), an ochre dashed line.</summary>
    public const string FalsePositiveHex = Palette.Warning;

    /// <summary>Parses <c>#RRGGBB</c> into its components.</summary>
    public static (byte R, byte G, byte B) Rgb(string hex)
    {
        ArgumentNullException.ThrowIfNull(hex);
        int v = int.Parse(hex.AsSpan(1), System.Globalization.NumberStyles.HexNumber, System.Globalization.CultureInfo.InvariantCulture);
        return ((byte)(v >> 16), (byte)(v >> 8), (byte)v);
    }
}
