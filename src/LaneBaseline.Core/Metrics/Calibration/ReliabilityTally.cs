using System.Globalization;
using System.Text.Json;
using LaneBaseline.Core.LaneFiles;

namespace LaneBaseline.Core.Metrics.Calibration;

/// <summary>
/// Calibration of predicted lane scores against the IoU 0.50 outcome of the frame's Hungarian assignment: per lane
/// with a <c>score</c>, whether it is a true positive (assigned to a truth lane with IoU ≥ 0.50). Summed over frames
/// in truth order; reports a reliability table (10 equal-width score bins), the expected calibration error and a
/// precision-recall curve over the score threshold.
/// </summary>
/// <remarks>
/// ECE = Σ_b (n_b / N)·|precision_b − mean score_b| over the 10 bins [k/10, (k+1)/10) (the last bin includes 1):
/// M. P. Naeini, G. F. Cooper and M. Hauskrecht, "Obtaining Well Calibrated Probabilities Using Bayesian Binning",
/// AAAI 2015. The curve keeps the one assignment of the frame and counts the lanes with score ≥ t (lanes without a
/// score are not counted), so it is the curve of the scores alone; <c>confidence_sweep</c> reassigns per cutoff.
/// </remarks>
public sealed class ReliabilityTally
{
    /// <summary>Number of equal-width score bins.</summary>
    public const int Bins = 10;

    private readonly List<double> scores = [];
    private readonly List<bool> hits = [];

    /// <summary>Scored lanes added.</summary>
    public int Lanes => scores.Count;

    /// <summary>Truth lanes of the frames added (the recall denominator).</summary>
    public long TruthLanes { get; private set; }

    /// <summary>The per-lane outcomes of one frame: the scores of the predicted lanes that carry one, and whether each is a true positive at IoU 0.50.</summary>
    /// <param name="predictions">Predicted lanes of the frame.</param>
    /// <param name="assign">Hungarian assignment: per truth lane the prediction index or −1.</param>
    /// <param name="inter">Intersection pixel counts (truth-major).</param>
    /// <param name="areaT">Truth footprints.</param>
    /// <param name="areaP">Prediction footprints.</param>
    public static (double[] Scores, bool[] Hits) OfFrame(IReadOnlyList<Lane> predictions, int[] assign, long[] inter, long[] areaT, long[] areaP)
    {
        ArgumentNullException.ThrowIfNull(predictions);
        ArgumentNullException.ThrowIfNull(assign);
        ArgumentNullException.ThrowIfNull(inter);
        ArgumentNullException.ThrowIfNull(areaT);
        ArgumentNullException.ThrowIfNull(areaP);
        int np = predictions.Count;
        var hit = new bool[np];
        for (int i = 0; i < assign.Length; i++)
        {
            int j = assign[i];
            if (j >= 0)
            {
                long n = inter[(i * np) + j];
                hit[j] = IouThreshold.Half.IsMetBy(n, areaT[i] + areaP[j] - n);
            }
        }

        var s = new List<double>(np);
        var h = new List<bool>(np);
        for (int j = 0; j < np; j++)
        {
            if (predictions[j].Score is double v)
            {
                s.Add(v);
                h.Add(hit[j]);
            }
        }

        return ([.. s], [.. h]);
    }

    /// <summary>
    /// Writes a frame's scored lanes to its entry in a shard state's frame line: <c>ps</c> the scores, <c>ph</c> 1 for a
    /// true positive (both absent when no lane carries a score).
    /// </summary>
    public static void WriteFrameState(Utf8JsonWriter json, FrameScore frame)
    {
        ArgumentNullException.ThrowIfNull(json);
        ArgumentNullException.ThrowIfNull(frame);
        if (frame.LaneScores.Length > 0)
        {
            json.WriteStartArray("ps"); // scored lanes: score and outcome (calibration metric)
            foreach (double v in frame.LaneScores)
            {
                json.WriteRawValue(v.ToString("R", CultureInfo.InvariantCulture));
            }

            json.WriteEndArray();
            json.WriteStartArray("ph");
            foreach (bool v in frame.LaneHits)
            {
                json.WriteNumberValue(v ? 1 : 0);
            }

            json.WriteEndArray();
        }
    }

    /// <summary>Reads what <see cref="WriteFrameState"/> wrote (empty arrays when absent); the caller checks the counts.</summary>
#pragma warning disable IDISP004 // JsonElement array enumerators own no resources
    public static (double[] Scores, bool[] Hits) ReadFrameState(JsonElement s)
    {
        double[] laneScores = s.TryGetProperty("ps", out JsonElement ps) ? [.. ps.EnumerateArray().Select(v => v.GetDouble())] : [];
        bool[] laneHits = s.TryGetProperty("ph", out JsonElement ph) ? [.. ph.EnumerateArray().Select(v => v.GetInt32() != 0)] : [];
        return (laneScores, laneHits);
    }
#pragma warning restore IDISP004

    /// <summary>Adds one frame.</summary>
    public void Add(FrameScore frame)
    {
        ArgumentNullException.ThrowIfNull(frame);
        TruthLanes += frame.TruthLanes;
        scores.AddRange(frame.LaneScores);
        hits.AddRange(frame.LaneHits);
    }

    /// <summary>One row of the reliability table.</summary>
    public readonly record struct Bin(double Low, double High, int Lanes, double MeanScore, double Precision);

    /// <summary>The reliability table: 10 equal-width bins (mean score and precision NaN when empty).</summary>
    public Bin[] Table()
    {
        var n = new int[Bins];
        var sum = new double[Bins];
        var tp = new int[Bins];
        for (int i = 0; i < scores.Count; i++)
        {
            int b = BinOf(scores[i]);
            n[b]++;
            sum[b] += scores[i];
            tp[b] += hits[i] ? 1 : 0;
        }

        var table = new Bin[Bins];
        for (int b = 0; b < Bins; b++)
        {
            table[b] = new Bin(b / 10.0, (b + 1) / 10.0, n[b], n[b] == 0 ? double.NaN : sum[b] / n[b], n[b] == 0 ? double.NaN : (double)tp[b] / n[b]);
        }

        return table;
    }

    /// <summary>Expected calibration error over the 10 bins (NaN without scored lanes).</summary>
    public double ExpectedCalibrationError()
    {
        if (scores.Count == 0)
        {
            return double.NaN;
        }

        double ece = 0;
        foreach (Bin b in Table())
        {
            if (b.Lanes > 0)
            {
                ece += (double)b.Lanes / scores.Count * Math.Abs(b.Precision - b.MeanScore);
            }
        }

        return ece;
    }

    /// <summary>One point of the precision-recall curve: lanes with score ≥ <paramref name="MinScore"/>.</summary>
    public readonly record struct CurvePoint(double MinScore, int PredLanes, int TruePositives, double Precision, double Recall, double F1);

    /// <summary>The curve at the cutoffs k/20 (k = 0…20).</summary>
    public CurvePoint[] Curve()
    {
        var points = new CurvePoint[21];
        for (int k = 0; k <= 20; k++)
        {
            double t = (double)(k * 0.05m);
            int p = 0, tp = 0;
            for (int i = 0; i < scores.Count; i++)
            {
                if (scores[i] >= t)
                {
                    p++;
                    tp += hits[i] ? 1 : 0;
                }
            }

            points[k] = Point(t, p, tp);
        }

        return points;
    }

    /// <summary>The F1-maximising threshold over every distinct score (the lowest such score on ties), or null without scored lanes.</summary>
    public CurvePoint? Best()
    {
        if (scores.Count == 0)
        {
            return null;
        }

        int[] order = [.. Enumerable.Range(0, scores.Count).OrderByDescending(i => scores[i]).ThenBy(i => i)];
        CurvePoint? best = null;
        int p = 0, tp = 0;
        for (int r = 0; r < order.Length; r++)
        {
            p++;
            tp += hits[order[r]] ? 1 : 0;
            if (r + 1 < order.Length && scores[order[r + 1]] == scores[order[r]])
            {
                continue; // a threshold keeps every lane with the same score
            }

            CurvePoint c = Point(scores[order[r]], p, tp);
            if (best is null || c.F1 >= best.Value.F1)
            {
                best = c;
            }
        }

        return best;
    }

    /// <summary>Writes the <c>calibration</c> object (nothing when no lane carries a score).</summary>
    public void WriteJson(Utf8JsonWriter json)
    {
        ArgumentNullException.ThrowIfNull(json);
        if (scores.Count == 0)
        {
            return;
        }

        json.WriteStartObject("calibration");
        json.WriteString("outcome", "true positive at IoU 0.50 in the frame's assignment");
        json.WriteNumber("scored_lanes", scores.Count);
        json.WritePropertyName("ece");
        Float(json, ExpectedCalibrationError());
        json.WriteStartArray("reliability");
        foreach (Bin b in Table())
        {
            json.WriteStartObject();
            json.WritePropertyName("low");
            Float(json, b.Low);
            json.WritePropertyName("high");
            Float(json, b.High);
            json.WriteNumber("lanes", b.Lanes);
            json.WritePropertyName("mean_score");
            Float(json, b.MeanScore);
            json.WritePropertyName("precision");
            Float(json, b.Precision);
            json.WriteEndObject();
        }

        json.WriteEndArray();
        json.WriteStartArray("pr_curve");
        foreach (CurvePoint c in Curve())
        {
            WritePoint(json, c);
        }

        json.WriteEndArray();
        json.WritePropertyName("best_f1");
        WritePoint(json, Best()!.Value);
        json.WriteEndObject();
    }

    /// <summary>One line for the text table.</summary>
    public string Summary()
    {
        CurvePoint best = Best()!.Value;
        return string.Create(CultureInfo.InvariantCulture, $"ECE {ExpectedCalibrationError():0.0000} over {Lanes} scored lanes; best F1 {best.F1:0.0000} at score >= {best.MinScore:0.0000}");
    }

    private static int BinOf(double s) => Math.Clamp((int)Math.Floor(s * Bins), 0, Bins - 1);

    private CurvePoint Point(double t, int p, int tp)
    {
        double precision = p == 0 ? double.NaN : (double)tp / p;
        double recall = TruthLanes == 0 ? double.NaN : (double)tp / TruthLanes;
        double f1 = p + TruthLanes == 0 ? double.NaN : 2.0 * tp / (p + TruthLanes);
        return new CurvePoint(t, p, tp, precision, recall, f1);
    }

    private static void WritePoint(Utf8JsonWriter json, CurvePoint c)
    {
        json.WriteStartObject();
        json.WritePropertyName("min_score");
        Float(json, c.MinScore);
        json.WriteNumber("pred_lanes", c.PredLanes);
        json.WriteNumber("tp", c.TruePositives);
        json.WritePropertyName("precision");
        Float(json, c.Precision);
        json.WritePropertyName("recall");
        Float(json, c.Recall);
        json.WritePropertyName("f1");
        Float(json, c.F1);
        json.WriteEndObject();
    }

    private static void Float(Utf8JsonWriter json, double v)
    {
        if (double.IsFinite(v))
        {
            json.WriteRawValue(ScoreJsonWriter.FormatFloat(v), skipInputValidation: true);
        }
        else
        {
            json.WriteNullValue();
        }
    }
}
