using System.Globalization;
using LaneBaseline.Core;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Metrics;
using LaneBaseline.Reporting;
using LaneBaseline.Vision.Metrics;
using OpenCvSharp;

namespace LaneBaseline.Cli.Reports;

/// <summary>
/// Picks each system's worst frames and draws them as small JPEG thumbnails with truth and prediction overlaid, for
/// the report's gallery. Frames are ranked by frame F1 at IoU 0.50, then frame point accuracy, then truth order
/// (scored with the same <see cref="ScoreRun"/> as <c>score</c>); perfect frames are left out. Drawing lives here because it needs OpenCV; the report project only embeds the bytes.
/// </summary>
internal static class WorstFrameGallery
{
    /// <summary>At most this many thumbnails in one report.</summary>
    public const int MaxThumbnails = 12;

    /// <summary>Thumbnails are scaled down to at most this width in pixels (never up).</summary>
    public const int MaxWidthPx = 480;

    /// <summary>JPEG quality of the thumbnails.</summary>
    public const int JpegQuality = 80;

    /// <summary>At most this many tags get a group in the per-tag gallery (the first ones in ordinal order, as in the per-tag chart).</summary>
    public const int MaxTags = 8;

    /// <summary>At most this many thumbnails per tag in the per-tag gallery.</summary>
    public const int PerTag = 3;

    private const int TruthThickness = 5;
    private const int PredictionThickness = 2;

    /// <summary>One sentence for the page: how frames were chosen and the caps.</summary>
    public static string Selection(int systems) => string.Create(
        CultureInfo.InvariantCulture,
        $"Up to {PerSystem(systems)} worst frames per system, ranked by frame F1 at IoU 0.50, then frame point accuracy, then file order; frames that score perfectly (F1 1 and point accuracy 1, or no lanes at all) are left out. Caps: at most {MaxThumbnails} thumbnails per report, each at most {MaxWidthPx} px wide, JPEG quality {JpegQuality}.");

    /// <summary>One sentence for the page: how the per-tag gallery chose its frames.</summary>
    public static string TagSelection(string system, bool worstFirst = false) => string.Create(
        CultureInfo.InvariantCulture,
        $"For each tag of the truth ({(worstFirst ? $"the {MaxTags} tags where {system} scores the lowest F1 at IoU 0.50, worst first" : $"in the order of the By tag section, at most {MaxTags} tags")}), up to {PerTag} worst frames of the first system ({system}) among the frames carrying that tag, ranked as in Worst frames (frame F1 at IoU 0.50, then point accuracy, then file order, perfect frames left out); a frame can appear under several tags.");

    public static int PerSystem(int systems) => Math.Max(1, MaxThumbnails / Math.Max(1, systems));

    /// <summary>Scores every frame (streaming; only small candidates are kept), then draws the chosen frames once each.</summary>
    /// <param name="framesDir">Folder the frame keys are relative to.</param>
    /// <param name="truthPath">Truth lane file.</param>
    /// <param name="systems">Prediction lane files with their names; the per-tag gallery shows the first.</param>
    /// <param name="settings">Scoring settings of the score run.</param>
    /// <param name="threads">Worker threads for the scoring pass (the result does not depend on it).</param>
    /// <param name="cancellationToken">Stops between batches and between thumbnails.</param>
    /// <param name="tagPriority">Tags in the order the per-tag gallery should show them (worst first), or null for ordinal order.</param>
    public static Gallery Build(string framesDir, string truthPath, IReadOnlyList<ScoredSystem> systems, ScoreSettings settings, int threads, CancellationToken cancellationToken, IReadOnlyList<string>? tagPriority = null)
    {
        if (!Directory.Exists(framesDir))
        {
            throw BadInputException.At(framesDir, 0, null, "frames folder not found");
        }

        var candidates = new FrameCandidates(systems.Count, settings.HalfIndex);
        var run = new ScoreRun(truthPath, systems, settings)
        {
            Threads = Math.Max(1, threads),
            OnFrame = candidates.Add,
        };
        run.Execute(CreateRasterizer, cancellationToken);
        return Build(framesDir, truthPath, systems, candidates, tagPriority, cancellationToken);
    }

    /// <summary>Draws the gallery from candidates captured while the frames were scored (no second scoring pass).</summary>
    /// <param name="framesDir">Folder the frame keys are relative to.</param>
    /// <param name="truthPath">Truth lane file.</param>
    /// <param name="systems">Prediction lane files with their names; the per-tag gallery shows the first.</param>
    /// <param name="candidates">The frame scores of every system, captured in truth order.</param>
    /// <param name="tagPriority">Tags in the order the per-tag gallery should show them (worst first), or null for ordinal order.</param>
    /// <param name="cancellationToken">Stops between thumbnails.</param>
    public static Gallery Build(string framesDir, string truthPath, IReadOnlyList<ScoredSystem> systems, FrameCandidates candidates, IReadOnlyList<string>? tagPriority, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(candidates);
        if (!Directory.Exists(framesDir))
        {
            throw BadInputException.At(framesDir, 0, null, "frames folder not found");
        }

        List<Candidate>[] ranked = candidates.Ranked;
        TagCandidates byTag = candidates.TagGroups(tagPriority);
        int take = PerSystem(systems.Count);
        Candidate[][] chosen = [.. ranked.Select(list => list.Order(Worst).Take(take).ToArray())];
        IReadOnlyList<(string Tag, int Frames, IReadOnlyList<Candidate> Worst)> tagGroups = byTag.Groups();

        var wanted = new HashSet<string>(chosen.SelectMany(c => c).Concat(tagGroups.SelectMany(g => g.Worst)).Select(c => c.Frame), StringComparer.Ordinal);
        Dictionary<string, LaneRecord> truth = Load(truthPath, sizeRequired: true, wanted);
        var frames = new List<GalleryFrame>();
        var drawnFirst = new Dictionary<string, GalleryFrame>(StringComparer.Ordinal); // the first system's thumbnails, drawn once
        for (int s = 0; s < systems.Count; s++)
        {
            Dictionary<string, LaneRecord> pred = Load(systems[s].Path, sizeRequired: false, wanted);
            GalleryFrame Thumb(Candidate c)
            {
                if (s == 0 && drawnFirst.TryGetValue(c.Frame, out GalleryFrame? done))
                {
                    return done;
                }

                cancellationToken.ThrowIfCancellationRequested();
                (byte[] jpeg, int w, int h) = Draw(framesDir, truth[c.Frame], pred.GetValueOrDefault(c.Frame));
                var g = new GalleryFrame(systems[s].Name, c.Frame, c.Tags, c.Tp, c.Fp, c.Fn, c.F1, c.PointAccuracy, jpeg, w, h);
                if (s == 0)
                {
                    drawnFirst.Add(c.Frame, g);
                }

                return g;
            }

            frames.AddRange(chosen[s].Select(Thumb));
            if (s == 0)
            {
                foreach (Candidate c in tagGroups.SelectMany(g => g.Worst))
                {
                    Thumb(c);
                }
            }
        }

        var groups = tagGroups.Select(g => new ConditionGroup(g.Tag, g.Frames, [.. g.Worst.Select(c => drawnFirst[c.Frame])])).ToList();
        return new Gallery(frames, Selection(systems.Count))
        {
            ByTag = new ConditionGallery(systems[0].Name, groups, byTag.LeftOut, TagSelection(systems[0].Name, tagPriority is not null)),
        };
    }

    /// <summary>The gallery's order: lowest frame F1 first, then lowest point accuracy (none counts as 1), then file order.</summary>
    private static readonly Comparer<Candidate> Worst = Comparer<Candidate>.Create((a, b) =>
    {
        int c = a.F1.CompareTo(b.F1);
        if (c == 0)
        {
            c = (double.IsNaN(a.PointAccuracy) ? 1.0 : a.PointAccuracy).CompareTo(double.IsNaN(b.PointAccuracy) ? 1.0 : b.PointAccuracy);
        }

        return c != 0 ? c : a.Ordinal.CompareTo(b.Ordinal);
    });

    /// <summary>Frame F1 from counts; 1 for a frame with neither truth nor prediction (docs/metrics.md).</summary>
    internal static double FrameF1(int tp, int pred, int truth) =>
        pred + truth == 0 ? 1.0 : 2.0 * tp / (pred + truth);

    private static Dictionary<string, LaneRecord> Load(string path, bool sizeRequired, HashSet<string> wanted)
    {
        var found = new Dictionary<string, LaneRecord>(StringComparer.Ordinal);
        using LaneFileReader reader = LaneFileReader.Open(path, sizeRequired);
        while (reader.TryRead(out LaneRecord r))
        {
            if (wanted.Contains(r.Frame))
            {
                found[r.Frame] = r;
            }
        }

        return found;
    }

    /// <summary>Reads the frame image and draws truth (broad band) then prediction (thin line, dots at points).</summary>
    private static (byte[] Jpeg, int Width, int Height) Draw(string framesDir, LaneRecord truth, LaneRecord? prediction)
    {
        if (truth.Frame.StartsWith("VIDEO#", StringComparison.Ordinal))
        {
            throw BadInputException.At(truth.Frame, 0, null, "video frames cannot be drawn in the gallery; pass a folder of images");
        }

        string path = Path.Combine(framesDir, truth.Frame.Replace('/', Path.DirectorySeparatorChar));
        if (!File.Exists(path))
        {
            throw BadInputException.At(path, 0, null, $"image of frame '{truth.Frame}' not found under --frames");
        }

        using Mat image = Cv2.ImRead(path, ImreadModes.Color);
        if (image.Empty())
        {
            throw BadInputException.At(path, 0, null, $"cannot be read as an image (frame '{truth.Frame}')");
        }

        if (image.Width != truth.Width || image.Height != truth.Height)
        {
            throw BadInputException.At(path, 0, null, string.Create(
                CultureInfo.InvariantCulture,
                $"image is {image.Width}x{image.Height} but the truth gives {truth.Width}x{truth.Height} for frame '{truth.Frame}'"));
        }

        double scale = Math.Min(1.0, (double)MaxWidthPx / image.Width);
        int tw = Math.Max(1, (int)Math.Round(image.Width * scale)), th = Math.Max(1, (int)Math.Round(image.Height * scale));
        using var thumb = new Mat();
        Cv2.Resize(image, thumb, new Size(tw, th), 0, 0, InterpolationFlags.Area);
        Scalar truthColor = Bgr(OverlayColors.TruthHex), predColor = Bgr(OverlayColors.PredictionHex);
        foreach (Lane lane in truth.Lanes)
        {
            Cv2.Polylines(thumb, [Scaled(lane, scale)], isClosed: false, truthColor, TruthThickness, LineTypes.AntiAlias);
        }

        foreach (Lane lane in prediction?.Lanes ?? [])
        {
            Point[] pts = Scaled(lane, scale);
            Cv2.Polylines(thumb, [pts], isClosed: false, predColor, PredictionThickness, LineTypes.AntiAlias);
            foreach (Point p in pts)
            {
                Cv2.Circle(thumb, p, 3, predColor, -1, LineTypes.AntiAlias);
            }
        }

        Cv2.ImEncode(".jpg", thumb, out byte[] jpeg, new ImageEncodingParam(ImwriteFlags.JpegQuality, JpegQuality));
        return (jpeg, tw, th);
    }

    private static Point[] Scaled(Lane lane, double scale) =>
        [.. lane.Points.Select(p => new Point((int)Math.Round(p.X * scale, MidpointRounding.ToEven), (int)Math.Round(p.Y * scale, MidpointRounding.ToEven)))];

    private static Scalar Bgr(string hex)
    {
        (byte r, byte g, byte b) = OverlayColors.Rgb(hex);
        return new Scalar(b, g, r);
    }

#pragma warning disable IDISP005 // ScoreRun owns and disposes the rasterizers it creates
    private static ILaneRasterizer CreateRasterizer() => new OpenCvLaneRasterizer();
#pragma warning restore IDISP005

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
        }

        internal List<Candidate>[] Ranked { get; }

        /// <summary>Takes one frame's scores (one per system), in truth order.</summary>
        public void Add(IReadOnlyList<FrameScore> row)
        {
            ArgumentNullException.ThrowIfNull(row);
            for (int s = 0; s < row.Count; s++)
            {
                FrameScore f = row[s];
                int tp = f.TruePositives[half];
                double f1 = FrameF1(tp, f.PredLanes, f.TruthLanes), acc = f.FramePointAccuracy;
                bool perfect = f1 >= 1.0 && (double.IsNaN(acc) || acc >= 1.0); // perfect (or empty) frames teach nothing in a gallery of failures
                Candidate? c = perfect ? null : new Candidate(ordinal, f.Frame, f.Tags, tp, f.PredLanes - tp, f.TruthLanes - tp, f1, acc);
                if (s == 0)
                {
                    first.Add((f.Tags, c));
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

    internal sealed record Candidate(int Ordinal, string Frame, IReadOnlyList<string> Tags, int Tp, int Fp, int Fn, double F1, double PointAccuracy);
}
