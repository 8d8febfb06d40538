using System.Globalization;
using System.Text.Json;

namespace LaneBaseline.Core.Metrics.IouF1;

/// <summary>
/// One frame's rasterised-IoU detection counts: the pairs of the frame's one Hungarian assignment
/// (<see cref="FrameAssignment"/>) that meet each threshold.
/// </summary>
/// <param name="TruePositives">True positives per threshold, in the order of <see cref="ScoreSettings.Thresholds"/>.</param>
/// <param name="AssignedIous">IoU of each assigned truth/prediction pair (IoU matrix values, in truth order).</param>
public sealed record FrameIouF1(int[] TruePositives, double[] AssignedIous)
{
    /// <summary>No counts at all (a placeholder until a frame is scored or read).</summary>
    public static FrameIouF1 Empty { get; } = new([], []);

    /// <summary>Mean IoU of the assigned pairs with IoU &gt; 0, or NaN when there are none.</summary>
    public double MeanMatchedIou
    {
        get
        {
            double sum = 0;
            int n = 0;
            foreach (double iou in AssignedIous)
            {
                if (iou > 0)
                {
                    sum += iou;
                    n++;
                }
            }

            return n == 0 ? double.NaN : sum / n;
        }
    }

    /// <summary>Counts the assigned pairs meeting each threshold (compared exactly on the pixel counts).</summary>
    public static FrameIouF1 Measure(FrameAssignment frame, IReadOnlyList<IouThreshold> thresholds)
    {
        ArgumentNullException.ThrowIfNull(frame);
        ArgumentNullException.ThrowIfNull(thresholds);
        int nt = frame.Truth.Count, np = frame.Pred.Count;
        var tp = new int[thresholds.Count];
        var assigned = new List<double>(Math.Min(nt, np));
        for (int i = 0; i < nt; i++)
        {
            int j = frame.Assignment[i];
            if (j < 0)
            {
                continue;
            }

            assigned.Add(frame.Iou[(i * np) + j]);
            long n = frame.Intersections[(i * np) + j];
            long u = frame.Union(i, j);
            for (int k = 0; k < tp.Length; k++)
            {
                if (thresholds[k].IsMetBy(n, u))
                {
                    tp[k]++;
                }
            }
        }

        return new FrameIouF1(tp, [.. assigned]);
    }

    /// <summary>Writes the frame's keys of a shard state's frame line: <c>tp</c> and <c>iou</c> (full precision).</summary>
    public void WriteState(Utf8JsonWriter json)
    {
        ArgumentNullException.ThrowIfNull(json);
        json.WriteStartArray("tp");
        foreach (int v in TruePositives)
        {
            json.WriteNumberValue(v);
        }

        json.WriteEndArray();
        json.WriteStartArray("iou");
        foreach (double v in AssignedIous)
        {
            json.WriteRawValue(v.ToString("R", CultureInfo.InvariantCulture));
        }

        json.WriteEndArray();
    }

    /// <summary>
    /// Reads what <see cref="WriteState"/> wrote for <paramref name="frame"/> (whose lane counts are read): one count
    /// per threshold of the header, none above min(truth, predicted), at most that many assigned IoUs, each in [0, 1].
    /// </summary>
#pragma warning disable IDISP004 // JsonElement array enumerators own no resources
    public static FrameIouF1 ReadState(JsonElement entry, FrameStateSource source, FrameScore frame)
    {
        ArgumentNullException.ThrowIfNull(source);
        ArgumentNullException.ThrowIfNull(frame);
        int[] tp = [.. entry.GetProperty("tp").EnumerateArray().Select(v => v.GetInt32())];
        if (tp.Length != source.Header.Settings.Thresholds.Count)
        {
            throw source.Bad("s.tp", "threshold count does not match the header");
        }

        int nt = frame.TruthLanes, np = frame.PredLanes;
        if (nt < 0 || np < 0 || tp.Any(v => v < 0 || v > Math.Min(nt, np)))
        {
            throw source.Bad("s.tp", "counts are negative or exceed the lane counts");
        }

        double[] ious = [.. entry.GetProperty("iou").EnumerateArray().Select(v => v.GetDouble())];
        if (ious.Length > Math.Min(nt, np) || ious.Any(v => !(v >= 0 && v <= 1)))
        {
            throw source.Bad("s.iou", $"frame '{frame.Frame}': {ious.Length.ToString(CultureInfo.InvariantCulture)} assigned IoUs for {nt.ToString(CultureInfo.InvariantCulture)} truth and {np.ToString(CultureInfo.InvariantCulture)} predicted lanes, or an IoU outside [0, 1]");
        }

        return new FrameIouF1(tp, ious);
    }
#pragma warning restore IDISP004
}
