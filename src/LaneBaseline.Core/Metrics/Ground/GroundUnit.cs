using System.Text.Json;

namespace LaneBaseline.Core.Metrics.Ground;

/// <summary>
/// Road-plane errors with <c>--camera</c> (docs/metrics.md section 6): per frame <see cref="GroundErrors.Measure"/> →
/// <see cref="FrameGroundErrors"/>, summed by <see cref="GroundTally"/>, JSON <c>ground</c>, state key <c>g</c>.
/// </summary>
public sealed class GroundUnit : IMetricUnit
{
    /// <inheritdoc />
    public string Name => "Ground";

    /// <inheritdoc />
    public string JsonKey => "ground";

    /// <inheritdoc />
    public MetricJsonSlot Slot => MetricJsonSlot.Tally;

    /// <inheritdoc />
    public void WriteJson(Utf8JsonWriter json, ScoreTally tally, SystemScore? system, ScoreSettings settings)
    {
        ArgumentNullException.ThrowIfNull(tally);
        tally.Ground?.WriteJson(json);
    }

    /// <inheritdoc />
    public void WriteFrameState(Utf8JsonWriter json, FrameScore frame)
    {
        ArgumentNullException.ThrowIfNull(frame);
        frame.Ground?.WriteState(json);
    }

    /// <inheritdoc />
    public void ReadFrameState(JsonElement entry, FrameStateSource source, FrameScore frame)
    {
        ArgumentNullException.ThrowIfNull(source);
        ArgumentNullException.ThrowIfNull(frame);

        // Present exactly when the header has a camera.
        bool has = entry.TryGetProperty("g", out JsonElement g);
        if (has != (source.Header.Settings.Camera is not null))
        {
            throw source.Bad("s.g", has ? "metric-space errors without a camera in the header" : "metric-space errors missing (the header has a camera)");
        }

        if (has)
        {
            frame.Ground = FrameGroundErrors.ReadState(g) ?? throw source.Bad("s.g", "look-ahead distances do not match this build");
        }
    }
}
