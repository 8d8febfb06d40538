using System.Text.RegularExpressions;
using LaneBaseline.Cli.Reports;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Metrics;
using LaneBaseline.Reporting;
using LaneBaseline.Testing;
using OpenCvSharp;
using Xunit;

namespace LaneBaseline.Cli.Tests;

/// <summary>
/// The per-tag ("Worst frames by tag") gallery on a constructed set whose faults have frame scores that follow from
/// the counting rules alone (no IoU estimate needed), so the expected frames per tag are known in advance.
/// </summary>
public sealed class ReportTagGalleryTests : IDisposable
{
    private const int W = 320, H = 180;
    private const string FixedTime = "2026-01-31T12:00:00Z";
    private readonly TempDir dir = new();

    public void Dispose() => dir.Dispose();

    // Truth lanes: two straight lines, 6 px footprint (round(30*320/1640)), point tolerance 5 px (20*320/1280).
    private static readonly Lane Left = Lanes.Of((60, H - 1), (100, 100)), Right = Lanes.Of((260, H - 1), (220, 100));

    private enum Fault
    {
        /// <summary>Prediction equals truth: F1 1, point accuracy 1 (perfect, left out).</summary>
        Exact,

        /// <summary>A third line at x = 160, touching neither truth line: TP 2, FP 1 -> F1 4/5; accuracy 2/2 = 1.</summary>
        Extra,

        /// <summary>The right line missing: TP 1, FN 1 -> F1 2/3; accuracy 1/2.</summary>
        Miss,

        /// <summary>Both lines moved 40 px outwards (no overlap with a 6 px footprint, far beyond 5 px): F1 0, accuracy 0.</summary>
        Far,

        /// <summary>No lanes predicted: TP 0, FN 2 -> F1 0; accuracy 0.</summary>
        Gone,
    }

    private static Lane[] Predict(Fault fault) => fault switch
    {
        Fault.Exact => [Left, Right],
        Fault.Extra => [Left, Right, Lanes.Of((160, H - 1), (160, 100))],
        Fault.Miss => [Left],
        Fault.Far => [Lanes.Of((20, H - 1), (60, 100)), Lanes.Of((300, H - 1), (260, 100))],
        _ => [],
    };

    /// <summary>Writes frames, truth and two prediction files; returns (truth, first, second).</summary>
    private (string Frames, string Truth, string First, string Second) Scene(IReadOnlyList<(string[] Tags, Fault First, Fault Second)> frames)
    {
        string framesDir = Path.Combine(dir.Path, "frames");
        Directory.CreateDirectory(Path.Combine(framesDir, "c"));
        var truth = new List<LaneRecord>();
        var first = new List<LaneRecord>();
        var second = new List<LaneRecord>();
        for (int i = 0; i < frames.Count; i++)
        {
            string key = $"c/f{i:00}.png";
            using (var img = new Mat(H, W, MatType.CV_8UC3, new Scalar(90, 90, 90)))
            {
                Cv2.Line(img, new Point(60, H - 1), new Point(100, 100), new Scalar(230, 230, 230), 3);
                Cv2.Line(img, new Point(260, H - 1), new Point(220, 100), new Scalar(230, 230, 230), 3);
                Cv2.ImWrite(Path.Combine(framesDir, "c", $"f{i:00}.png"), img);
            }

            truth.Add(new LaneRecord { Frame = key, Width = W, Height = H, Tags = frames[i].Tags, Lanes = [Left, Right] });
            first.Add(Lanes.Pred(key, Predict(frames[i].First)));
            second.Add(Lanes.Pred(key, Predict(frames[i].Second)));
        }

        string t = dir.File("truth.lanes.jsonl"), a = dir.File("first.lanes.jsonl"), b = dir.File("second.lanes.jsonl");
        Lanes.WriteFile(t, truth);
        Lanes.WriteFile(a, first);
        Lanes.WriteFile(b, second);
        return (framesDir, t, a, b);
    }

    // Ranking rule of the gallery (frame F1 at IoU 0.50, then point accuracy, then file order), applied by hand:
    //  night: f00 perfect, f01 Extra (0.8), f02 Miss (0.667, 0.5), f04 Miss (0.667, 0.5), f05 Far (0, 0)
    //         -> f05, f02, f04 (f02 before f04 by file order; f01 cut by the cap of 3);
    //  rain:  f01 Extra (0.8), f03 Gone (0, 0), f04 Miss (0.667), f07 perfect -> f03, f04, f01;
    //  clear: f06, f07 perfect -> no failures.
    // Tags are shown worst first by the first system's F1@0.50 over the tag (docs/metrics.md counts summed over frames):
    //  night TP 2+2+1+1+0 = 6, FP 0+1+0+0+2 = 3, FN 0+0+1+1+2 = 4 -> 12/19 = 0.632; rain TP 5, FP 1, FN 3 -> 10/14 =
    //  0.714; clear 1 -> night, rain, clear (not the alphabetical clear, night, rain).
    // The second system fails only on f00 and f06 ("Gone"); showing its frames instead would give night: f00, clear: f06.
    private static readonly (string[] Tags, Fault First, Fault Second)[] Conditions =
    [
        (["night"], Fault.Exact, Fault.Gone),
        (["night", "rain"], Fault.Extra, Fault.Exact),
        (["night"], Fault.Miss, Fault.Exact),
        (["rain"], Fault.Gone, Fault.Exact),
        (["rain", "night"], Fault.Miss, Fault.Exact),
        (["night"], Fault.Far, Fault.Exact),
        (["clear"], Fault.Exact, Fault.Gone),
        (["clear", "rain"], Fault.Exact, Fault.Exact),
    ];

    private string Page((string Frames, string Truth, string First, string Second) s, string name, int threads)
    {
        string json = dir.File("s.json");
        if (!File.Exists(json))
        {
            (int code, _, string error) = CliRunner.Run("score", "--truth", s.Truth, "--pred", "first=" + s.First, "--pred", "second=" + s.Second, "--json", json, "--bootstrap", "0", "--threads", "1");
            Assert.True(code == 0, error);
        }

        // one file name in a folder per run: the page links its full-size overlays as PAGE.frames/, so the name is part of the bytes
        Directory.CreateDirectory(dir.File(name));
        string page = Path.Combine(dir.File(name), "page.html");
        (int exit, _, string err) = CliRunner.Run("report", "--score", json, "-o", page, "--generated-at", FixedTime, "--threads", threads.ToString(System.Globalization.CultureInfo.InvariantCulture),
            "--frames", s.Frames, "--truth", s.Truth, "--pred", "first=" + s.First, "--pred", "second=" + s.Second);
        Assert.True(exit == 0, err);
        return File.ReadAllText(page);
    }

    /// <summary>The per-tag section of the page.</summary>
    private static string Section(string html)
    {
        int start = html.IndexOf("<section id=\"tag-gallery\">", StringComparison.Ordinal);
        Assert.True(start >= 0, "tag-gallery section missing");
        return html[start..html.IndexOf("</section>", start, StringComparison.Ordinal)];
    }

    /// <summary>tag -> shown frame keys in page order ("-" for a 'no failures' note).</summary>
    private static string[] Shown(string section) =>
        [.. Regex.Matches(section, "<figure class=\"thumb\" data-tag=\"([^\"]+)\" data-frame=\"([^\"]+)\" data-system=\"([^\"]+)\"|<p class=\"empty\" data-tag=\"([^\"]+)\">No failures")
            .Select(m => m.Groups[1].Success ? $"{m.Groups[1].Value}:{m.Groups[2].Value}:{m.Groups[3].Value}" : m.Groups[4].Value + ":-")];

    // Source: hand derivation in the comment above Conditions (counting rules of docs/metrics.md).
    [Fact]
    public void TagGallery_ConstructedConditions_WorstFramesOfFirstSystemPerTagInOrder()
    {
        string html = Page(Scene(Conditions), "p", threads: 1);
        string section = Section(html);
        Assert.Equal(
            ["night:c/f05.png:first", "night:c/f02.png:first", "night:c/f04.png:first", "rain:c/f03.png:first", "rain:c/f04.png:first", "rain:c/f01.png:first", "clear:-"],
            Shown(section));
        Assert.Equal(["night", "rain", "clear"], [.. Regex.Matches(section, "<h3 data-tag=\"([^\"]+)\">").Select(m => m.Groups[1].Value)]);
        Assert.Contains("<h3 data-tag=\"night\">night <span class=\"note\">· 5 frames</span></h3>", section, StringComparison.Ordinal);
        Assert.Contains("No failures: every frame tagged <code>clear</code> scores perfectly.", section, StringComparison.Ordinal);
        Assert.Contains("F1@0.50 0.667 (TP 1, FP 0, FN 1) · point acc. 0.500", section, StringComparison.Ordinal);
        Assert.Contains("F1@0.50 0.800 (TP 2, FP 1, FN 0) · point acc. 1.000", section, StringComparison.Ordinal);
        Assert.DoesNotContain("tag-gallery-left-out", section, StringComparison.Ordinal);

        // Thumbnails are the gallery's: 320 px wide frames stay 320x180 (scaled down only past 480 px).
        Assert.All(Regex.Matches(section, "<img alt=\"[^\"]*\" width=\"([0-9]+)\" height=\"([0-9]+)\""), m => Assert.Equal("320x180", m.Groups[1].Value + "x" + m.Groups[2].Value));

        // The same frame under two tags carries the same picture, and it is the one of the Worst frames section.
        string[] f04 = [.. Regex.Matches(html, "data-frame=\"c/f04.png\" data-system=\"first\"><img [^>]* src=\"data:image/jpeg;base64,([^\"]+)\"").Select(m => m.Groups[1].Value)];
        Assert.Equal(3, f04.Length);
        Assert.Single(f04.Distinct(StringComparer.Ordinal));

        // Listed in the navigation and recorded with the settings.
        Assert.Contains("<a href=\"#tag-gallery\">Worst by tag</a>", html, StringComparison.Ordinal);
        Assert.Contains("<code>report.gallery_by_tag</code>", html, StringComparison.Ordinal);
    }

    // common practice: a frame under several tags is drawn once; the groups hold the very thumbnails of the gallery.
    [Fact]
    public void Build_FrameUnderSeveralTags_DrawnOnceAndShared()
    {
        var s = Scene(Conditions);
        Gallery g = WorstFrameGallery.Build(s.Frames, s.Truth, [new ScoredSystem("first", s.First), new ScoredSystem("second", s.Second)], new ScoreSettings(), threads: 1, CancellationToken.None);
        ConditionGallery byTag = Assert.IsType<ConditionGallery>(g.ByTag);
        Assert.Equal("first", byTag.System);
        GalleryFrame night = byTag.Groups.Single(x => x.Tag == "night").Worst.Single(f => f.Frame == "c/f04.png");
        GalleryFrame rain = byTag.Groups.Single(x => x.Tag == "rain").Worst.Single(f => f.Frame == "c/f04.png");
        Assert.Same(night, rain);
        Assert.Same(night, g.Frames.Single(f => f.System == "first" && f.Frame == "c/f04.png"));
        Assert.Equal([("clear", 2), ("night", 5), ("rain", 4)], byTag.Groups.Select(x => (x.Tag, x.Frames))); // frames per tag in Conditions
    }

    // Cap of 8 tags: ten tags t0..t9, met in reverse order in the file (so later, earlier-sorting tags must take the
    // places of tags met first); t0's only failing frame comes last. Every tag has the same F1 (one perfect frame, one
    // missing a line), so the worst-first order ties everywhere and falls back to tag order. Expected: t0..t7 shown, 2 left out, with the
    // worst frame of each shown tag being its one failing frame.
    [Fact]
    public void TagGallery_MoreThanEightTags_FirstEightShownAndNoteSaysHowManyLeftOut()
    {
        var frames = new List<(string[] Tags, Fault First, Fault Second)>();
        for (int t = 9; t >= 0; t--)
        {
            frames.Add(([$"t{t}"], Fault.Exact, Fault.Exact));
        }

        for (int t = 9; t >= 0; t--)
        {
            frames.Add(([$"t{t}"], Fault.Miss, Fault.Exact)); // frame 10 + (9 - t)
        }

        string section = Section(Page(Scene(frames), "p", threads: 1));
        string[] expected = [.. Enumerable.Range(0, 8).Select(t => $"t{t}:c/f{10 + 9 - t:00}.png:first")];
        Assert.Equal(expected, Shown(section));
        Assert.Contains("2 more tags are not shown here: t8, t9 (at most 8 tags", section, StringComparison.Ordinal);
        Assert.Contains("id=\"tag-gallery-left-out\"", section, StringComparison.Ordinal);
        Assert.DoesNotContain("data-tag=\"t8\"", section, StringComparison.Ordinal);
    }

    // Source: project rule "same inputs give byte-identical outputs whatever --threads is".
    [Fact]
    public void Report_TagGallery_ThreadsOneAndTwo_ByteIdenticalPage()
    {
        var s = Scene(Conditions);
        string one = Page(s, "one", threads: 1), two = Page(s, "two", threads: 2);
        Assert.Contains("data-tag=\"rain\" data-frame=", one, StringComparison.Ordinal);
        Assert.Equal(File.ReadAllBytes(dir.File("one/page.html")), File.ReadAllBytes(dir.File("two/page.html")));
        Assert.Equal(one, two);
    }
}
