using System.Globalization;
using System.Text.Json;

namespace LaneBaseline.Core.Metrics.PointAccuracy;

/// <summary>
/// Row-sampled point accuracy (docs/metrics.md section 2): per frame <see cref="FramePointAccuracy.Measure"/> (its own
/// Hungarian assignment on pair accuracy, rows sampled by <see cref="RowSampling"/>), summed by
/// <see cref="PointAccuracyTally"/>, JSON <c>point_accuracy</c>, CSV column <c>point_accuracy</c>, state keys
/// <c>acc</c> and <c>m</c>; bootstrap column the frame's sum of pair accuracies, from which with the shared truth and
/// predicted lane counts it computes <see cref="BootstrapStatistic.Accuracy"/>.
/// </summary>
public sealed class PointAccuracyUnit : IMetricUnit
{
    /// <inheritdoc />
    public string Name => "PointAccuracy";

    /// <inheritdoc />
    public string JsonKey => "point_accuracy";

    /// <inheritdoc />
    public MetricJsonSlot Slot => MetricJsonSlot.Tally;

    /// <inheritdoc />
    public IReadOnlyList<string> CsvColumns { get; } = ["point_accuracy"];

    /// <inheritdoc />
    public void WriteJson(Utf8JsonWriter json, ScoreTally tally, SystemScore? system, ScoreSettings settings)
    {
        ArgumentNullException.ThrowIfNull(tally);
        tally.Points.WriteJson(json, settings, tally.CommonWidth);
    }

    /// <inheritdoc />
    public void WriteCsvCells(TextWriter csv, FrameScore frame, int halfIndex)
    {
        ArgumentNullException.ThrowIfNull(csv);
        ArgumentNullException.ThrowIfNull(frame);
        csv.Write(',');
        double acc = frame.Points.FrameAccuracy(frame.TruthLanes);
        csv.Write(double.IsNaN(acc) ? string.Empty : acc.ToString("R", CultureInfo.InvariantCulture));
    }

    /// <inheritdoc />
    public void WriteFrameState(Utf8JsonWriter json, FrameScore frame)
    {
        ArgumentNullException.ThrowIfNull(frame);
        frame.Points.WriteState(json);
    }

    /// <inheritdoc />
    public void ReadFrameState(JsonElement entry, FrameStateSource source, FrameScore frame)
    {
        ArgumentNullException.ThrowIfNull(frame);
        frame.Points = FramePointAccuracy.ReadState(entry, source, frame);
    }

    /// <inheritdoc />
    public void AddBootstrapColumns(BootstrapSeries series, FrameScore frame, int halfIndex, IReadOnlyList<int>? meanF1Indices)
    {
        ArgumentNullException.ThrowIfNull(series);
        ArgumentNullException.ThrowIfNull(frame);
        series.AddSum(frame.Points.AccuracySum);
    }

    /// <inheritdoc />
    public void BootstrapStatistics(BootstrapSums sums, Span<double> statistics) =>
        statistics[(int)BootstrapStatistic.Accuracy] = sums.TruthLanes == 0 && sums.PredLanes == 0 ? 1.0 : Metrics.Ratio(sums.Sum(0), sums.TruthLanes);
}
