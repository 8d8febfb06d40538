using System.Globalization;
using LaneBaseline.Core;
using LaneBaseline.Core.LaneFiles;
using OpenCvSharp;

namespace LaneBaseline.Vision.Masks;

/// <summary>
/// Draws a frame's lanes as an instance mask: lane <c>i</c> (zero-based, file order) gets pixel value <c>i + 1</c>,
/// background 0, each drawn like the IoU metric draws it (points rounded half to even, OpenCV <c>line</c>,
/// 8-connected, the given thickness). Where lanes overlap, the later lane wins. 8-bit up to 255 lanes, 16-bit
/// beyond.
/// </summary>
public static class LaneMaskPainter
{
    /// <summary>Paints a mask of the given size.</summary>
    /// <returns>A new mask; the caller owns it.</returns>
    public static Mat Paint(IReadOnlyList<Lane> lanes, int width, int height, int lineWidthPx)
    {
        ArgumentNullException.ThrowIfNull(lanes);
        if (lanes.Count > ushort.MaxValue)
        {
            throw new BadInputException(string.Create(CultureInfo.InvariantCulture, $"{lanes.Count} lanes do not fit a 16-bit instance mask"));
        }

        var mask = new Mat(height, width, lanes.Count > byte.MaxValue ? MatType.CV_16UC1 : MatType.CV_8UC1, Scalar.All(0));
        try
        {
            for (int i = 0; i < lanes.Count; i++)
            {
                IReadOnlyList<LanePoint> pts = lanes[i].Points;
                var previous = default(Point);
                for (int k = 0; k < pts.Count; k++)
                {
                    var p = new Point(
                        (int)Math.Round(pts[k].X, MidpointRounding.ToEven),
                        (int)Math.Round(pts[k].Y, MidpointRounding.ToEven));
                    if (k > 0)
                    {
                        Cv2.Line(mask, previous, p, Scalar.All(i + 1), lineWidthPx, LineTypes.Link8);
                    }

                    previous = p;
                }
            }

            return mask;
        }
        catch
        {
            mask.Dispose();
            throw;
        }
    }
}
