using System.Text.Json;

namespace LaneBaseline.Core.Metrics;

/// <summary>TP/FP/FN and the rates derived from them.</summary>
/// <param name="TruePositives">Matched pairs meeting the threshold.</param>
/// <param name="FalsePositives">Predictions not counted as TP.</param>
/// <param name="FalseNegatives">Truth lanes not counted as TP.</param>
/// <param name="Precision">TP / (TP + FP), 0 when the denominator is 0 (1 when the set is all empty).</param>
/// <param name="Recall">TP / (TP + FN), same rules.</param>
/// <param name="F1">2PR / (P + R), same rules.</param>
public readonly record struct DetectionCounts(long TruePositives, long FalsePositives, long FalseNegatives, double Precision, double Recall, double F1)
{
    /// <summary>Derives the counts and rates from TP and the lane totals.</summary>
    public static DetectionCounts From(long tp, long predLanes, long truthLanes)
    {
        long fp = predLanes - tp, fn = truthLanes - tp;
        if (predLanes == 0 && truthLanes == 0)
        {
            return new DetectionCounts(tp, fp, fn, 1.0, 1.0, 1.0);
        }

        double p = Metrics.Ratio(tp, tp + fp);
        double r = Metrics.Ratio(tp, tp + fn);
        double f1 = p + r == 0 ? 0.0 : 2 * p * r / (p + r);
        return new DetectionCounts(tp, fp, fn, p, r, f1);
    }

    /// <summary>Writes the counts and rates as keys of the current JSON object: <c>tp</c>, <c>fp</c>, <c>fn</c>, <c>precision</c>, <c>recall</c>, <c>f1</c>.</summary>
    public void WriteJson(Utf8JsonWriter json)
    {
        ArgumentNullException.ThrowIfNull(json);
        json.WriteNumber("tp", TruePositives);
        json.WriteNumber("fp", FalsePositives);
        json.WriteNumber("fn", FalseNegatives);
        json.WritePropertyName("precision");
        ScoreJsonWriter.WriteFloat(json, Precision);
        json.WritePropertyName("recall");
        ScoreJsonWriter.WriteFloat(json, Recall);
        json.WritePropertyName("f1");
        ScoreJsonWriter.WriteFloat(json, F1);
    }
}
