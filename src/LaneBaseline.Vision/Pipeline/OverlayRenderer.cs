using System.Globalization;
using LaneBaseline.Core.Results;
using OpenCvSharp;

namespace LaneBaseline.Vision.Pipeline;

/// <summary>
/// Draws the project's overlay: thin polylines coloured by slot, a small legend with slot and confidence, the
/// vanishing point as a small cross and the region outline as a thin grey line. No filled lane areas.
/// Also builds the stage contact sheet (every intermediate image of one frame on one PNG).
/// </summary>
public static class OverlayRenderer
{
    /// <summary>Line colour (BGR) of a slot: −3 blue, −2 teal, −1 amber, +1 violet, +2 lime, +3 yellow; others grey.</summary>
    public static Scalar SlotColor(int slot) => slot switch
    {
        -2 => new Scalar(200, 190, 0),
        -1 => new Scalar(0, 170, 255),
        1 => new Scalar(255, 90, 200),
        2 => new Scalar(60, 230, 110),
        -3 => new Scalar(230, 120, 40),
        3 => new Scalar(40, 220, 230),
        _ => new Scalar(180, 180, 180),
    };

    /// <summary>Draws the overlay of the workspace's current frame into <paramref name="canvas"/> (a BGR copy the caller owns).</summary>
    public static void Draw(FrameWorkspace ws, Mat canvas)
    {
        ArgumentNullException.ThrowIfNull(ws);
        ArgumentNullException.ThrowIfNull(canvas);
        int thickness = Math.Max(1, (int)Math.Round(ws.Width / 640.0));
        double[] q = ws.Region.Trapezoid;
        var grey = new Scalar(150, 150, 150);
        Cv2.Line(canvas, P(q[0], q[1]), P(q[2], q[3]), grey, 1, LineTypes.AntiAlias);
        Cv2.Line(canvas, P(q[0], q[1]), P(q[6], q[7]), grey, 1, LineTypes.AntiAlias);
        Cv2.Line(canvas, P(q[2], q[3]), P(q[4], q[5]), grey, 1, LineTypes.AntiAlias);
        int c = Math.Max(4, ws.Width / 160);
        var vpColor = ws.Region.VanishingSource == VanishingSource.Preset ? new Scalar(0, 0, 255) : new Scalar(255, 255, 255);
        Cv2.Line(canvas, P(ws.Region.VanishingX - c, ws.Region.VanishingY), P(ws.Region.VanishingX + c, ws.Region.VanishingY), vpColor, 1, LineTypes.AntiAlias);
        Cv2.Line(canvas, P(ws.Region.VanishingX, ws.Region.VanishingY - c), P(ws.Region.VanishingX, ws.Region.VanishingY + c), vpColor, 1, LineTypes.AntiAlias);

        for (int i = 0; i < ws.LaneCount; i++)
        {
            LaneEstimate lane = ws.Lanes[i];
            ReadOnlySpan<double> pts = ws.GetLanePoints(i);
            Scalar color = SlotColor(lane.Slot);
            for (int k = 1; k < lane.PointCount; k++)
            {
                Cv2.Line(canvas, P(pts[2 * (k - 1)], pts[(2 * k) - 1]), P(pts[2 * k], pts[(2 * k) + 1]), color, thickness, LineTypes.AntiAlias);
            }

            for (int k = 0; k < lane.PointCount; k++)
            {
                Cv2.Circle(canvas, P(pts[2 * k], pts[(2 * k) + 1]), thickness + 1, color, -1, LineTypes.AntiAlias);
            }
        }

        DrawLegend(ws, canvas);
    }

    private static void DrawLegend(FrameWorkspace ws, Mat canvas)
    {
        double fs = Math.Max(0.35, ws.Width / 2400.0);
        int lineH = (int)Math.Round(22 * fs / 0.5);
        int x0 = 8, y0 = 8, boxW = (int)Math.Round(150 * fs / 0.5), boxH = (lineH * (Math.Max(1, ws.LaneCount) + 1)) + 6;
        using (Mat roi = new Mat(canvas, new Rect(x0, y0, Math.Min(boxW, canvas.Cols - x0), Math.Min(boxH, canvas.Rows - y0))))
        {
            Cv2.AddWeighted(roi, 0.35, roi, 0, 0, roi);
        }

        string head = ws.LaneCount == 0 ? "no lanes" : "slot  score";
        Cv2.PutText(canvas, head, new Point(x0 + 6, y0 + lineH - 6), HersheyFonts.HersheySimplex, fs, new Scalar(230, 230, 230), 1, LineTypes.AntiAlias);
        for (int i = 0; i < ws.LaneCount; i++)
        {
            LaneEstimate lane = ws.Lanes[i];
            int y = y0 + (lineH * (i + 2)) - 6;
            Cv2.Line(canvas, new Point(x0 + 6, y - (lineH / 3)), new Point(x0 + 6 + (lineH / 1), y - (lineH / 3)), SlotColor(lane.Slot), 2, LineTypes.AntiAlias);
            string text = string.Create(CultureInfo.InvariantCulture, $"{lane.Slot,2:+0;-0}   {lane.Score:0.00}");
            Cv2.PutText(canvas, text, new Point(x0 + 12 + lineH, y), HersheyFonts.HersheySimplex, fs, new Scalar(230, 230, 230), 1, LineTypes.AntiAlias);
        }
    }

    /// <summary>
    /// Builds the stage contact sheet of the current frame: input with region, Canny edges with Hough segments,
    /// marking evidence, bird's-eye evidence with the search windows and fits, and the final overlay.
    /// </summary>
    /// <returns>The sheet (8-bit BGR); the caller owns it.</returns>
    public static Mat CreateStageSheet(FrameWorkspace ws)
    {
        ArgumentNullException.ThrowIfNull(ws);
        const int tileW = 480;
        int tileH = (int)Math.Round((double)tileW * ws.Height / ws.Width);
        int bird = tileH;
        var sheet = new Mat((tileH + 24) * 2, (tileW * 3) + 8, MatType.CV_8UC3, new Scalar(32, 32, 32));
        try
        {
            using var overlay = ws.Frame.Clone();
            Draw(ws, overlay);
            using var edges = new Mat(ws.Height, ws.Width, MatType.CV_8UC3, Scalar.All(0));
            using (var band = new Mat(edges, new Rect(0, ws.BandTop, ws.Width, ws.Height - ws.BandTop)))
            using (var big = new Mat())
            {
                Cv2.Resize(ws.Gradient.Edges, big, band.Size(), 0, 0, InterpolationFlags.Nearest);
                Cv2.CvtColor(big, band, ColorConversionCodes.GRAY2BGR);
            }

            for (int i = 0; i < ws.Hough.SegmentCount; i++)
            {
                HoughSegment s = ws.Hough.Segments[i];
                Cv2.Line(edges, P(s.X1, s.Y1), P(s.X2, s.Y2), new Scalar(0, 200, 255), 2, LineTypes.AntiAlias);
            }

            using var evidence = new Mat();
            Cv2.CvtColor(ws.Color.Evidence, evidence, ColorConversionCodes.GRAY2BGR);
            using var warped = new Mat();
            Cv2.CvtColor(ws.Warp.BirdsEye, warped, ColorConversionCodes.GRAY2BGR);
            DrawSearch(ws, warped);
            using var gray = new Mat();
            Cv2.CvtColor(ws.Gradient.Gray, gray, ColorConversionCodes.GRAY2BGR);

            Tile(sheet, ws.Frame, 0, 0, tileW, tileH, "input");
            Tile(sheet, gray, 1, 0, tileW, tileH, "grey");
            Tile(sheet, edges, 2, 0, tileW, tileH, "canny + hough segments");
            Tile(sheet, evidence, 0, 1, tileW, tileH, "marking evidence");
            Tile(sheet, warped, 1, 1, bird, bird, "bird's-eye + windows + fits");
            Tile(sheet, overlay, 2, 1, tileW, tileH, "lanes");
            return sheet;
        }
        catch
        {
            sheet.Dispose();
            throw;
        }
    }

    private static void DrawSearch(FrameWorkspace ws, Mat warped)
    {
        for (int i = 0; i < ws.LaneCount; i++)
        {
            int cand = ws.LaneCandidate[i];
            Scalar color = SlotColor(ws.Lanes[i].Slot);
            SearchWindow[] windows = ws.Search.CandidateWindows[Math.Max(0, cand)];
            for (int k = 0; k < ws.Search.WindowCount && cand >= 0; k++)
            {
                SearchWindow win = windows[k];
                if (win.Right <= win.Left)
                {
                    continue;
                }

                Cv2.Rectangle(warped, new Rect(win.Left, win.Top, win.Right - win.Left, win.Bottom - win.Top), win.Inlier ? color : new Scalar(90, 90, 90), 1);
            }

            Quadratic f = ws.Lanes[i].Fit;
            for (int y = 1; y < ws.Warp.BirdsEyeHeight; y += 4)
            {
                Cv2.Line(warped, P(f.At(y - 1), y - 1), P(f.At(Math.Min(ws.Warp.BirdsEyeHeight - 1, y + 3)), Math.Min(ws.Warp.BirdsEyeHeight - 1, y + 3)), color, 1, LineTypes.AntiAlias);
            }
        }
    }

    private static void Tile(Mat sheet, Mat image, int col, int row, int w, int h, string label)
    {
        int x = (col * 480) + 4 + ((480 - w) / 2), y = (row * (h == 0 ? 1 : (sheet.Rows / 2))) + 20;
        using var resized = new Mat();
        Cv2.Resize(image, resized, new Size(w, h), 0, 0, InterpolationFlags.Area);
        using (var dst = new Mat(sheet, new Rect(x, y, w, h)))
        {
            resized.CopyTo(dst);
        }

        Cv2.PutText(sheet, label, new Point((col * 480) + 8, y - 6), HersheyFonts.HersheySimplex, 0.45, new Scalar(230, 230, 230), 1, LineTypes.AntiAlias);
    }

    private static Point P(double x, double y) => new((int)Math.Round(Math.Clamp(x, -1e6, 1e6)), (int)Math.Round(Math.Clamp(y, -1e6, 1e6)));
}
