using System.Text.Json;

namespace LaneBaseline.Core.Metrics.ConfidenceSweep;

/// <summary>The confidence sweep summed over frames.</summary>
public sealed class ConfidenceSweepTally
{
    /// <summary>True positives at IoU 0.50 per cutoff.</summary>
    public long[] TruePositives { get; } = new long[FrameConfidenceSweep.Cutoffs];

    /// <summary>Kept predictions per cutoff.</summary>
    public long[] PredLanes { get; } = new long[FrameConfidenceSweep.Cutoffs];

    /// <summary>Truth lanes of the frames added (the recall denominator at every cutoff).</summary>
    public long TruthLanes { get; private set; }

    /// <summary>Whether any prediction carried a confidence (the sweep is reported only then).</summary>
    public bool AnyConfidence { get; private set; }

    /// <summary>Adds one frame.</summary>
    public void Add(FrameScore frame)
    {
        ArgumentNullException.ThrowIfNull(frame);
        FrameConfidenceSweep f = frame.Sweep;
        for (int k = 0; k < FrameConfidenceSweep.Cutoffs; k++)
        {
            TruePositives[k] += f.TruePositives[k];
            PredLanes[k] += f.PredLanes[k];
        }

        TruthLanes += frame.TruthLanes;
        AnyConfidence |= f.HasConfidence;
    }

    /// <summary>Detection counts and rates at cutoff <paramref name="k"/>.</summary>
    public DetectionCounts At(int k) => DetectionCounts.From(TruePositives[k], PredLanes[k], TruthLanes);

    /// <summary>Writes the <c>confidence_sweep</c> array of the score JSON (nothing when no prediction carried a confidence).</summary>
    public void WriteJson(Utf8JsonWriter json)
    {
        ArgumentNullException.ThrowIfNull(json);
        if (!AnyConfidence)
        {
            return;
        }

        json.WriteStartArray("confidence_sweep");
        for (int k = 0; k < FrameConfidenceSweep.Cutoffs; k++)
        {
            json.WriteStartObject();
            json.WritePropertyName("min_score");
            ScoreJsonWriter.WriteFloat(json, (double)FrameConfidenceSweep.Cutoff(k));
            At(k).WriteJson(json);
            json.WriteEndObject();
        }

        json.WriteEndArray();
    }
}
