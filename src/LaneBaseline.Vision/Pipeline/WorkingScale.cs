namespace LaneBaseline.Vision.Pipeline;

/// <summary>
/// The one mapping between a frame's own pixels and the pipeline's working pixels (frames narrower than
/// <c>limits.workingWidthPx</c> are processed enlarged). Pixel centres map to pixel centres, as the bilinear
/// enlargement samples: working = (frame + 0.5)·s − 0.5 and frame = (working + 0.5) / s − 0.5, with the resize
/// stage's exact ratios s = working size / frame size per axis.
/// </summary>
/// <param name="FrameWidth">Width of the caller's frames, in their own pixels.</param>
/// <param name="FrameHeight">Height of the caller's frames, in their own pixels.</param>
/// <param name="Width">Working width in pixels.</param>
/// <param name="Height">Working height in pixels.</param>
public readonly record struct WorkingScale(int FrameWidth, int FrameHeight, int Width, int Height)
{
    /// <summary>Frames narrower than the working width are enlarged by at most this factor.</summary>
    public const double MaxEnlargement = 4;

    /// <summary>Working columns per frame column.</summary>
    public double X => (double)Width / FrameWidth;

    /// <summary>Working rows per frame row (equal to <see cref="X"/> up to the rounding of the working height).</summary>
    public double Y => (double)Height / FrameHeight;

    /// <summary>Whether the frames are processed enlarged (the working size differs from the frame's).</summary>
    public bool Enlarged => Width != FrameWidth || Height != FrameHeight;

    /// <summary>
    /// The scale for w×h frames: enlarged towards <paramref name="workingWidthPx"/> (by at most
    /// <see cref="MaxEnlargement"/>, aspect kept) when narrower, else their own size (also when the working width is 0).
    /// </summary>
    public static WorkingScale For(int frameWidth, int frameHeight, int workingWidthPx)
    {
        if (workingWidthPx <= 0 || frameWidth >= workingWidthPx)
        {
            return new WorkingScale(frameWidth, frameHeight, frameWidth, frameHeight);
        }

        double scale = Math.Min(MaxEnlargement, (double)workingWidthPx / frameWidth);
        return new WorkingScale(frameWidth, frameHeight, (int)Math.Round(frameWidth * scale), (int)Math.Round(frameHeight * scale));
    }

    /// <summary>A frame-pixel position in working pixels.</summary>
    public (double X, double Y) ToWorking(double x, double y) => (((x + 0.5) * X) - 0.5, ((y + 0.5) * Y) - 0.5);

    /// <summary>A working-pixel position in frame pixels (unchanged when not enlarged).</summary>
    public (double X, double Y) ToFrame(double x, double y) => !Enlarged ? (x, y) : (((x + 0.5) / X) - 0.5, ((y + 0.5) / Y) - 0.5);

    /// <summary>A working-pixel position in frame pixels, clamped to the frame (unchanged when not enlarged).</summary>
    public (double X, double Y) ToFrameClamped(double x, double y) => !Enlarged ? (x, y)
        : (Math.Clamp(((x + 0.5) / X) - 0.5, 0, FrameWidth - 1), Math.Clamp(((y + 0.5) / Y) - 0.5, 0, FrameHeight - 1));
}
