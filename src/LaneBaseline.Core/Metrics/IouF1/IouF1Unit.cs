using System.Globalization;
using System.Text.Json;

namespace LaneBaseline.Core.Metrics.IouF1;

/// <summary>
/// Rasterised-IoU F1 and mF1 (docs/metrics.md section 1): per frame <see cref="FrameIouF1.Measure"/> on the frame's
/// one Hungarian assignment (<see cref="FrameAssignment"/>), summed by <see cref="IouF1Tally"/>, JSON <c>iou_f1</c>,
/// CSV columns <c>tp</c>, <c>fp</c>, <c>fn</c> (at IoU 0.50) and <c>mean_matched_iou</c>, state keys <c>tp</c> and
/// <c>iou</c>; bootstrap columns TP at IoU 0.50 (and, per tag, TP at each mF1 threshold), from which with the shared
/// lane counts it computes F1, precision and recall at IoU 0.50 (and mF1 per tag).
/// </summary>
public sealed class IouF1Unit : IMetricUnit
{
    /// <inheritdoc />
    public string Name => "IouF1";

    /// <inheritdoc />
    public string JsonKey => "iou_f1";

    /// <inheritdoc />
    public MetricJsonSlot Slot => MetricJsonSlot.Tally;

    /// <inheritdoc />
    public IReadOnlyList<string> CsvColumns { get; } = ["tp", "fp", "fn", "mean_matched_iou"];

    /// <inheritdoc />
    public void WriteJson(Utf8JsonWriter json, ScoreTally tally, SystemScore? system, ScoreSettings settings)
    {
        ArgumentNullException.ThrowIfNull(tally);
        tally.IouF1.WriteJson(json, settings, tally.CommonWidth);
    }

    /// <inheritdoc />
    public void WriteCsvCells(TextWriter csv, FrameScore frame, int halfIndex)
    {
        ArgumentNullException.ThrowIfNull(csv);
        ArgumentNullException.ThrowIfNull(frame);
        int tp = frame.IouF1.TruePositives[halfIndex];
        csv.Write(string.Create(CultureInfo.InvariantCulture, $",{tp},{frame.PredLanes - tp},{frame.TruthLanes - tp},"));
        double miou = frame.IouF1.MeanMatchedIou;
        csv.Write(double.IsNaN(miou) ? string.Empty : miou.ToString("R", CultureInfo.InvariantCulture));
    }

    /// <inheritdoc />
    public void WriteFrameState(Utf8JsonWriter json, FrameScore frame)
    {
        ArgumentNullException.ThrowIfNull(frame);
        frame.IouF1.WriteState(json);
    }

    /// <inheritdoc />
    public void ReadFrameState(JsonElement entry, FrameStateSource source, FrameScore frame)
    {
        ArgumentNullException.ThrowIfNull(frame);
        frame.IouF1 = FrameIouF1.ReadState(entry, source, frame);
    }

    /// <inheritdoc />
    public void AddBootstrapColumns(BootstrapSeries series, FrameScore frame, int halfIndex, IReadOnlyList<int>? meanF1Indices)
    {
        ArgumentNullException.ThrowIfNull(series);
        ArgumentNullException.ThrowIfNull(frame);
        series.AddCount(frame.IouF1.TruePositives[halfIndex]);
        if (meanF1Indices is not null)
        {
            foreach (int k in meanF1Indices)
            {
                series.AddCount(frame.IouF1.TruePositives[k]);
            }
        }
    }

    /// <inheritdoc />
    public void BootstrapStatistics(BootstrapSums sums, Span<double> statistics)
    {
        DetectionCounts c = DetectionCounts.From(sums.Count(0), sums.PredLanes, sums.TruthLanes);
        statistics[(int)BootstrapStatistic.F1] = c.F1;
        statistics[(int)BootstrapStatistic.Precision] = c.Precision;
        statistics[(int)BootstrapStatistic.Recall] = c.Recall;
        if (statistics.Length > Bootstrap.MeanF1Index)
        {
            int m = IouThreshold.MeanF1Set.Count;
            if (sums.CountColumns != 1 + m)
            {
                throw new InvalidOperationException("the series carries no per-threshold TP for mF1");
            }

            double sum = 0;
            for (int k = 0; k < m; k++)
            {
                sum += DetectionCounts.From(sums.Count(1 + k), sums.PredLanes, sums.TruthLanes).F1;
            }

            statistics[Bootstrap.MeanF1Index] = sum / m;
        }
    }
}
