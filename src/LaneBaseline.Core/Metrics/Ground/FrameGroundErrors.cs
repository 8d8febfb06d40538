using System.Globalization;
using System.Text.Json;

namespace LaneBaseline.Core.Metrics.Ground;

/// <summary>One frame's metric-space error sums.</summary>
/// <param name="LateralAbsSumM">Σ |ΔY| per look-ahead distance, metres.</param>
/// <param name="LateralCount">Pairs with a value per look-ahead distance.</param>
/// <param name="EgoWidthAbsErrorM">|ΔW| of the ego lane at 10 m, or NaN.</param>
/// <param name="CurvatureAbsSum">Σ |Δκ| over pairs, 1/m.</param>
/// <param name="CurvatureCount">Pairs with a curvature on both sides.</param>
public sealed record FrameGroundErrors(double[] LateralAbsSumM, int[] LateralCount, double EgoWidthAbsErrorM, double CurvatureAbsSum, int CurvatureCount)
{
    /// <summary>Writes the frame's sums as the <c>g</c> object of a shard state's frame line (full precision).</summary>
    public void WriteState(Utf8JsonWriter json)
    {
        ArgumentNullException.ThrowIfNull(json);
        json.WriteStartObject("g");
        json.WriteStartArray("ls");
        foreach (double v in LateralAbsSumM)
        {
            json.WriteRawValue(v.ToString("R", CultureInfo.InvariantCulture));
        }

        json.WriteEndArray();
        json.WriteStartArray("lc");
        foreach (int v in LateralCount)
        {
            json.WriteNumberValue(v);
        }

        json.WriteEndArray();
        json.WritePropertyName("w");
        if (double.IsFinite(EgoWidthAbsErrorM))
        {
            json.WriteRawValue(EgoWidthAbsErrorM.ToString("R", CultureInfo.InvariantCulture));
        }
        else
        {
            json.WriteNullValue(); // not measured in this frame
        }

        json.WritePropertyName("cs");
        json.WriteRawValue(CurvatureAbsSum.ToString("R", CultureInfo.InvariantCulture));
        json.WriteNumber("cc", CurvatureCount);
        json.WriteEndObject();
    }

    /// <summary>
    /// Reads what <see cref="WriteState"/> wrote, or null when its look-ahead distances are not this build's; a
    /// malformed value throws (<see cref="FormatException"/>, <see cref="InvalidOperationException"/>, …).
    /// </summary>
#pragma warning disable IDISP004 // JsonElement array enumerators own no resources
    public static FrameGroundErrors? ReadState(JsonElement g)
    {
        double[] sums = [.. g.GetProperty("ls").EnumerateArray().Select(v => v.GetDouble())];
        int[] counts = [.. g.GetProperty("lc").EnumerateArray().Select(v => v.GetInt32())];
        if (sums.Length != GroundErrors.DefaultLookAheadM.Count || counts.Length != sums.Length || counts.Any(c => c < 0))
        {
            return null;
        }

        JsonElement w = g.GetProperty("w");
        int curvatureCount = g.GetProperty("cc").GetInt32();
        return new FrameGroundErrors(sums, counts, w.ValueKind == JsonValueKind.Null ? double.NaN : w.GetDouble(), g.GetProperty("cs").GetDouble(), curvatureCount < 0 ? throw new FormatException("negative count") : curvatureCount);
    }
#pragma warning restore IDISP004
}
