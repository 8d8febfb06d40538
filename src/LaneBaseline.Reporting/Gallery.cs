namespace LaneBaseline.Reporting;

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
