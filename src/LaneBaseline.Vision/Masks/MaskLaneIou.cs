namespace LaneBaseline.Vision.Masks;

/// <summary>One truth lane id of a frame and its assigned prediction id (or none) with their mask IoU.</summary>
/// <param name="Frame">Frame key (the truth mask's relative path).</param>
/// <param name="TruthId">Lane id in the truth mask.</param>
/// <param name="PredId">Assigned lane id in the prediction mask, or null.</param>
/// <param name="Iou">|T ∩ P| / |T ∪ P| in pixels; 0 when unassigned.</param>
public readonly record struct MaskLaneIou(string Frame, int TruthId, int? PredId, double Iou);
