using System.Text.Json;

namespace LaneBaseline.Core.Metrics.PointAccuracy;

/// <summary>The point accuracy summed over frames.</summary>
public sealed class PointAccuracyTally
{
    /// <summary>Sum of assigned pair accuracies.</summary>
    public double AccuracySum { get; private set; }

    /// <summary>Truth lanes matched by the point metric.</summary>
    public long Matched { get; private set; }

    /// <summary>Truth lanes of the frames added.</summary>
    public long TruthLanes { get; private set; }

    /// <summary>Predicted lanes of the frames added.</summary>
    public long PredLanes { get; private set; }

    /// <summary>Point accuracy = Σ assigned pair accuracy / truth lanes (1 when the frames hold no lane at all).</summary>
    public double Accuracy => TruthLanes == 0 && PredLanes == 0 ? 1.0 : Metrics.Ratio(AccuracySum, TruthLanes);

    /// <summary>Unmatched predictions / predictions.</summary>
    public double FpRate => Metrics.Ratio(PredLanes - Matched, PredLanes);

    /// <summary>Unmatched truth lanes / truth lanes.</summary>
    public double FnRate => Metrics.Ratio(TruthLanes - Matched, TruthLanes);

    /// <summary>Adds one frame.</summary>
    public void Add(FrameScore frame)
    {
        ArgumentNullException.ThrowIfNull(frame);
        AccuracySum += frame.Points.AccuracySum;
        Matched += frame.Points.Matched;
        TruthLanes += frame.TruthLanes;
        PredLanes += frame.PredLanes;
    }

    /// <summary>
    /// Writes the <c>point_accuracy</c> object of the score JSON; the tolerance is the override, else that of the
    /// frames' common width, else null (mixed sizes).
    /// </summary>
    public void WriteJson(Utf8JsonWriter json, ScoreSettings settings, int? commonWidth)
    {
        ArgumentNullException.ThrowIfNull(json);
        ArgumentNullException.ThrowIfNull(settings);
        json.WriteStartObject("point_accuracy");
        double? tolerance = settings.TolerancePx ?? (commonWidth is int tw ? settings.ToleranceFor(tw) : null);
        json.WritePropertyName("tolerance_px");
        if (tolerance is double tol)
        {
            ScoreJsonWriter.WriteFloat(json, tol);
        }
        else
        {
            json.WriteNullValue();
        }

        json.WritePropertyName("accuracy");
        ScoreJsonWriter.WriteFloat(json, Accuracy);
        json.WritePropertyName("fp_rate");
        ScoreJsonWriter.WriteFloat(json, FpRate);
        json.WritePropertyName("fn_rate");
        ScoreJsonWriter.WriteFloat(json, FnRate);
        json.WriteNumber("matched", Matched);
        json.WriteNumber("truth_lanes", TruthLanes);
        json.WriteNumber("pred_lanes", PredLanes);
        json.WriteEndObject();
    }
}
