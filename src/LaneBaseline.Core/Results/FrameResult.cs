namespace LaneBaseline.Core.Results;

/// <summary>Summary of one processed frame; the lanes themselves are a loan from the pipeline until its next call.</summary>
/// <param name="LaneCount">Number of lanes detected.</param>
/// <param name="VanishingX">Vanishing-point column used, in image pixels.</param>
/// <param name="VanishingY">Vanishing-point row (the horizon) used, in image pixels.</param>
/// <param name="VanishingSource">Where the vanishing point came from.</param>
public readonly record struct FrameResult(int LaneCount, double VanishingX, double VanishingY, VanishingSource VanishingSource);
