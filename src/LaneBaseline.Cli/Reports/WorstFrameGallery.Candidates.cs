using LaneBaseline.Core.Metrics;

namespace LaneBaseline.Cli.Reports;

// Choosing frames for the galleries: the worst-frame and per-tag candidate lists and their ranking records.
internal static partial class WorstFrameGallery
{
    /// <summary>
    /// The per-tag candidates while streaming: the <c>maxTags</c> ordinally first tags seen so far, each with its
    /// <c>perTag</c> worst imperfect frames and its frame count; later tags are only counted. Memory stays at
    /// maxTags x perTag candidates whatever the length of the file (plus the distinct tag names, for the count).
    /// </summary>
    /// With a <c>priority</c> list, exactly its first <c>maxTags</c> tags are kept and shown in its order.
    internal sealed class TagCandidates(int maxTags, int perTag, IReadOnlyList<string>? priority)
    {
        private readonly SortedDictionary<string, (int Frames, List<Candidate> Worst)> kept = new(StringComparer.Ordinal);
        private readonly HashSet<string> seen = new(StringComparer.Ordinal);
        private readonly Dictionary<string, int>? wanted = priority?.Distinct(StringComparer.Ordinal).Take(maxTags)
            .Select((t, i) => (t, i)).ToDictionary(x => x.t, x => x.i, StringComparer.Ordinal);

        /// <summary>Tags seen but not kept: in priority order when there is one, else ordinal.</summary>
        public IReadOnlyList<string> LeftOut => [.. seen.Where(t => !kept.ContainsKey(t)).OrderBy(t => priority is null ? 0 : Rank(t)).ThenBy(t => t, StringComparer.Ordinal)];

        private int Rank(string tag)
        {
            for (int i = 0; i < priority!.Count; i++)
            {
                if (priority[i] == tag)
                {
                    return i;
                }
            }

            return int.MaxValue;
        }

        /// <summary>Counts one frame of the first system under each of its tags; <paramref name="candidate"/> is null for a perfect frame.</summary>
        public void Add(IReadOnlyList<string> tags, Candidate? candidate)
        {
            foreach (string tag in tags.Distinct(StringComparer.Ordinal))
            {
                if (!kept.TryGetValue(tag, out (int Frames, List<Candidate> Worst) entry))
                {
                    if (!seen.Add(tag))
                    {
                        continue; // seen before and left out: no ordinally earlier tag can reclaim its place
                    }

                    if (wanted is not null)
                    {
                        if (!wanted.ContainsKey(tag))
                        {
                            continue;
                        }
                    }
                    else if (kept.Count == maxTags)
                    {
                        string last = kept.Keys.Last();
                        if (StringComparer.Ordinal.Compare(tag, last) > 0)
                        {
                            continue;
                        }

                        kept.Remove(last); // a later tag's place goes to this earlier one (its frames start here)
                    }

                    entry = (0, new List<Candidate>(perTag + 1));
                }

                if (candidate is not null)
                {
                    int at = entry.Worst.BinarySearch(candidate, Worst);
                    entry.Worst.Insert(at < 0 ? ~at : at, candidate);
                    if (entry.Worst.Count > perTag)
                    {
                        entry.Worst.RemoveAt(perTag);
                    }
                }

                kept[tag] = (entry.Frames + 1, entry.Worst);
            }
        }

        public IReadOnlyList<(string Tag, int Frames, IReadOnlyList<Candidate> Worst)> Groups() =>
            [.. kept.OrderBy(kv => wanted?[kv.Key] ?? 0).Select(kv => (kv.Key, kv.Value.Frames, (IReadOnlyList<Candidate>)kv.Value.Worst))];
    }

    /// <summary>
    /// The gallery's candidates, captured from frame scores as a score run produces them (hand <see cref="Add"/> to
    /// <see cref="ScoreRun.OnFrame"/>), so <c>score --report</c> draws its gallery without scoring the frames again.
    /// Keeps one small candidate per imperfect frame and system, and the first system's tags per frame.
    /// </summary>
    internal sealed class FrameCandidates
    {
        private readonly int half;
        private readonly List<(IReadOnlyList<string> Tags, Candidate? Candidate)> first = [];
        private int ordinal;

        public FrameCandidates(int systems, int halfIndex)
        {
            half = halfIndex;
            Ranked = [.. Enumerable.Range(0, systems).Select(_ => new List<Candidate>())];
            All = [.. Enumerable.Range(0, systems).Select(_ => new List<(int Tp, int Pred, int Truth, double Acc)>())];
        }

        internal List<Candidate>[] Ranked { get; }

        /// <summary>Every frame's counts per system (a few numbers per frame), for the regression gallery.</summary>
        internal List<(int Tp, int Pred, int Truth, double Acc)>[] All { get; }

        /// <summary>Frame keys in truth order.</summary>
        internal List<string> Keys { get; } = [];

        /// <summary>The frame scores of frame <paramref name="at"/> of system <paramref name="system"/> as a candidate.</summary>
        internal Candidate At(int system, int at)
        {
            (int tp, int pred, int truth, double acc) = All[system][at];
            return new Candidate(at, Keys[at], first[at].Tags, tp, pred - tp, truth - tp, FrameF1(tp, pred, truth), acc);
        }

        /// <summary>Takes one frame's scores (one per system), in truth order.</summary>
        public void Add(IReadOnlyList<FrameScore> row)
        {
            ArgumentNullException.ThrowIfNull(row);
            for (int s = 0; s < row.Count; s++)
            {
                FrameScore f = row[s];
                int tp = f.IouF1.TruePositives[half];
                double f1 = FrameF1(tp, f.PredLanes, f.TruthLanes), acc = f.Points.FrameAccuracy(f.TruthLanes);
                All[s].Add((tp, f.PredLanes, f.TruthLanes, acc));
                bool perfect = f1 >= 1.0 && (double.IsNaN(acc) || acc >= 1.0); // perfect (or empty) frames teach nothing in a gallery of failures
                Candidate? c = perfect ? null : new Candidate(ordinal, f.Frame, f.Tags, tp, f.PredLanes - tp, f.TruthLanes - tp, f1, acc);
                if (s == 0)
                {
                    first.Add((f.Tags, c));
                    Keys.Add(f.Frame);
                }

                if (c is not null)
                {
                    Ranked[s].Add(c);
                }
            }

            ordinal++;
        }

        /// <summary>The per-tag candidates, replayed in truth order once the tag priority is known.</summary>
        internal TagCandidates TagGroups(IReadOnlyList<string>? priority)
        {
            var groups = new TagCandidates(MaxTags, PerTag, priority);
            foreach ((IReadOnlyList<string> tags, Candidate? c) in first)
            {
                groups.Add(tags, c);
            }

            return groups;
        }
    }

    /// <summary>What the regression gallery needs beyond the frames.</summary>
    /// <param name="Settings">Scoring settings (lane width) of the score run, to draw matches as they were counted.</param>
    /// <param name="Focus">The network (<c>--focus</c>), or null for the first system that is not the baseline.</param>
    /// <param name="OverlayDir">Folder for the full-size overlays, or null for none.</param>
    /// <param name="HrefPrefix">Relative link from the page to that folder, ending in '/'.</param>
    internal sealed record RegressionOptions(ScoreSettings Settings, string? Focus, string? OverlayDir, string? HrefPrefix);

    internal sealed record Candidate(int Ordinal, string Frame, IReadOnlyList<string> Tags, int Tp, int Fp, int Fn, double F1, double PointAccuracy);
}
