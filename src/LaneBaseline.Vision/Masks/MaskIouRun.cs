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

    /// <summary>Mean IoU over truth lanes (unassigned count 0); 1 when there are no truth and no predicted lanes, 0 with predictions only.</summary>
    public double MeanIou => TruthLanes > 0 ? IouSum / TruthLanes : PredLanes == 0 ? 1.0 : 0.0;
}

/// <summary>
/// Per-lane mask IoU when truth and predictions are both mask folders: each truth mask is paired with the prediction
/// mask at the same relative path (a missing one predicts nothing), streamed one pair at a time in ordinal path order.
/// </summary>
public static class MaskIouRun
{
    /// <summary>Compares the folders; <paramref name="onLane"/> receives every truth lane's result in order.</summary>
    public static MaskIouSummary Execute(string truthDir, string predDir, Action<MaskLaneIou>? onLane, CancellationToken cancellationToken = default)
    {
        var summary = new MaskIouSummary();
        foreach (string rel in MaskFiles.List(truthDir))
        {
            cancellationToken.ThrowIfCancellationRequested();
            using OpenCvSharp.Mat truth = MaskFiles.Read(Path.Combine(truthDir, rel));
            string predPath = Path.Combine(predDir, rel);
            using OpenCvSharp.Mat? pred = File.Exists(predPath) ? MaskFiles.Read(predPath) : null;
            (List<MaskLaneIou> lanes, int predLanes) = MaskIou.Compare(rel, truth, pred);
            summary.Frames++;
            summary.PredLanes += predLanes;
            foreach (MaskLaneIou lane in lanes)
            {
                summary.TruthLanes++;
                summary.IouSum += lane.Iou;
                if (lane.PredId is not null)
                {
                    summary.Matched++;
                }

                onLane?.Invoke(lane);
            }
        }

        return summary;
    }
}
