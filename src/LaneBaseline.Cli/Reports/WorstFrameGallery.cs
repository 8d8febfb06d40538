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
    /// <param name="regressions">Where the regression gallery writes its overlays, or null for no regression gallery.</param>
    public static Gallery Build(string framesDir, string truthPath, IReadOnlyList<ScoredSystem> systems, ScoreSettings settings, int threads, CancellationToken cancellationToken, IReadOnlyList<string>? tagPriority = null, RegressionOptions? regressions = null)
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
        return Build(framesDir, truthPath, systems, candidates, tagPriority, cancellationToken, regressions);
    }

    /// <summary>Draws the gallery from candidates captured while the frames were scored (no second scoring pass).</summary>
    /// <param name="framesDir">Folder the frame keys are relative to.</param>
    /// <param name="truthPath">Truth lane file.</param>
    /// <param name="systems">Prediction lane files with their names; the per-tag gallery shows the first.</param>
    /// <param name="candidates">The frame scores of every system, captured in truth order.</param>
    /// <param name="tagPriority">Tags in the order the per-tag gallery should show them (worst first), or null for ordinal order.</param>
    /// <param name="cancellationToken">Stops between thumbnails.</param>
    /// <param name="regressions">Settings and overlay folder of the regression gallery, or null for none.</param>
    public static Gallery Build(string framesDir, string truthPath, IReadOnlyList<ScoredSystem> systems, FrameCandidates candidates, IReadOnlyList<string>? tagPriority, CancellationToken cancellationToken, RegressionOptions? regressions = null)
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
        RegressionGallery? regressionGallery = null;
        if (regressions is not null && systems.Count >= 2)
        {
            (int network, int baseline) = Roles(systems, regressions.Focus);
            regressionGallery = BuildRegressions(framesDir, truthPath, systems, candidates, regressions.Settings, network, baseline, regressions.OverlayDir, regressions.HrefPrefix, cancellationToken);
        }

        return new Gallery(frames, Selection(systems.Count))
        {
            ByTag = new ConditionGallery(systems[0].Name, groups, byTag.LeftOut, TagSelection(systems[0].Name, tagPriority is not null)),
            Regressions = regressionGallery,
        };
    }

    /// <summary>At most this many frames in the regression gallery.</summary>
    public const int MaxRegressions = 8;

    /// <summary>One sentence for the page: how the regression gallery chose its frames.</summary>
    public static string RegressionSelection(string network, string baseline) => string.Create(
        CultureInfo.InvariantCulture,
        $"Frames ranked by {network}'s frame F1 at IoU 0.50 minus {baseline}'s, most negative first (ties: lower point accuracy of {network}, then file order); only frames where {network} is worse; at most {MaxRegressions}, thumbnails at most {MaxWidthPx} px wide.");

    /// <summary>
    /// Which system is the baseline and which the network: the baseline is the system named <c>baseline</c> (or
    /// <c>base</c>), else the first; the network is <paramref name="focus"/> when given, else the first other system.
    /// </summary>
    public static (int Network, int Baseline) Roles(IReadOnlyList<ScoredSystem> systems, string? focus)
    {
        ArgumentNullException.ThrowIfNull(systems);
        int b = -1;
        for (int i = 0; i < systems.Count && b < 0; i++)
        {
            if (systems[i].Name is "baseline" or "base")
            {
                b = i;
            }
        }

        b = Math.Max(b, 0);
        int n = -1;
        for (int i = 0; i < systems.Count; i++)
        {
            if (i != b && (focus is null ? n < 0 : systems[i].Name == focus))
            {
                n = i;
            }
        }

        return (n < 0 ? (b == 0 ? 1 : 0) : n, b);
    }

    /// <summary>
    /// The largest regressions of <paramref name="network"/> against <paramref name="baseline"/>, drawn with true
    /// positives, false positives and misses apart; full-size overlays go to <paramref name="overlayDir"/> (linked as
    /// <paramref name="hrefPrefix"/> + file name) when given.
    /// </summary>
    public static RegressionGallery BuildRegressions(
        string framesDir,
        string truthPath,
        IReadOnlyList<ScoredSystem> systems,
        FrameCandidates candidates,
        ScoreSettings settings,
        int network,
        int baseline,
        string? overlayDir,
        string? hrefPrefix,
        CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(candidates);
        ArgumentNullException.ThrowIfNull(systems);
        int n = candidates.Keys.Count, worse = 0, better = 0;
        var ranked = new List<(double Delta, Candidate Net, double BaseF1)>();
        for (int i = 0; i < n; i++)
        {
            Candidate net = candidates.At(network, i), bas = candidates.At(baseline, i);
            double delta = net.F1 - bas.F1;
            if (delta < 0)
            {
                worse++;
                ranked.Add((delta, net, bas.F1));
            }
            else if (delta > 0)
            {
                better++;
            }
        }

        var chosen = ranked
            .OrderBy(r => r.Delta)
            .ThenBy(r => double.IsNaN(r.Net.PointAccuracy) ? 1.0 : r.Net.PointAccuracy)
            .ThenBy(r => r.Net.Ordinal)
            .Take(MaxRegressions)
            .ToList();
        var wanted = new HashSet<string>(chosen.Select(c => c.Net.Frame), StringComparer.Ordinal);
        Dictionary<string, LaneRecord> truth = wanted.Count == 0 ? [] : Load(truthPath, sizeRequired: true, wanted);
        Dictionary<string, LaneRecord> pred = wanted.Count == 0 ? [] : Load(systems[network].Path, sizeRequired: false, wanted);
        var frames = new List<RegressionFrame>();
        if (chosen.Count > 0 && overlayDir is not null)
        {
            Directory.CreateDirectory(overlayDir);
        }

        using var rasterizer = new OpenCvLaneRasterizer();
        var scorer = new FrameScorer(rasterizer, settings);
        for (int k = 0; k < chosen.Count; k++)
        {
            cancellationToken.ThrowIfCancellationRequested();
            Candidate c = chosen[k].Net;
            LaneRecord t = truth[c.Frame];
            LaneRecord? p = pred.GetValueOrDefault(c.Frame);
            (bool[] found, bool[] hit) = scorer.MatchAtHalf(t, p);
            using Mat full = LoadImage(framesDir, t);
            DrawMatched(full, t, p, found, hit, 1.0);
            string? href = null;
            if (overlayDir is not null)
            {
                string name = string.Create(CultureInfo.InvariantCulture, $"{k + 1:000}_") + string.Concat(c.Frame.Select(ch => char.IsLetterOrDigit(ch) || ch is '-' or '_' or '.' ? ch : '_'));
                name = Path.ChangeExtension(name, ".png");
                Cv2.ImEncode(".png", full, out byte[] png);
                using (var file = new AtomicFile(Path.Combine(overlayDir, name)))
                {
                    file.Stream.Write(png);
                    file.Commit();
                }

                href = (hrefPrefix ?? string.Empty) + Uri.EscapeDataString(name);
            }

            using Mat image = LoadImage(framesDir, t);
            double scale = Math.Min(1.0, (double)MaxWidthPx / image.Width);
            int tw = Math.Max(1, (int)Math.Round(image.Width * scale)), th = Math.Max(1, (int)Math.Round(image.Height * scale));
            using var thumb = new Mat();
            Cv2.Resize(image, thumb, new Size(tw, th), 0, 0, InterpolationFlags.Area);
            DrawMatched(thumb, t, p, found, hit, scale);
            Cv2.ImEncode(".jpg", thumb, out byte[] jpeg, new ImageEncodingParam(ImwriteFlags.JpegQuality, JpegQuality));
            var g = new GalleryFrame(systems[network].Name, c.Frame, c.Tags, c.Tp, c.Fp, c.Fn, c.F1, c.PointAccuracy, jpeg, tw, th);
            frames.Add(new RegressionFrame(g, chosen[k].BaseF1, href));
        }

        return new RegressionGallery(systems[network].Name, systems[baseline].Name, frames, worse, better, n, RegressionSelection(systems[network].Name, systems[baseline].Name));
    }

    /// <summary>
    /// Our regression look: found truth lanes as a broad green band, missed ones as a broad brick-red band with ticks
    /// across it; matching predictions as a magenta line with dots, predictions matching nothing as an ochre dashed line.
    /// </summary>
    private static void DrawMatched(Mat canvas, LaneRecord truth, LaneRecord? prediction, bool[] found, bool[] hit, double scale)
    {
        _ = scale;
        int band = Math.Clamp((int)Math.Round(canvas.Width / 80.0), 3, 16);
        int line = Math.Max(2, band / 3);
        for (int i = 0; i < truth.Lanes.Count; i++)
        {
            Point[] pts = Scaled(truth.Lanes[i], scale);
            Scalar color = Bgr(found[i] ? OverlayColors.TruthHex : OverlayColors.MissHex);
            Cv2.Polylines(canvas, [pts], isClosed: false, color, band, LineTypes.AntiAlias);
            if (!found[i])
            {
                // ticks across the band every ~4 band widths mark a miss without relying on colour alone
                foreach ((Point a, Point b) in Ticks(pts, band * 4.0, band * 1.2))
                {
                    Cv2.Line(canvas, a, b, Bgr(Palette.Ink), Math.Max(1, line / 2), LineTypes.AntiAlias);
                }
            }
        }

        IReadOnlyList<Lane> lanes = prediction?.Lanes ?? [];
        for (int j = 0; j < lanes.Count; j++)
        {
            Point[] pts = Scaled(lanes[j], scale);
            if (hit[j])
            {
                Scalar color = Bgr(OverlayColors.PredictionHex);
                Cv2.Polylines(canvas, [pts], isClosed: false, color, line, LineTypes.AntiAlias);
                foreach (Point p in pts)
                {
                    Cv2.Circle(canvas, p, line + 1, color, -1, LineTypes.AntiAlias);
                }
            }
            else
            {
                foreach ((Point a, Point b) in Dashes(pts, band * 1.5))
                {
                    Cv2.Line(canvas, a, b, Bgr(OverlayColors.FalsePositiveHex), line + 1, LineTypes.AntiAlias);
                }
            }
        }
    }

    /// <summary>Short segments perpendicular to the polyline every <paramref name="step"/> px of its length.</summary>
    private static IEnumerable<(Point, Point)> Ticks(Point[] pts, double step, double half)
    {
        double carry = step / 2;
        for (int i = 1; i < pts.Length; i++)
        {
            double dx = pts[i].X - pts[i - 1].X, dy = pts[i].Y - pts[i - 1].Y, len = Math.Sqrt((dx * dx) + (dy * dy));
            if (len < 1e-9)
            {
                continue;
            }

            double ux = dx / len, uy = dy / len;
            for (double at = carry; at < len; at += step)
            {
                double x = pts[i - 1].X + (ux * at), y = pts[i - 1].Y + (uy * at);
                yield return (new Point((int)Math.Round(x - (uy * half)), (int)Math.Round(y + (ux * half))), new Point((int)Math.Round(x + (uy * half)), (int)Math.Round(y - (ux * half))));
            }

            carry = ((carry - len) % step + step) % step;
        }
    }

    /// <summary>Dashes along the polyline: on for <paramref name="dash"/> px, off for the same.</summary>
    private static IEnumerable<(Point, Point)> Dashes(Point[] pts, double dash)
    {
        double phase = 0; // position within one on+off period
        for (int i = 1; i < pts.Length; i++)
        {
            double dx = pts[i].X - pts[i - 1].X, dy = pts[i].Y - pts[i - 1].Y, len = Math.Sqrt((dx * dx) + (dy * dy));
            double at = 0;
            while (at < len)
            {
                double left = (phase < dash ? dash : 2 * dash) - phase, step = Math.Min(left, len - at);
                if (phase < dash && len > 0)
                {
                    double x0 = pts[i - 1].X + (dx * at / len), y0 = pts[i - 1].Y + (dy * at / len);
                    double x1 = pts[i - 1].X + (dx * (at + step) / len), y1 = pts[i - 1].Y + (dy * (at + step) / len);
                    yield return (new Point((int)Math.Round(x0), (int)Math.Round(y0)), new Point((int)Math.Round(x1), (int)Math.Round(y1)));
                }

                at += step;
                phase = (phase + step) % (2 * dash);
            }
        }
    }

    private static Mat LoadImage(string framesDir, LaneRecord truth)
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

        Mat image = Cv2.ImRead(path, ImreadModes.Color);
        if (image.Empty() || image.Width != truth.Width || image.Height != truth.Height)
        {
            string why = image.Empty() ? $"cannot be read as an image (frame '{truth.Frame}')"
                : string.Create(CultureInfo.InvariantCulture, $"image is {image.Width}x{image.Height} but the truth gives {truth.Width}x{truth.Height} for frame '{truth.Frame}'");
            image.Dispose();
            throw BadInputException.At(path, 0, null, why);
        }

        return image;
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
                int tp = f.TruePositives[half];
                double f1 = FrameF1(tp, f.PredLanes, f.TruthLanes), acc = f.FramePointAccuracy;
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
