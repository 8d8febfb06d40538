namespace LaneBaseline.Core.Options;

/// <summary>Sliding-window search in the bird's-eye image (all pixel values are bird's-eye pixels).</summary>
public sealed record SearchOptions
{
    /// <summary>Number of windows stacked from the bottom to the top of the bird's-eye image (4–64). Default 16.</summary>
    public int WindowCount { get; init; } = 16;

    /// <summary>Half width of a window, in bird's-eye pixels (2–200). Default 14.</summary>
    public int WindowHalfWidthPx { get; init; } = 14;

    /// <summary>Evidence a window needs to count and re-centre, in fully-set pixels (1–10000). Default 6.</summary>
    public double MinWindowMass { get; init; } = 6;

    /// <summary>Share of the bird's-eye rows, from the bottom, summed into the start histogram (0.1–1). Default 0.6.</summary>
    public double HistogramRowsFraction { get; init; } = 0.6;

    /// <summary>Smallest histogram peak that starts a search, in fully-set pixels (1–10000). Default 12.</summary>
    public double MinPeakMass { get; init; } = 12;

    /// <summary>Smallest distance between two boundaries, in bird's-eye pixels (4–1000). Default 30.</summary>
    public int MinSeparationPx { get; init; } = 30;

    /// <summary>Smallest plausible ego-lane width, as a fraction of the bird's-eye width (0.01–1). Default 0.12.</summary>
    public double MinLaneWidthFraction { get; init; } = 0.12;

    /// <summary>Largest plausible ego-lane width, as a fraction of the bird's-eye width (0.01–1). Default 0.5.</summary>
    public double MaxLaneWidthFraction { get; init; } = 0.5;

    /// <summary>Allowed relative difference between neighbouring lane widths (0–1). Default 0.3.</summary>
    public double WidthTolerance { get; init; } = 0.3;

    /// <summary>Largest number of boundaries reported (1–6: slots −1, +1, then −2, +2, then −3, +3). Default 4 (the near boundaries, the ones the evaluation counts; docs/detect.md).</summary>
    public int MaxLanes { get; init; } = 4;

    /// <summary>Whether to estimate each lane's marking type (solid or dashed) from its window coverage (true/false). Default true.</summary>
    public bool EstimateKind { get; init; } = true;

    internal void Validate(List<OptionsFinding> f)
    {
        OptionsChecks.Range(f, "search.windowCount", WindowCount, 4, 64);
        OptionsChecks.Range(f, "search.windowHalfWidthPx", WindowHalfWidthPx, 2, 200);
        OptionsChecks.Range(f, "search.minWindowMass", MinWindowMass, 1, 10000);
        OptionsChecks.Range(f, "search.histogramRowsFraction", HistogramRowsFraction, 0.1, 1);
        OptionsChecks.Range(f, "search.minPeakMass", MinPeakMass, 1, 10000);
        OptionsChecks.Range(f, "search.minSeparationPx", MinSeparationPx, 4, 1000);
        OptionsChecks.Range(f, "search.minLaneWidthFraction", MinLaneWidthFraction, 0.01, 1);
        OptionsChecks.Range(f, "search.maxLaneWidthFraction", MaxLaneWidthFraction, 0.01, 1);
        OptionsChecks.Less(f, "search.minLaneWidthFraction", MinLaneWidthFraction, "search.maxLaneWidthFraction", MaxLaneWidthFraction);
        OptionsChecks.Range(f, "search.widthTolerance", WidthTolerance, 0, 1);
        OptionsChecks.Range(f, "search.maxLanes", MaxLanes, 1, 6);
    }
}
