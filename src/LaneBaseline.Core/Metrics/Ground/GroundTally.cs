using System.Globalization;
using System.Text.Json;

namespace LaneBaseline.Core.Metrics.Ground;

/// <summary>Sums of metric-space errors over frames.</summary>
public sealed class GroundTally
{
    internal GroundTally(int distances)
    {
        LateralAbsSumM = new double[distances];
        LateralCount = new long[distances];
    }

    /// <summary>Σ |ΔY| per look-ahead distance, metres.</summary>
    public double[] LateralAbsSumM { get; }

    /// <summary>Pairs per look-ahead distance.</summary>
    public long[] LateralCount { get; }

    /// <summary>Σ |ΔW| of the ego lane, metres.</summary>
    public double EgoWidthAbsSumM { get; private set; }

    /// <summary>Frames with an ego width on both sides.</summary>
    public long EgoWidthFrames { get; private set; }

    /// <summary>Σ |Δκ|, 1/m.</summary>
    public double CurvatureAbsSum { get; private set; }

    /// <summary>Pairs with curvature on both sides.</summary>
    public long CurvatureCount { get; private set; }

    internal void Add(FrameGroundErrors g)
    {
        for (int k = 0; k < LateralCount.Length; k++)
        {
            LateralAbsSumM[k] += g.LateralAbsSumM[k];
            LateralCount[k] += g.LateralCount[k];
        }

        if (!double.IsNaN(g.EgoWidthAbsErrorM))
        {
            EgoWidthAbsSumM += g.EgoWidthAbsErrorM;
            EgoWidthFrames++;
        }

        CurvatureAbsSum += g.CurvatureAbsSum;
        CurvatureCount += g.CurvatureCount;
    }

    /// <summary>Writes the <c>ground</c> object of the score JSON (means over the pairs or frames that have a value; null when none).</summary>
    public void WriteJson(Utf8JsonWriter json)
    {
        ArgumentNullException.ThrowIfNull(json);
        GroundTally g = this;
        json.WriteStartObject("ground");
        json.WriteString("pairs", "true positives at IoU 0.50");
        json.WriteStartObject("lateral_abs_error_m");
        for (int k = 0; k < g.LateralCount.Length; k++)
        {
            json.WriteStartObject(GroundErrors.DefaultLookAheadM[k].ToString("0.##", CultureInfo.InvariantCulture));
            json.WriteNumber("pairs", g.LateralCount[k]);
            json.WritePropertyName("mean");
            WriteMean(json, g.LateralAbsSumM[k], g.LateralCount[k]);
            json.WriteEndObject();
        }

        json.WriteEndObject();
        json.WriteStartObject("ego_width_abs_error_m");
        json.WriteNumber("frames", g.EgoWidthFrames);
        json.WritePropertyName("mean");
        WriteMean(json, g.EgoWidthAbsSumM, g.EgoWidthFrames);
        json.WriteEndObject();
        json.WriteStartObject("curvature_abs_error_per_m");
        json.WriteNumber("pairs", g.CurvatureCount);
        json.WritePropertyName("mean");
        WriteMean(json, g.CurvatureAbsSum, g.CurvatureCount);
        json.WriteEndObject();
        json.WriteEndObject();
    }

    private static void WriteMean(Utf8JsonWriter json, double sum, long count)
    {
        if (count == 0)
        {
            json.WriteNullValue();
        }
        else
        {
            ScoreJsonWriter.WriteFloat(json, sum / count);
        }
    }
}
