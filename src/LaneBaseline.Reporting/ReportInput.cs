using LaneBaseline.Reporting.Score;

namespace LaneBaseline.Reporting;

/// <summary>Everything the HTML report shows. Nothing in it is read from the clock or the machine by the writer.</summary>
public sealed record ReportInput
{
    /// <summary>The parsed score results, or null for a page of audit findings only.</summary>
    public ScoreDocument? Score { get; init; }

    /// <summary>Where the score results came from, as the user named it (null without score results).</summary>
    public string? ScoreSource { get; init; }

    /// <summary>The summarised audit findings, or null when none were given.</summary>
    public Audit.AuditSummary? Audit { get; init; }

    /// <summary>Per-stage cost from <c>bench --json</c>, or null when not given.</summary>
    public Bench.BenchSummary? Bench { get; init; }

    /// <summary>The "generated at" time printed in the page (injected, so the page is reproducible).</summary>
    public required DateTimeOffset GeneratedAt { get; init; }

    /// <summary>Versions of the tool and the libraries that made the page, in display order.</summary>
    public IReadOnlyList<KeyValuePair<string, string>> Versions { get; init; } = [];

    /// <summary>Settings of the report itself (inputs, caps), in display order.</summary>
    public IReadOnlyList<KeyValuePair<string, string>> ReportSettings { get; init; } = [];

    /// <summary>The worst-frame gallery, or null when it was not requested.</summary>
    public Gallery? Gallery { get; init; }
}

/// <summary>The worst-frame gallery: thumbnails already drawn (the report itself draws nothing on images).</summary>
/// <param name="Frames">Thumbnails grouped by system, worst first within a system.</param>
/// <param name="Selection">One sentence saying how frames were chosen and the size caps.</param>
public sealed record Gallery(IReadOnlyList<GalleryFrame> Frames, string Selection)
{
    /// <summary>The per-condition gallery (worst frames of the first system per truth tag), or null when not built.</summary>
    public ConditionGallery? ByTag { get; init; }

    /// <summary>Frames where the network does worst against the baseline, or null (one system, or not built).</summary>
    public RegressionGallery? Regressions { get; init; }
}

/// <summary>One frame of the regression gallery.</summary>
/// <param name="Thumb">The network's thumbnail (true positives, false positives and misses drawn apart) and its counts.</param>
/// <param name="BaselineF1">The baseline's frame F1 at IoU 0.50.</param>
/// <param name="FullSizeHref">Relative link to the full-size overlay written beside the page, or null.</param>
public sealed record RegressionFrame(GalleryFrame Thumb, double BaselineF1, string? FullSizeHref)
{
    /// <summary>Network frame F1 − baseline frame F1 (negative: the network is worse).</summary>
    public double Delta => Thumb.F1 - BaselineF1;
}

/// <summary>The "largest regressions" gallery: frames ranked by (network − baseline) frame F1, worst first.</summary>
/// <param name="Network">The system checked.</param>
/// <param name="Baseline">The system it is checked against.</param>
/// <param name="Frames">The shown frames, worst first.</param>
/// <param name="Worse">Frames where the network's frame F1 is below the baseline's.</param>
/// <param name="Better">Frames where it is above.</param>
/// <param name="Total">Frames compared.</param>
/// <param name="Selection">One sentence: how the frames were chosen, the caps.</param>
public sealed record RegressionGallery(string Network, string Baseline, IReadOnlyList<RegressionFrame> Frames, int Worse, int Better, int Total, string Selection);

/// <summary>Worst frames per truth tag (condition) for one system: the same thumbnails as the gallery, grouped by tag.</summary>
/// <param name="System">The system whose frames are shown (the first one scored).</param>
/// <param name="Groups">One group per shown tag, in the order of the per-tag chart.</param>
/// <param name="TagsLeftOut">Tags present in the truth but not shown because of the cap, in ordinal order.</param>
/// <param name="Selection">One sentence saying how frames were chosen and the caps.</param>
public sealed record ConditionGallery(string System, IReadOnlyList<ConditionGroup> Groups, IReadOnlyList<string> TagsLeftOut, string Selection);

/// <summary>The worst frames carrying one tag.</summary>
/// <param name="Tag">The truth tag.</param>
/// <param name="Frames">Number of truth frames carrying the tag.</param>
/// <param name="Worst">Thumbnails, worst first; empty when every frame with the tag scores perfectly.</param>
public sealed record ConditionGroup(string Tag, int Frames, IReadOnlyList<GalleryFrame> Worst);

/// <summary>One thumbnail of the gallery with the scores that ranked it.</summary>
/// <param name="System">System whose prediction is drawn.</param>
/// <param name="Frame">Frame key.</param>
/// <param name="Tags">Truth tags of the frame.</param>
/// <param name="Tp">True positives at IoU 0.50.</param>
/// <param name="Fp">False positives at IoU 0.50.</param>
/// <param name="Fn">False negatives at IoU 0.50.</param>
/// <param name="F1">Frame F1 at IoU 0.50.</param>
/// <param name="PointAccuracy">Frame point accuracy, NaN without truth lanes.</param>
/// <param name="Jpeg">The thumbnail, JPEG-encoded.</param>
/// <param name="Width">Thumbnail width in pixels.</param>
/// <param name="Height">Thumbnail height in pixels.</param>
public sealed record GalleryFrame(
    string System,
    string Frame,
    IReadOnlyList<string> Tags,
    long Tp,
    long Fp,
    long Fn,
    double F1,
    double PointAccuracy,
    ReadOnlyMemory<byte> Jpeg,
    int Width,
    int Height);

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
