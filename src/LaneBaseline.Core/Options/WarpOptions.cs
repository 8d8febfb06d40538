namespace LaneBaseline.Core.Options;

/// <summary>
/// Bird's-eye warp of the binary evidence. The source is a trapezoid whose sides meet at the vanishing point, so
/// road lines parallel to the vehicle become vertical columns of the warped image (an affine image of the ground).
/// </summary>
public sealed record WarpOptions
{
    /// <summary>Width of the bird's-eye image, in pixels (64–2048). Default 480.</summary>
    public int WidthPx { get; init; } = 480;

    /// <summary>Height of the bird's-eye image, in pixels (64–2048). Default 320.</summary>
    public int HeightPx { get; init; } = 320;

    /// <summary>Far edge of the warped area: fraction of the way from the horizon row to the bottom row (0.01–0.9). Default 0.1.</summary>
    public double FarRowFraction { get; init; } = 0.1;

    /// <summary>Width of the trapezoid at the bottom row, as a multiple of the frame width (0.5–6). Default 4.2.</summary>
    public double BottomSpanFraction { get; init; } = 4.2;

    internal void Validate(List<OptionsFinding> f)
    {
        OptionsChecks.Range(f, "warp.widthPx", WidthPx, 64, 2048);
        OptionsChecks.Range(f, "warp.heightPx", HeightPx, 64, 2048);
        OptionsChecks.Range(f, "warp.farRowFraction", FarRowFraction, 0.01, 0.9);
        OptionsChecks.Range(f, "warp.bottomSpanFraction", BottomSpanFraction, 0.5, 6);
    }
}
