namespace LaneBaseline.Core.Metrics.Coverage;

/// <summary>
/// How well one prediction file covers the truth: counted over the whole files (every shard sees the same numbers).
/// </summary>
/// <param name="TruthFrames">Records in the truth file.</param>
/// <param name="PredFrames">Records in the prediction file (including frames the truth lacks).</param>
/// <param name="Missing">Truth frames without a prediction record (scored as predicting no lanes).</param>
/// <param name="Extra">Prediction records of frames the truth lacks (not scored).</param>
/// <param name="FirstMissing">The first few missing frame keys, in truth order.</param>
/// <param name="FirstExtra">The first few extra frame keys, in prediction-file order.</param>
public sealed record FrameCoverage(int TruthFrames, int PredFrames, int Missing, int Extra, IReadOnlyList<string> FirstMissing, IReadOnlyList<string> FirstExtra)
{
    /// <summary>How many example keys a coverage keeps and a warning prints.</summary>
    public const int Examples = 5;

    /// <summary>
    /// Writes the coverage as one JSON object (named <paramref name="name"/>, or as an array element when null): the
    /// same keys in the score JSON's <c>coverage</c> and in each entry of a shard state's <c>coverage</c> array.
    /// </summary>
    public void WriteJson(System.Text.Json.Utf8JsonWriter json, string? name = null)
    {
        ArgumentNullException.ThrowIfNull(json);
        if (name is null)
        {
            json.WriteStartObject();
        }
        else
        {
            json.WriteStartObject(name);
        }

        json.WriteNumber("truth_frames", TruthFrames);
        json.WriteNumber("pred_frames", PredFrames);
        json.WriteNumber("missing", Missing);
        json.WriteNumber("extra", Extra);
        json.WriteStartArray("first_missing");
        foreach (string k in FirstMissing)
        {
            json.WriteStringValue(k);
        }

        json.WriteEndArray();
        json.WriteStartArray("first_extra");
        foreach (string k in FirstExtra)
        {
            json.WriteStringValue(k);
        }

        json.WriteEndArray();
        json.WriteEndObject();
    }

    /// <summary>Reads what <see cref="WriteJson"/> wrote.</summary>
#pragma warning disable IDISP004 // JsonElement array enumerators own no resources
    public static FrameCoverage ReadJson(System.Text.Json.JsonElement c) => new(
        c.GetProperty("truth_frames").GetInt32(),
        c.GetProperty("pred_frames").GetInt32(),
        c.GetProperty("missing").GetInt32(),
        c.GetProperty("extra").GetInt32(),
        [.. c.GetProperty("first_missing").EnumerateArray().Select(k => k.GetString()!)],
        [.. c.GetProperty("first_extra").EnumerateArray().Select(k => k.GetString()!)]);
#pragma warning restore IDISP004

    /// <summary>The keys as one short list: <c>'a', 'b', … (+N more)</c>.</summary>
    public static string List(IReadOnlyList<string> keys, int total)
    {
        ArgumentNullException.ThrowIfNull(keys);
        string shown = string.Join(", ", keys.Select(k => "'" + k + "'"));
        return total > keys.Count ? shown + ", … (+" + (total - keys.Count).ToString(System.Globalization.CultureInfo.InvariantCulture) + " more)" : shown;
    }
}
