using LaneBaseline.Core.LaneFiles;
using OpenCvSharp;

namespace LaneBaseline.Vision.Synthetic;

/// <summary>Draws lane polylines over a frame for inspection (thin line, a dot at every point, colour by slot).</summary>
public static class TruthOverlay
{
    /// <summary>Draws <paramref name="lanes"/> onto <paramref name="frame"/> (8-bit BGR) in place.</summary>
    public static void Draw(Mat frame, IReadOnlyList<Lane> lanes)
    {
        ArgumentNullException.ThrowIfNull(frame);
        ArgumentNullException.ThrowIfNull(lanes);
        foreach (Lane lane in lanes)
        {
            Scalar colour = lane.Slot switch
            {
                -1 => new Scalar(255, 0, 255),
                1 => new Scalar(0, 255, 255),
                < 0 => new Scalar(255, 128, 0),
                _ => new Scalar(0, 128, 255),
            };
            for (int i = 1; i < lane.Points.Count; i++)
            {
                Cv2.Line(frame, ToPoint(lane.Points[i - 1]), ToPoint(lane.Points[i]), colour, 1, LineTypes.AntiAlias, 4);
            }

            foreach (LanePoint p in lane.Points)
            {
                Cv2.Circle(frame, ToPoint(p), 2 * 16, colour, 1, LineTypes.AntiAlias, 4);
            }
        }
    }

    private static Point ToPoint(LanePoint p) => new((int)Math.Round(p.X * 16), (int)Math.Round(p.Y * 16));
}
