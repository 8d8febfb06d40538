using System.Text.Json;

namespace LaneBaseline.Core.Metrics.ConfidenceSweep;

/// <summary>
/// Precision-recall over the predictions' confidence (docs/metrics.md section 1): per frame
/// <see cref="FrameConfidenceSweep.Measure"/> from the frame's assignment, summed by
/// <see cref="ConfidenceSweepTally"/>, JSON <c>confidence_sweep</c> (a system's object only, when any prediction
/// carries a confidence), state keys <c>ctp</c>, <c>cp</c> and <c>conf</c>.
/// </summary>
public sealed class ConfidenceSweepUnit : IMetricUnit
{
    /// <inheritdoc />
    public string Name => "ConfidenceSweep";

    /// <inheritdoc />
    public string JsonKey => "confidence_sweep";

    /// <inheritdoc />
    public MetricJsonSlot Slot => MetricJsonSlot.Closing;

    /// <inheritdoc />
    public void WriteJson(Utf8JsonWriter json, ScoreTally tally, SystemScore? system, ScoreSettings settings)
    {
        ArgumentNullException.ThrowIfNull(tally);
        if (system is not null)
        {
            tally.Sweep.WriteJson(json);
        }
    }

    /// <inheritdoc />
    public void WriteFrameState(Utf8JsonWriter json, FrameScore frame)
    {
        ArgumentNullException.ThrowIfNull(frame);
        frame.Sweep.WriteState(json);
    }

    /// <inheritdoc />
    public void ReadFrameState(JsonElement entry, FrameStateSource source, FrameScore frame)
    {
        ArgumentNullException.ThrowIfNull(frame);
        frame.Sweep = FrameConfidenceSweep.ReadState(entry, source, frame);
    }
}
