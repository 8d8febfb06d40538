namespace LaneBaseline.Core.Metrics;

/// <summary>One frame's mask IoU for one system in a partial state.</summary>
/// <param name="System">Index of the system in the header.</param>
/// <param name="Frame">The mask's relative path.</param>
/// <param name="PredLanes">Prediction lane ids in the frame.</param>
/// <param name="Lanes">Every truth lane of the frame, in id order.</param>
public sealed record MaskFrameState(int System, string Frame, int PredLanes, IReadOnlyList<MaskLaneState> Lanes);
