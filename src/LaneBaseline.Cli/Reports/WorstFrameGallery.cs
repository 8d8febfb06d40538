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

    private const int TruthThickness = 5;
    private const int PredictionThickness = 2;

    /// <summary>One sentence for the page: how frames were chosen and the caps.</summary>
    public static string Selection(int systems) => string.Create(
        CultureInfo.InvariantCulture,
        $"Up to {PerSystem(systems)} worst frames per system, ranked by frame F1 at IoU 0.50, then frame point accuracy, then file order; frames that score perfectly (F1 1 and point accuracy 1, or no lanes at all) are left out. Caps: at most {MaxThumbnails} thumbnails per report, each at most {MaxWidthPx} px wide, JPEG quality {JpegQuality}.");

    public static int PerSystem(int systems) => Math.Max(1, MaxThumbnails / Math.Max(1, systems));

    public static Gallery Build(string framesDir, string truthPath, IReadOnlyList<ScoredSystem> systems, ScoreSettings settings, CancellationToken cancellationToken)
    {
        if (!Directory.Exists(framesDir))
        {
            throw BadInputException.At(framesDir, 0, null, "frames folder not found");
        }

        int half = settings.HalfIndex;
        var ranked = systems.Select(_ => new List<Candidate>()).ToArray();
        int ordinal = 0;
        var run = new ScoreRun(truthPath, systems, settings)
        {
            Threads = 1,
            OnFrame = row =>
            {
                for (int s = 0; s < row.Count; s++)
                {
                    FrameScore f = row[s];
                    int tp = f.TruePositives[half];
                    double f1 = FrameF1(tp, f.PredLanes, f.TruthLanes), acc = f.FramePointAccuracy;
                    if (f1 >= 1.0 && (double.IsNaN(acc) || acc >= 1.0))
                    {
                        continue; // perfect (or empty) frames teach nothing in a gallery of failures
                    }

                    ranked[s].Add(new Candidate(ordinal, f.Frame, f.Tags, tp, f.PredLanes - tp, f.TruthLanes - tp, f1, acc));
                }

                ordinal++;
            },
        };
        run.Execute(CreateRasterizer, cancellationToken);

        int take = PerSystem(systems.Count);
        Candidate[][] chosen = [.. ranked.Select(list => list
            .OrderBy(c => c.F1)
            .ThenBy(c => double.IsNaN(c.PointAccuracy) ? 1.0 : c.PointAccuracy)
            .ThenBy(c => c.Ordinal)
            .Take(take)
            .ToArray())];

        var wanted = new HashSet<string>(chosen.SelectMany(c => c).Select(c => c.Frame), StringComparer.Ordinal);
        Dictionary<string, LaneRecord> truth = Load(truthPath, sizeRequired: true, wanted);
        var frames = new List<GalleryFrame>();
        for (int s = 0; s < systems.Count; s++)
        {
            Dictionary<string, LaneRecord> pred = Load(systems[s].Path, sizeRequired: false, wanted);
            foreach (Candidate c in chosen[s])
            {
                cancellationToken.ThrowIfCancellationRequested();
                LaneRecord t = truth[c.Frame];
                (byte[] jpeg, int w, int h) = Draw(framesDir, t, pred.GetValueOrDefault(c.Frame));
                frames.Add(new GalleryFrame(systems[s].Name, c.Frame, c.Tags, c.Tp, c.Fp, c.Fn, c.F1, c.PointAccuracy, jpeg, w, h));
            }
        }

        return new Gallery(frames, Selection(systems.Count));
    }

    /// <summary>Frame F1 from counts; 1 for a frame with neither truth nor prediction (metrics specification).</summary>
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

    private sealed record Candidate(int Ordinal, string Frame, IReadOnlyList<string> Tags, int Tp, int Fp, int Fn, double F1, double PointAccuracy);
}
