using System.Text.Json;

namespace LaneBaseline.Core.Metrics.Calibration;

/// <summary>
/// Calibration of the lanes' scores (docs/metrics.md section 4): per frame <see cref="ReliabilityTally.OfFrame"/>
/// (scored lanes and their IoU 0.50 outcome), summed by <see cref="ReliabilityTally"/>, JSON <c>calibration</c>,
/// state keys <c>ps</c> and <c>ph</c>.
/// </summary>
public sealed class CalibrationUnit : IMetricUnit
{
    /// <inheritdoc />
    public string Name => "Calibration";

    /// <inheritdoc />
    public string JsonKey => "calibration";

    /// <inheritdoc />
    public MetricJsonSlot Slot => MetricJsonSlot.Closing;

    /// <inheritdoc />
    public void WriteJson(Utf8JsonWriter json, ScoreTally tally, SystemScore? system, ScoreSettings settings)
    {
        ArgumentNullException.ThrowIfNull(tally);
        tally.Reliability.WriteJson(json);
    }

    /// <inheritdoc />
    public void WriteFrameState(Utf8JsonWriter json, FrameScore frame) => ReliabilityTally.WriteFrameState(json, frame);

    /// <inheritdoc />
    public void ReadFrameState(JsonElement entry, FrameStateSource source, FrameScore frame)
    {
        ArgumentNullException.ThrowIfNull(source);
        ArgumentNullException.ThrowIfNull(frame);
        (double[] laneScores, bool[] laneHits) = ReliabilityTally.ReadFrameState(entry);
        if (laneScores.Length != laneHits.Length || laneScores.Length > frame.PredLanes)
        {
            throw source.Bad("s.ps", "scored lanes and their outcomes differ in count or exceed the predicted lanes");
        }

        frame.LaneScores = laneScores;
        frame.LaneHits = laneHits;
    }
}
