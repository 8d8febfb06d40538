using System.Text.Json;

namespace LaneBaseline.Core.Metrics;

/// <summary>
/// One metric as one unit (DEVELOPERS.md, "Adding a metric"): the folder <c>Metrics/&lt;Name&gt;/</c> holding its
/// per-frame computation, its tally, its bootstrap columns and statistics, its part of the score JSON and its part of
/// the shard state. The score JSON writer, the per-frame CSV writer, the shard state writer and reader and the
/// bootstrap (<see cref="BootstrapSeries"/>, <see cref="Bootstrap"/>) iterate <see cref="MetricCatalogue.Units"/>
/// and call these members.
/// </summary>
public interface IMetricUnit
{
    /// <summary>The unit's folder under <c>src/LaneBaseline.Core/Metrics/</c> (and its row in docs/metrics.md section 8).</summary>
    string Name { get; }

    /// <summary>The key of its object in the score JSON.</summary>
    string JsonKey { get; }

    /// <summary>Where in a system's (or a tag's) object of the score JSON its part is written.</summary>
    MetricJsonSlot Slot { get; }

    /// <summary>
    /// Writes its part of the score JSON for a tally (nothing when it has nothing to say); <paramref name="system"/>
    /// is the system whose overall tally this is, or null for a tag's tally.
    /// </summary>
    void WriteJson(Utf8JsonWriter json, ScoreTally tally, SystemScore? system, ScoreSettings settings);

    /// <summary>The columns it adds to each row of the per-frame CSV (<c>score --csv</c>), in order; none by default.</summary>
    IReadOnlyList<string> CsvColumns => [];

    /// <summary>
    /// Writes its cells of a frame's CSV row, each preceded by a comma (one per <see cref="CsvColumns"/>);
    /// <paramref name="halfIndex"/> is the position of IoU 0.50 in the settings' thresholds.
    /// </summary>
    void WriteCsvCells(TextWriter csv, FrameScore frame, int halfIndex)
    {
    }

    /// <summary>Writes its keys of one system's entry of a shard state frame line (full precision).</summary>
    void WriteFrameState(Utf8JsonWriter json, FrameScore frame);

    /// <summary>
    /// Reads back what <see cref="WriteFrameState"/> wrote into <paramref name="frame"/> (the frame's other counts
    /// are already read); a value no scorer can produce is bad input (<see cref="FrameStateSource.Bad"/>).
    /// </summary>
    void ReadFrameState(JsonElement entry, FrameStateSource source, FrameScore frame);

    /// <summary>
    /// Adds its per-frame additive bootstrap columns to <paramref name="series"/> (<see cref="BootstrapSeries.AddCount"/>,
    /// <see cref="BootstrapSeries.AddSum"/>), the same number for every frame of a series; none by default.
    /// <paramref name="halfIndex"/> is the position of IoU 0.50 in the settings' thresholds; <paramref name="meanF1Indices"/>,
    /// when given, the positions of <see cref="IouThreshold.MeanF1Set"/> (the per-tag series).
    /// </summary>
    void AddBootstrapColumns(BootstrapSeries series, FrameScore frame, int halfIndex, IReadOnlyList<int>? meanF1Indices)
    {
    }

    /// <summary>
    /// Computes its statistics of one resample from the resampled sums of its columns (and the shared lane counts)
    /// into <paramref name="statistics"/>, indexed as <see cref="BootstrapStatistic"/> then <see cref="Bootstrap.MeanF1Index"/>
    /// (writing only the indices below its length); nothing by default.
    /// </summary>
    void BootstrapStatistics(BootstrapSums sums, Span<double> statistics)
    {
    }
}
