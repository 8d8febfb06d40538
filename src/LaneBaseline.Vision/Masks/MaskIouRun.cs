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

/// <summary>
/// Per-lane mask IoU when truth and predictions are both mask folders: each truth mask is paired with the prediction
/// mask at the same relative path (a missing one predicts nothing), streamed one pair at a time in ordinal path order.
/// </summary>
public static class MaskIouRun
{
    /// <summary>Compares the folders; <paramref name="onLane"/> receives every truth lane's result in order.</summary>
    /// <param name="truthDir">Truth mask folder.</param>
    /// <param name="predDir">Prediction mask folder.</param>
    /// <param name="onLane">Receives every truth lane's result, in order.</param>
    /// <param name="include">Which truth masks (relative paths) to compare (a shard), or null for all.</param>
    /// <param name="onFrame">Receives each compared frame: its relative path, prediction lane count and truth lanes.</param>
    /// <param name="cancellationToken">Stops between frames.</param>
    public static MaskIouSummary Execute(
        string truthDir,
        string predDir,
        Action<MaskLaneIou>? onLane,
        Func<string, bool>? include = null,
        Action<string, int, IReadOnlyList<MaskLaneIou>>? onFrame = null,
        CancellationToken cancellationToken = default)
    {
        var summary = new MaskIouSummary();
        foreach (string rel in MaskFiles.List(truthDir))
        {
            cancellationToken.ThrowIfCancellationRequested();
            if (include is not null && !include(rel))
            {
                continue;
            }

            using OpenCvSharp.Mat truth = MaskFiles.Read(Path.Combine(truthDir, rel));
            string predPath = Path.Combine(predDir, rel);
            using OpenCvSharp.Mat? pred = File.Exists(predPath) ? MaskFiles.Read(predPath) : null;
            (List<MaskLaneIou> lanes, int predLanes) = MaskIou.Compare(rel, truth, pred);
            summary.AddFrame(predLanes, lanes);
            onFrame?.Invoke(rel, predLanes, lanes);
            if (onLane is not null)
            {
                foreach (MaskLaneIou lane in lanes)
                {
                    onLane(lane);
                }
            }
        }

        return summary;
    }
}
