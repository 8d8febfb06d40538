using LaneBaseline.Core.Audit;
using LaneBaseline.Core.LaneFiles;
using OpenCvSharp;

namespace LaneBaseline.Vision.Audit;

/// <summary>
/// Draws one audited frame: the frame image when available (else a dark canvas of the frame size), the baseline's
/// lanes thin in blue, the audited lanes in green, lanes named by a finding thicker in red with their index, and one
/// text line per finding (rule id, name, message) at the top left. Colours are BGR.
/// </summary>
public static class AuditOverlayPainter
{
    private static readonly Scalar Audited = new(80, 200, 60);
    private static readonly Scalar Flagged = new(40, 40, 235);
    private static readonly Scalar Baseline = new(230, 150, 40);

    /// <summary>Paints the overlay.</summary>
    /// <param name="framePath">Frame image path, or null for a plain canvas.</param>
    /// <param name="record">The audited lanes.</param>
    /// <param name="baseline">The baseline's lanes, or null.</param>
    /// <param name="width">Frame width, px.</param>
    /// <param name="height">Frame height, px.</param>
    /// <param name="findings">The frame's findings.</param>
    /// <returns>A new BGR image; the caller owns it.</returns>
    public static Mat Paint(string? framePath, LaneRecord record, LaneRecord? baseline, int width, int height, IReadOnlyList<AuditFinding> findings)
    {
        ArgumentNullException.ThrowIfNull(record);
        ArgumentNullException.ThrowIfNull(findings);
        Mat image = framePath is not null && File.Exists(framePath) ? Cv2.ImRead(framePath, ImreadModes.Color) : new Mat();
        try
        {
            if (image.Empty() || image.Cols != width || image.Rows != height)
            {
                image.Dispose();
                image = new Mat(height, width, MatType.CV_8UC3, new Scalar(40, 40, 40));
            }

            if (baseline is not null)
            {
                foreach (Lane lane in baseline.Lanes)
                {
                    DrawLane(image, lane, Baseline, 1);
                }
            }

            var flagged = new HashSet<int>(findings.SelectMany(f => new[] { f.Lane, f.OtherLane }).Where(i => i is not null).Select(i => i!.Value));
            int thick = Math.Max(2, width / 400);
            for (int i = 0; i < record.Lanes.Count; i++)
            {
                bool bad = flagged.Contains(i);
                DrawLane(image, record.Lanes[i], bad ? Flagged : Audited, bad ? thick * 2 : thick);
                LanePoint top = record.Lanes[i].Points[^1];
                Cv2.PutText(image, i.ToString(System.Globalization.CultureInfo.InvariantCulture), new Point((int)top.X + 4, (int)top.Y), HersheyFonts.HersheySimplex, 0.5, bad ? Flagged : Audited, 1, LineTypes.AntiAlias);
            }

            double scale = Math.Clamp(width / 1600.0, 0.35, 0.8);
            int lineHeight = (int)(30 * scale) + 4;
            int y = lineHeight;
            foreach (AuditFinding f in findings.Take(12))
            {
                string text = f.Rule + " " + AuditRules.Get(f.Rule).Name + ": " + f.Message;
                int maxChars = Math.Max(20, (int)(width / (21 * scale)));
                if (text.Length > maxChars)
                {
                    text = text[..(maxChars - 3)] + "...";
                }

                Cv2.PutText(image, text, new Point(8, y), HersheyFonts.HersheySimplex, scale, Scalar.Black, 3, LineTypes.AntiAlias);
                Cv2.PutText(image, text, new Point(8, y), HersheyFonts.HersheySimplex, scale, Scalar.White, 1, LineTypes.AntiAlias);
                y += lineHeight;
            }

            return image;
        }
        catch
        {
            image.Dispose();
            throw;
        }
    }

    private static void DrawLane(Mat image, Lane lane, Scalar colour, int thickness)
    {
        for (int k = 1; k < lane.Points.Count; k++)
        {
            LanePoint a = lane.Points[k - 1], b = lane.Points[k];
            Cv2.Line(image, new Point((int)Math.Round(a.X), (int)Math.Round(a.Y)), new Point((int)Math.Round(b.X), (int)Math.Round(b.Y)), colour, thickness, LineTypes.AntiAlias);
        }
    }
}
