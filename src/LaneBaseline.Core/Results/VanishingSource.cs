namespace LaneBaseline.Core.Results;

/// <summary>Where a frame's vanishing point (and so its horizon, region of interest and warp) came from.</summary>
public enum VanishingSource
{
    /// <summary>The preset point (too little line evidence, or estimation switched off).</summary>
    Preset = 0,

    /// <summary>Estimated from this frame's Hough segments.</summary>
    Estimated = 1,

    /// <summary>Estimated and smoothed over the sequence.</summary>
    Smoothed = 2,

    /// <summary>From the camera file: the image of the point at infinity straight ahead on the road.</summary>
    Camera = 3,
}
