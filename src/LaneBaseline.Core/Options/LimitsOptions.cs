namespace LaneBaseline.Core.Options;

/// <summary>
/// Accepted frame sizes (frames outside are bad input: exit 3, or skipped with <c>--keep-going</c>) and the working
/// width frames are resized to before the stages run.
/// </summary>
public sealed record LimitsOptions
{
    /// <summary>Smallest accepted frame width, in pixels (16–100000). Default 64.</summary>
    public int MinWidthPx { get; init; } = 64;

    /// <summary>Smallest accepted frame height, in pixels (16–100000). Default 48.</summary>
    public int MinHeightPx { get; init; } = 48;

    /// <summary>Largest accepted frame width, in pixels (16–100000). Default 8192.</summary>
    public int MaxWidthPx { get; init; } = 8192;

    /// <summary>Largest accepted frame height, in pixels (16–100000). Default 8192.</summary>
    public int MaxHeightPx { get; init; } = 8192;

    /// <summary>
    /// Frames narrower than this are enlarged (bilinear, by at most 4x) to this width, aspect kept, before the stages run, and the lanes
    /// are scaled back to the frame's own pixels; 0 processes every frame at its own size (0 or 320–4096). Default 1280:
    /// the stages' pixel settings were set on 1280x720 frames, and on rendered 640x360 frames processing at 1280 wide
    /// raised F1@0.50 from 0.60 to 0.75 (docs/detect.md). Wider frames are processed at their own size.
    /// </summary>
    public int WorkingWidthPx { get; init; } = 1280;

    internal void Validate(List<OptionsFinding> f)
    {
        if (WorkingWidthPx != 0)
        {
            OptionsChecks.Range(f, "limits.workingWidthPx", WorkingWidthPx, 320, 4096);
        }

        OptionsChecks.Range(f, "limits.minWidthPx", MinWidthPx, 16, 100000);
        OptionsChecks.Range(f, "limits.minHeightPx", MinHeightPx, 16, 100000);
        OptionsChecks.Range(f, "limits.maxWidthPx", MaxWidthPx, 16, 100000);
        OptionsChecks.Range(f, "limits.maxHeightPx", MaxHeightPx, 16, 100000);
        OptionsChecks.Less(f, "limits.minWidthPx", MinWidthPx, "limits.maxWidthPx", MaxWidthPx);
        OptionsChecks.Less(f, "limits.minHeightPx", MinHeightPx, "limits.maxHeightPx", MaxHeightPx);
    }
}
