namespace LaneBaseline.Core.Options;

/// <summary>Accepted frame sizes; frames outside are bad input (exit 3, or skipped with <c>--keep-going</c>).</summary>
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

    internal void Validate(List<OptionsFinding> f)
    {
        OptionsChecks.Range(f, "limits.minWidthPx", MinWidthPx, 16, 100000);
        OptionsChecks.Range(f, "limits.minHeightPx", MinHeightPx, 16, 100000);
        OptionsChecks.Range(f, "limits.maxWidthPx", MaxWidthPx, 16, 100000);
        OptionsChecks.Range(f, "limits.maxHeightPx", MaxHeightPx, 16, 100000);
        OptionsChecks.Less(f, "limits.minWidthPx", MinWidthPx, "limits.maxWidthPx", MaxWidthPx);
        OptionsChecks.Less(f, "limits.minHeightPx", MinHeightPx, "limits.maxHeightPx", MaxHeightPx);
    }
}
