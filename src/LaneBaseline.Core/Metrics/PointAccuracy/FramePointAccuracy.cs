using System.Globalization;
using System.Text.Json;
using LaneBaseline.Core.LaneFiles;

namespace LaneBaseline.Core.Metrics.PointAccuracy;

/// <summary>
/// One frame's row-sampled point accuracy: truth and predictions are paired by a Hungarian assignment of their own
/// maximising the total pair accuracy (the share of a truth lane's sample rows the prediction hits within tolerance).
/// </summary>
/// <param name="AccuracySum">Sum over truth lanes of the assigned pair accuracy (0 when unassigned).</param>
/// <param name="Matched">Truth lanes whose assigned pair accuracy reaches 0.85 (equally, matched predictions).</param>
public sealed record FramePointAccuracy(double AccuracySum, int Matched)
{
    /// <summary>A frame without lanes.</summary>
    public static FramePointAccuracy Empty { get; } = new(0, 0);

    /// <summary>Point accuracy of the frame alone (sum / truth lanes), or NaN without truth lanes.</summary>
    public double FrameAccuracy(int truthLanes) => truthLanes == 0 ? double.NaN : AccuracySum / truthLanes;

    /// <summary>Scores the predictions of a frame against its truth.</summary>
    /// <param name="truth">Truth lanes.</param>
    /// <param name="pred">Predicted lanes.</param>
    /// <param name="height">Frame height in pixels (the sample rows count from the bottom row).</param>
    /// <param name="baseTolerancePx">Base point tolerance in pixels (<see cref="ScoreSettings.ToleranceFor"/>).</param>
    /// <param name="rows">Reused buffer for the sample rows.</param>
    /// <param name="xs">Reused buffer for the sampled x.</param>
    public static FramePointAccuracy Measure(IReadOnlyList<Lane> truth, IReadOnlyList<Lane> pred, int height, double baseTolerancePx, List<int> rows, List<double> xs)
    {
        ArgumentNullException.ThrowIfNull(truth);
        ArgumentNullException.ThrowIfNull(pred);
        ArgumentNullException.ThrowIfNull(rows);
        ArgumentNullException.ThrowIfNull(xs);
        int nt = truth.Count, np = pred.Count;
        var correct = new int[nt * np];
        var samples = new int[nt];
        var pairAcc = new double[nt * np];
        for (int i = 0; i < nt; i++)
        {
            RowSampling.SampleRows(truth[i].Points, height, rows, xs);
            samples[i] = rows.Count;
            if (rows.Count == 0)
            {
                continue;
            }

            double tol = RowSampling.Tolerance(baseTolerancePx, RowSampling.FitSlope(rows, xs));
            for (int j = 0; j < np; j++)
            {
                int c = RowSampling.CountCorrect(rows, xs, tol, pred[j].Points);
                correct[(i * np) + j] = c;
                pairAcc[(i * np) + j] = (double)c / rows.Count;
            }
        }

        int[] pointAssign = Hungarian.Maximize(pairAcc, nt, np);
        double accSum = 0;
        int matched = 0;
        for (int i = 0; i < nt; i++)
        {
            int j = pointAssign[i];
            if (j < 0)
            {
                continue;
            }

            accSum += pairAcc[(i * np) + j];
            if (RowSampling.IsMatched(correct[(i * np) + j], samples[i]))
            {
                matched++;
            }
        }

        return new FramePointAccuracy(accSum, matched);
    }

    /// <summary>Writes the frame's keys of a shard state's frame line: <c>acc</c> (full precision) and <c>m</c>.</summary>
    public void WriteState(Utf8JsonWriter json)
    {
        ArgumentNullException.ThrowIfNull(json);
        json.WritePropertyName("acc");
        json.WriteRawValue(AccuracySum.ToString("R", CultureInfo.InvariantCulture));
        json.WriteNumber("m", Matched);
    }

    /// <summary>
    /// Reads what <see cref="WriteState"/> wrote for <paramref name="frame"/> (whose lane counts are read): at most
    /// min(truth, predicted) pairs, each of accuracy in [0, 1], so a hand-edited state cannot claim an accuracy of 1e9.
    /// </summary>
    public static FramePointAccuracy ReadState(JsonElement entry, FrameStateSource source, FrameScore frame)
    {
        ArgumentNullException.ThrowIfNull(source);
        ArgumentNullException.ThrowIfNull(frame);
        double acc = entry.GetProperty("acc").GetDouble();
        int matched = entry.GetProperty("m").GetInt32();
        int pairs = Math.Min(frame.TruthLanes, frame.PredLanes);
        if (matched < 0 || matched > pairs || !(acc >= 0 && acc <= pairs + 1e-9))
        {
            throw source.Bad("s.acc", string.Create(CultureInfo.InvariantCulture, $"frame '{frame.Frame}': point accuracy sum {acc} with {matched} matched lanes is impossible (each assigned pair's accuracy is in [0, 1] and there are at most {pairs} pairs)"));
        }

        return new FramePointAccuracy(acc, matched);
    }
}
