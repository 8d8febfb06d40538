namespace LaneBaseline.Vision.Pipeline;

/// <summary>One sliding-window position in bird's-eye pixels: centroid, evidence mass and whether the fit kept it.</summary>
internal record struct SearchWindow(double X, double Y, double Mass, int Left, int Top, int Right, int Bottom, bool Inlier);
