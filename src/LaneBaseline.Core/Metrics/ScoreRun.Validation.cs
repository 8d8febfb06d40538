using System.Globalization;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Metrics.Coverage;

namespace LaneBaseline.Core.Metrics;

/// <summary>Pass 1: every prediction record checked against the truth frames, and the coverage of each system.</summary>
public sealed partial class ScoreRun
{
    private (HashSet<int> Present, FrameCoverage Coverage) ValidatePredictions(
        LaneSourceOpener opener, LaneSourceRequest request, string path, Dictionary<string, int> truthIndex, List<(int W, int H)> sizes, Action<string>? note, RecordCache cache, int system)
    {
        var present = new HashSet<int>();
        var firstExtra = new List<string>(FrameCoverage.Examples);
        int extra = 0;
        using ILaneRecordSource reader = opener(path, request);
        while (reader.TryRead(out LaneRecord r))
        {
            if (!truthIndex.TryGetValue(r.Frame, out int ordinal))
            {
                if (Extra == ExtraFramePolicy.Error)
                {
                    throw BadInputException.At(path, r.LineNumber, "frame", $"frame '{r.Frame}' is not in the truth file");
                }

                // --extra ignore: networks are often run on more frames than were labelled; the record was parsed and
                // validated by the reader, it is only left out of the scores.
                extra++;
                if (firstExtra.Count < FrameCoverage.Examples)
                {
                    firstExtra.Add(r.Frame);
                }

                continue;
            }

            (int w, int h) = sizes[ordinal];
            if (r.Width is int pw && pw != w)
            {
                throw BadInputException.At(path, r.LineNumber, "width", string.Create(CultureInfo.InvariantCulture, $"prediction width {pw} differs from the truth's {w} for frame '{r.Frame}'"));
            }

            if (r.Height is int ph && ph != h)
            {
                throw BadInputException.At(path, r.LineNumber, "height", string.Create(CultureInfo.InvariantCulture, $"prediction height {ph} differs from the truth's {h} for frame '{r.Frame}'"));
            }

            if (r.Width is null || r.Height is null)
            {
                r.ValidatePointRange(path, w, h);
            }

            present.Add(ordinal);
            cache.KeepPrediction(system, ordinal, r, truthIndex.Count);
        }

        if (reader.RecordCount == 0)
        {
            // docs/metrics.md: a frame missing from the predictions predicts no lanes, so a system that output nothing
            // scores (F1 0), it is not bad input; the note says so in case the file is a failed upstream run.
            note?.Invoke(path + ": the prediction file holds no records: every frame is scored as predicting no lanes");
        }

        int missing = truthIndex.Count - present.Count;
        return (present, new FrameCoverage(truthIndex.Count, present.Count + extra, missing, extra, [], firstExtra));
    }

    /// <summary>Applies <see cref="Missing"/> and <see cref="Extra"/>: an error, or one warning line each.</summary>
    private FrameCoverage CheckCoverage(string path, FrameCoverage coverage, HashSet<int> present, Dictionary<string, int> truthIndex)
    {
        if (coverage.Missing > 0)
        {
            var first = new List<string>(FrameCoverage.Examples);
            foreach (KeyValuePair<string, int> kv in truthIndex.OrderBy(kv => kv.Value))
            {
                if (!present.Contains(kv.Value))
                {
                    first.Add(kv.Key);
                    if (first.Count == FrameCoverage.Examples)
                    {
                        break;
                    }
                }
            }

            string text = string.Create(
                CultureInfo.InvariantCulture,
                $"{coverage.Missing} of {coverage.TruthFrames} truth frames have no prediction record: {FrameCoverage.List(first, coverage.Missing)}");
            if (Missing == MissingFramePolicy.Error)
            {
                throw BadInputException.At(path, 0, "frame", text + " (--missing error)");
            }

            if (coverage.PredFrames > 0)
            {
                OnWarning?.Invoke(path + ": " + text + "; they are scored as predicting no lanes (--missing error makes this an error)");
            }

            coverage = coverage with { FirstMissing = first };
        }

        if (coverage.Extra > 0)
        {
            OnWarning?.Invoke(path + string.Create(
                CultureInfo.InvariantCulture,
                $": {coverage.Extra} prediction record(s) of frames the truth lacks are not scored: {FrameCoverage.List(coverage.FirstExtra, coverage.Extra)} (--extra error makes this an error)"));
        }

        return coverage;
    }
}
