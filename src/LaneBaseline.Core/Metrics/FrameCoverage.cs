namespace LaneBaseline.Core.Metrics;

/// <summary>What <c>score</c> does with truth frames that have no prediction record (<c>--missing</c>).</summary>
public enum MissingFramePolicy
{
    /// <summary>Scored as predicting no lanes (docs/metrics.md), with a warning line.</summary>
    Empty,

    /// <summary>Bad input (exit 3).</summary>
    Error,
}

/// <summary>What <c>score</c> does with prediction records of frames the truth lacks (<c>--extra</c>).</summary>
public enum ExtraFramePolicy
{
    /// <summary>Left out of the scores, with a warning line.</summary>
    Ignore,

    /// <summary>Bad input (exit 3).</summary>
    Error,
}

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

    /// <summary>The keys as one short list: <c>'a', 'b', … (+N more)</c>.</summary>
    public static string List(IReadOnlyList<string> keys, int total)
    {
        ArgumentNullException.ThrowIfNull(keys);
        string shown = string.Join(", ", keys.Select(k => "'" + k + "'"));
        return total > keys.Count ? shown + ", … (+" + (total - keys.Count).ToString(System.Globalization.CultureInfo.InvariantCulture) + " more)" : shown;
    }
}
