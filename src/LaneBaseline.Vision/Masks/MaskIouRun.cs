namespace LaneBaseline.Vision.Masks;

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
