using System.Globalization;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Metrics;
using LaneBaseline.Reporting;
using LaneBaseline.Vision.Metrics;
using OpenCvSharp;

namespace LaneBaseline.Cli.Reports;

// The largest-regressions gallery: which system is the network, frames ranked by the network-minus-baseline frame F1, drawn with matched, missed and false lanes told apart.
internal static partial class WorstFrameGallery
{
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
}
