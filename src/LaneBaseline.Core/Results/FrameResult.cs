namespace LaneBaseline.Core.Results;

/// <summary>
/// One processed frame: its finished lanes (in the frame's own pixels, points rounded to 0.01 px and scores to 4
/// digits, exactly as lane files carry them) and the vanishing point used.
/// </summary>
/// <param name="LaneCount">Number of lanes detected.</param>
/// <param name="VanishingX">Vanishing-point column used, in image pixels.</param>
/// <param name="VanishingY">Vanishing-point row (the horizon) used, in image pixels.</param>
/// <param name="VanishingSource">Where the vanishing point came from.</param>
public readonly record struct FrameResult(int LaneCount, double VanishingX, double VanishingY, VanishingSource VanishingSource)
{
    private readonly IReadOnlyList<LaneFiles.Lane>? lanes;

    /// <summary>The frame's lanes, owned by the caller (never null).</summary>
    public IReadOnlyList<LaneFiles.Lane> Lanes { get => lanes ?? []; init => lanes = value; }
}
