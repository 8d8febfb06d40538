using LaneBaseline.Core.LaneFiles;

namespace LaneBaseline.Core.Metrics;

/// <summary>The inputs between the passes: the records kept within the point budget, and predictions joined to truth frames.</summary>
public sealed partial class ScoreRun
{
    /// <summary>
    /// The records pass 1 has validated, kept so pass 2 need not parse the inputs again, while they fit the point
    /// budget; once they do not, everything kept is dropped and pass 2 streams the files again.
    /// </summary>
    private sealed class RecordCache(int systems, long budgetPoints)
    {
        private long points;

        public List<LaneRecord> Truth { get; } = [];

        public LaneRecord?[][] Predictions { get; } = new LaneRecord?[systems][];

        /// <summary>Whether every input was kept whole (false once the budget was exceeded).</summary>
        public bool Kept { get; private set; } = budgetPoints > 0;

        public void KeepTruth(LaneRecord r)
        {
            if (Charge(r))
            {
                Truth.Add(r);
            }
        }

        public void KeepPrediction(int system, int ordinal, LaneRecord r, int truthFrames)
        {
            if (Charge(r))
            {
                (Predictions[system] ??= new LaneRecord?[truthFrames])[ordinal] = r;
            }
        }

        /// <summary>Adds a record's points to the total; false (and everything dropped) when over budget.</summary>
        private bool Charge(LaneRecord r)
        {
            if (!Kept)
            {
                return false;
            }

            points += 1;
            foreach (Lane lane in r.Lanes)
            {
                points += lane.Points.Count;
            }

            if (points <= budgetPoints)
            {
                return true;
            }

            Kept = false;
            Truth.Clear();
            Truth.TrimExcess();
            Array.Clear(Predictions);
            return false;
        }
    }

    /// <summary>Joins a prediction file to truth order, buffering only out-of-order records.</summary>
    private sealed class PredictionJoiner(ILaneRecordSource reader, Dictionary<string, int> truthIndex, HashSet<int> present)
    {
        private readonly Dictionary<int, LaneRecord> pending = [];

        public LaneRecord? Take(int ordinal)
        {
            if (!present.Contains(ordinal))
            {
                return null;
            }

            if (pending.Remove(ordinal, out LaneRecord? found))
            {
                return found;
            }

            while (reader.TryRead(out LaneRecord r))
            {
                if (!truthIndex.TryGetValue(r.Frame, out int o))
                {
                    continue; // a frame the truth lacks (--extra ignore)
                }

                if (o == ordinal)
                {
                    return r;
                }

                pending.Add(o, r);
            }

            throw new InvalidOperationException($"{reader.DisplayName} changed while it was read");
        }
    }
}
