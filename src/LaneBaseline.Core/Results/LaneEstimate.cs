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
/// <param name="EvidenceKeptShare">Share (0–1) of the frame's marking-evidence pixels left after the orientation test
/// cleared runs turned towards the image vertical away from the vanishing point (reflection suppression); 1 when nothing
/// was cleared, NaN when not measured. Low values mean a frame full of reflections.</param>
/// <param name="HeadingDeviationDeg">Angle of the fit's tangent at the bottom bird's-eye row from the bird's-eye vertical,
/// in degrees of bird's-eye pixels (0–90): a boundary that agrees with the vanishing point runs straight up the bird's-eye
/// view; NaN when not measured.</param>
/// <param name="ParallelDeviationPx">Agreement with the other boundaries: the smallest, over the frame's other reported
/// lanes, mean absolute change of the bird's-eye spacing between the two fits from the bottom row up the image (sampled
/// over the bottom two thirds), in bird's-eye pixels; NaN when the lane is alone.</param>
/// <param name="JointShare">Agreement with the joint multi-boundary model (shared heading and curvature): the share (0–1)
/// of the window mass the lane's own fit took that lies within the inlier distance of its joint curve; NaN when the
/// lane is alone or the joint model is off.</param>
/// <param name="FanOut">Where the lane's direction in the bird's-eye view lies between the road's direction (0: parallel
/// to the other boundaries, or to the bird's-eye vertical for a lone lane) and the ray from the camera's ground point
/// through its bottom end (1: fanning out like an image-vertical streak); clamped to 0–1; NaN when the two directions
/// nearly coincide (near the camera's column) and nothing can be told.</param>
/// <param name="UnusedCandidates">Ambiguity of the frame: fitted, distinct candidate boundaries the slot assignment did
/// not report (streaks, tar seams, far lines the width and parallel checks refused); NaN when not measured.</param>
/// <param name="MarkingContrast">Median Weber contrast of the lane's evidence runs against the road beside them (blurred
/// grey; 0 when no row has evidence); NaN when not measured.</param>
/// <param name="WidthMismatch">Median |log2(evidence run width / perspective marking width)| over the lane's rows with
/// evidence: 0 for paint of the expected width; NaN when not measured.</param>
/// <param name="PaintShare">Share (0–1) of the lane's evidence pixels that passed a white or yellow colour test (the rest
/// passed the ridge test alone); NaN when not measured.</param>
/// <param name="NearSupport">Share (0–1) of the lane's image rows in the near half of the region that have evidence
/// within a marking width of it; NaN when not measured.</param>
/// <param name="ExtrapolatedShare">Share (0–1) of the lane's image rows in the frame that lie below (nearer than) its
/// nearest row with evidence within a marking width of it: the part of its image extrapolated towards the camera; 1 when
/// no row has evidence; NaN when not measured.</param>
/// <param name="BottomLeverage">Leverage of the extrapolation to the bottom row: the distance of the lane's bottom row
/// from the mean of its rows with evidence, in standard deviations of those rows (about 1.7 when measured evenly over its
/// length, large when measured only far away; capped at 50, also the value with fewer than two such rows); NaN when not
/// measured.</param>
public readonly record struct LaneEstimate(
    int Slot,
    double Score,
    Quadratic Fit,
    double InlierMass,
    double Coverage,
    double RmsPx,
    int PointCount,
    string? Kind = null,
    double EvidenceKeptShare = double.NaN,
    double HeadingDeviationDeg = double.NaN,
    double ParallelDeviationPx = double.NaN,
    double JointShare = double.NaN,
    double FanOut = double.NaN,
    double UnusedCandidates = double.NaN,
    double MarkingContrast = double.NaN,
    double WidthMismatch = double.NaN,
    double PaintShare = double.NaN,
    double NearSupport = double.NaN,
    double ExtrapolatedShare = double.NaN,
    double BottomLeverage = double.NaN);
