namespace LaneBaseline.Core.Results;

/// <summary>One detected lane boundary of a frame, with the evidence behind its confidence.</summary>
/// <param name="Slot">Signed position: −1 left ego boundary, +1 right, ±2 the next boundaries out.</param>
/// <param name="Score">Confidence in [0, 1].</param>
/// <param name="Fit">Curve in bird's-eye pixels (x = A·y² + B·y + C, y down).</param>
/// <param name="InlierMass">Evidence in the inlier windows, in fully-set bird's-eye pixels.</param>
/// <param name="Coverage">Share of the search windows that held evidence and agreed with the fit (0–1).</param>
/// <param name="RmsPx">Weighted RMS distance of the inlier window centroids from the curve, in bird's-eye pixels.</param>
/// <param name="PointCount">Number of image points written for this lane.</param>
/// <param name="Kind">Estimated marking type (<c>solid</c> or <c>dashed</c>), or null when not estimated.</param>
public readonly record struct LaneEstimate(
    int Slot,
    double Score,
    Quadratic Fit,
    double InlierMass,
    double Coverage,
    double RmsPx,
    int PointCount,
    string? Kind = null);
