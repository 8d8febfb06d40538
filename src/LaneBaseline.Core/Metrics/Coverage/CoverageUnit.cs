using System.Text.Json;

namespace LaneBaseline.Core.Metrics.Coverage;

/// <summary>
/// Coverage of the truth by a prediction file (docs/metrics.md section 3): counted over whole files by
/// <see cref="ScoreRun"/>'s first pass into one <see cref="FrameCoverage"/> per system, JSON <c>coverage</c> (a
/// system's object only, not a tag's); in the shard state it is the header's <c>coverage</c>, so a frame line holds nothing of it.
/// </summary>
public sealed class CoverageUnit : IMetricUnit
{
    /// <inheritdoc />
    public string Name => "Coverage";

    /// <inheritdoc />
    public string JsonKey => "coverage";

    /// <inheritdoc />
    public MetricJsonSlot Slot => MetricJsonSlot.Tally;

    /// <inheritdoc />
    public void WriteJson(Utf8JsonWriter json, ScoreTally tally, SystemScore? system, ScoreSettings settings) => system?.Coverage?.WriteJson(json, JsonKey);

    /// <inheritdoc />
    public void WriteFrameState(Utf8JsonWriter json, FrameScore frame)
    {
    }

    /// <inheritdoc />
    public void ReadFrameState(JsonElement entry, FrameStateSource source, FrameScore frame)
    {
    }
}
