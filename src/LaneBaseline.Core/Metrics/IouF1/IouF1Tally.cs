using System.Text.Json;

namespace LaneBaseline.Core.Metrics.IouF1;

/// <summary>The rasterised-IoU detection counts summed over frames: TP/FP/FN, precision, recall and F1 per threshold, and mF1.</summary>
public sealed class IouF1Tally
{
    private readonly IouThreshold[] thresholds;

    /// <summary>Creates an empty tally for the given thresholds (the order of <see cref="FrameIouF1.TruePositives"/>).</summary>
    public IouF1Tally(IReadOnlyList<IouThreshold> thresholds)
    {
        ArgumentNullException.ThrowIfNull(thresholds);
        this.thresholds = [.. thresholds];
        TruePositives = new long[this.thresholds.Length];
    }

    /// <summary>The thresholds of <see cref="TruePositives"/>.</summary>
    public IReadOnlyList<IouThreshold> Thresholds => thresholds;

    /// <summary>True positives per threshold.</summary>
    public long[] TruePositives { get; }

    /// <summary>Truth lanes of the frames added.</summary>
    public long TruthLanes { get; private set; }

    /// <summary>Predicted lanes of the frames added.</summary>
    public long PredLanes { get; private set; }

    /// <summary>Adds one frame.</summary>
    public void Add(FrameScore frame)
    {
        ArgumentNullException.ThrowIfNull(frame);
        int[] tp = frame.IouF1.TruePositives;
        for (int k = 0; k < TruePositives.Length; k++)
        {
            TruePositives[k] += tp[k];
        }

        TruthLanes += frame.TruthLanes;
        PredLanes += frame.PredLanes;
    }

    /// <summary>Detection counts and rates at threshold index <paramref name="k"/>.</summary>
    public DetectionCounts At(int k) => DetectionCounts.From(TruePositives[k], PredLanes, TruthLanes);

    /// <summary>Detection counts at a threshold.</summary>
    public DetectionCounts At(IouThreshold t) => At(Array.IndexOf(thresholds, t));

    /// <summary>Mean F1 over 0.50, 0.55, …, 0.95.</summary>
    public double MeanF1
    {
        get
        {
            double sum = 0;
            foreach (IouThreshold t in IouThreshold.MeanF1Set)
            {
                sum += At(t).F1;
            }

            return sum / IouThreshold.MeanF1Set.Count;
        }
    }

    /// <summary>
    /// Writes the <c>iou_f1</c> object of the score JSON; the lane width is the override, else that of the frames'
    /// common width, else null (mixed sizes).
    /// </summary>
    public void WriteJson(Utf8JsonWriter json, ScoreSettings settings, int? commonWidth)
    {
        ArgumentNullException.ThrowIfNull(json);
        ArgumentNullException.ThrowIfNull(settings);
        json.WriteStartObject("iou_f1");
        int? width = settings.LaneWidthPx ?? (commonWidth is int w ? settings.LaneWidthFor(w) : null);
        if (width is int wp)
        {
            json.WriteNumber("width_px", wp);
        }
        else
        {
            json.WriteNull("width_px");
        }

        json.WriteStartObject("thresholds");
        for (int k = 0; k < thresholds.Length; k++)
        {
            json.WriteStartObject(thresholds[k].Key);
            At(k).WriteJson(json);
            json.WriteEndObject();
        }

        json.WriteEndObject();
        json.WritePropertyName("mf1");
        ScoreJsonWriter.WriteFloat(json, MeanF1);
        json.WriteEndObject();
    }
}
