namespace LaneBaseline.Core.Geometry;

/// <summary>An image point (pixels, x right, y down) with the ground point it shows (metres, X forward, Y left).</summary>
/// <param name="U">Image column in pixels.</param>
/// <param name="V">Image row in pixels.</param>
/// <param name="GroundXM">Ground X (forward) in metres.</param>
/// <param name="GroundYM">Ground Y (left) in metres.</param>
public readonly record struct CameraControlPoint(double U, double V, double GroundXM, double GroundYM);
