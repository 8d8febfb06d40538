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
internal static partial class WorstFrameGallery
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
}
