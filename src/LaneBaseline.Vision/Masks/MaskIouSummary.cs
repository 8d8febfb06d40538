namespace LaneBaseline.Vision.Masks;

/// <summary>Mean mask IoU of one prediction folder against a truth folder.</summary>
public sealed class MaskIouSummary
{
    /// <summary>Truth masks compared.</summary>
    public long Frames { get; internal set; }

    /// <summary>Truth lane ids over all frames.</summary>
    public long TruthLanes { get; internal set; }

    /// <summary>Prediction lane ids over the compared frames.</summary>
    public long PredLanes { get; internal set; }

    /// <summary>Truth lanes with an assigned prediction of IoU above 0.</summary>
    public long Matched { get; internal set; }

    /// <summary>Sum of per-truth-lane IoU (0 for unassigned).</summary>
    public double IouSum { get; internal set; }

    /// <summary>Adds one frame: its prediction lane count and every truth lane's result, in order.</summary>
    public void AddFrame(int predLanes, IEnumerable<MaskLaneIou> lanes)
    {
        ArgumentNullException.ThrowIfNull(lanes);
        Frames++;
        PredLanes += predLanes;
        foreach (MaskLaneIou lane in lanes)
        {
            TruthLanes++;
            IouSum += lane.Iou;
            if (lane.PredId is not null)
            {
                Matched++;
            }
        }
    }

    /// <summary>Mean IoU over truth lanes (unassigned count 0); 1 when there are no truth and no predicted lanes, 0 with predictions only.</summary>
    public double MeanIou => TruthLanes > 0 ? IouSum / TruthLanes : PredLanes == 0 ? 1.0 : 0.0;
}
