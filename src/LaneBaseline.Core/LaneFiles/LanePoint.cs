namespace LaneBaseline.Core.LaneFiles;

/// <summary>A lane point in pixel coordinates: x right, y down, the centre of the top-left pixel is (0, 0).</summary>
/// <param name="X">Column coordinate in pixels.</param>
/// <param name="Y">Row coordinate in pixels.</param>
public readonly record struct LanePoint(double X, double Y);
