namespace LaneBaseline.Vision.Pipeline;

/// <summary>A line segment in image pixels (x right, y down), with its length in pixels.</summary>
internal readonly record struct HoughSegment(double X1, double Y1, double X2, double Y2, double Length);
