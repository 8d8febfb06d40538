using System.Globalization;
using LaneBaseline.Core;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Metrics;
using LaneBaseline.Reporting;
using LaneBaseline.Vision.Metrics;
using OpenCvSharp;

namespace LaneBaseline.Cli.Reports;

// Drawing one gallery thumbnail: the frame image, truth and prediction overlaid, scaled and encoded as JPEG.
internal static partial class WorstFrameGallery
{
    private const int TruthThickness = 5;

    private const int PredictionThickness = 2;

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
}
