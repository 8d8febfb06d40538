namespace LaneBaseline.Core.Metrics;

/// <summary>One truth lane's mask IoU in a partial state: its id, the assigned prediction id (null when none) and IoU.</summary>
public readonly record struct MaskLaneState(int TruthId, int? PredId, double Iou);
