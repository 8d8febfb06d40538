using System.Text.Json;
using LaneBaseline.Core.LaneFiles;

namespace LaneBaseline.Core.Metrics.ConfidenceSweep;

/// <summary>
/// One frame's detection counts at IoU 0.50 when only predictions with confidence ≥ k/20 (k = 0…19) are kept and the
/// kept lanes are assigned again; a lane without a confidence is always kept.
/// </summary>
/// <param name="TruePositives">True positives at IoU 0.50 per cutoff.</param>
/// <param name="PredLanes">Predictions kept per cutoff.</param>
/// <param name="HasConfidence">Whether any predicted lane of the frame carries a confidence.</param>
public sealed record FrameConfidenceSweep(int[] TruePositives, int[] PredLanes, bool HasConfidence)
{
    /// <summary>Number of confidence cutoffs (0.00, 0.05, …, 0.95).</summary>
    public const int Cutoffs = 20;

    /// <summary>A frame without lanes: nothing kept, nothing found.</summary>
    public static FrameConfidenceSweep Empty { get; } = new(new int[Cutoffs], new int[Cutoffs], false);

    /// <summary>Cutoff k as a number: k/20, computed exactly in decimal.</summary>
    public static decimal Cutoff(int k) => k * 0.05m;

    /// <summary>
    /// The sweep of one frame from its assignment: without any confidence every cutoff keeps every lane (the
    /// frame's true positives at IoU 0.50); otherwise the kept lanes' IoU matrix is assigned again per cutoff.
    /// </summary>
    public static FrameConfidenceSweep Measure(FrameAssignment frame)
    {
        ArgumentNullException.ThrowIfNull(frame);
        IReadOnlyList<Lane> p = frame.Pred;
        int nt = frame.Truth.Count, np = p.Count;
        var confTp = new int[Cutoffs];
        var confPred = new int[Cutoffs];
        bool hasConfidence = false;
        foreach (Lane lane in p)
        {
            hasConfidence |= lane.Score.HasValue;
        }

        if (!hasConfidence)
        {
            int tp = 0;
            for (int i = 0; i < nt; i++)
            {
                if (frame.Assignment[i] is int j and >= 0 && frame.Meets(IouThreshold.Half, i, j))
                {
                    tp++;
                }
            }

            Array.Fill(confTp, tp);
            Array.Fill(confPred, np);
            return new FrameConfidenceSweep(confTp, confPred, false);
        }

        var keep = new List<int>(np);
        for (int k = 0; k < Cutoffs; k++)
        {
            decimal cutoff = Cutoff(k);
            keep.Clear();
            for (int j = 0; j < np; j++)
            {
                if (p[j].Score is not double s || (decimal)s >= cutoff)
                {
                    keep.Add(j);
                }
            }

            confPred[k] = keep.Count;
            if (nt == 0 || keep.Count == 0)
            {
                continue;
            }

            var sub = new double[nt * keep.Count];
            for (int i = 0; i < nt; i++)
            {
                for (int c = 0; c < keep.Count; c++)
                {
                    sub[(i * keep.Count) + c] = frame.Iou[(i * np) + keep[c]];
                }
            }

            int[] a = Hungarian.Maximize(sub, nt, keep.Count);
            for (int i = 0; i < nt; i++)
            {
                if (a[i] >= 0 && frame.Meets(IouThreshold.Half, i, keep[a[i]]))
                {
                    confTp[k]++;
                }
            }
        }

        return new FrameConfidenceSweep(confTp, confPred, true);
    }

    /// <summary>Writes the sweep's keys of a shard state's frame line: <c>ctp</c>, <c>cp</c> and <c>conf</c>.</summary>
    public void WriteState(Utf8JsonWriter json)
    {
        ArgumentNullException.ThrowIfNull(json);
        json.WriteStartArray("ctp");
        foreach (int v in TruePositives)
        {
            json.WriteNumberValue(v);
        }

        json.WriteEndArray();
        json.WriteStartArray("cp");
        foreach (int v in PredLanes)
        {
            json.WriteNumberValue(v);
        }

        json.WriteEndArray();
        json.WriteBoolean("conf", HasConfidence);
    }

    /// <summary>
    /// Reads what <see cref="WriteState"/> wrote for <paramref name="frame"/> (whose lane counts are read); counts no
    /// scorer produces are bad input.
    /// </summary>
#pragma warning disable IDISP004 // JsonElement array enumerators own no resources
    public static FrameConfidenceSweep ReadState(JsonElement entry, FrameStateSource source, FrameScore frame)
    {
        ArgumentNullException.ThrowIfNull(source);
        ArgumentNullException.ThrowIfNull(frame);
        int[] ctp = [.. entry.GetProperty("ctp").EnumerateArray().Select(v => v.GetInt32())];
        int[] cp = [.. entry.GetProperty("cp").EnumerateArray().Select(v => v.GetInt32())];
        if (ctp.Length != Cutoffs || cp.Length != Cutoffs)
        {
            throw source.Bad("s.ctp", "confidence cut-off count does not match this build");
        }

        for (int k = 0; k < Cutoffs; k++)
        {
            if (cp[k] < 0 || cp[k] > frame.PredLanes || ctp[k] < 0 || ctp[k] > Math.Min(cp[k], frame.TruthLanes))
            {
                throw source.Bad("s.ctp", $"frame '{frame.Frame}': confidence cut-off counts exceed the lane counts");
            }
        }

        return new FrameConfidenceSweep(ctp, cp, entry.GetProperty("conf").GetBoolean());
    }
#pragma warning restore IDISP004
}
