using System.Numerics;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Metrics;
using OpenCvSharp;

namespace LaneBaseline.Vision.Metrics;

/// <summary>
/// Rasterises lanes with OpenCV's own line drawer (<c>line</c>, 8-connected, the given thickness) on frame-sized
/// canvases, so the footprint — including OpenCV's <c>2*ceil(t/2)+1</c> cross-section, round caps and clipping at
/// the frame border — is exactly the one the metric specifies. Only each lane's bounding box is cleared and counted,
/// and only overlapping boxes are intersected.
/// </summary>
/// <remarks>
/// Points are rounded half to even (x right, y down). Canvases are 8-bit, one per lane slot, created once per frame
/// size and reused; each lane's box is zeroed after use, so a frame costs O(footprint) rather than O(frame).
/// Not thread-safe: one instance per worker.
/// </remarks>
public sealed class OpenCvLaneRasterizer : ILaneRasterizer, IDisposable
{
    private readonly List<Mat> canvases = [];
    private readonly List<nint> canvasData = []; // each canvas's pixel pointer, read once (a native call per read)
    private long canvasStep;
    private Rect[] boxes = new Rect[16];
    private int canvasWidth;
    private int canvasHeight;

    /// <inheritdoc />
    public void Measure(
        int width,
        int height,
        int lineWidthPx,
        IReadOnlyList<Lane> truth,
        IReadOnlyList<Lane> predictions,
        Span<long> intersections,
        Span<long> truthAreas,
        Span<long> predictionAreas)
    {
        ArgumentNullException.ThrowIfNull(truth);
        ArgumentNullException.ThrowIfNull(predictions);
        int nt = truth.Count, np = predictions.Count, total = nt + np;
        EnsureCanvases(width, height, total);

        int reach = (lineWidthPx / 2) + 2;
        for (int i = 0; i < total; i++)
        {
            Lane lane = i < nt ? truth[i] : predictions[i - nt];
            boxes[i] = Draw(canvases[i], lane.Points, lineWidthPx, reach, width, height);
            long area = Count(canvasData[i], canvasStep, boxes[i], 0);
            if (i < nt)
            {
                truthAreas[i] = area;
            }
            else
            {
                predictionAreas[i - nt] = area;
            }
        }

        for (int i = 0; i < nt; i++)
        {
            for (int j = 0; j < np; j++)
            {
                Rect overlap = boxes[i] & boxes[nt + j];
                intersections[(i * np) + j] = overlap.Width > 0 && overlap.Height > 0
                    ? Count(canvasData[i], canvasStep, overlap, canvasData[nt + j])
                    : 0;
            }
        }

        for (int i = 0; i < total; i++)
        {
            Clear(canvasData[i], canvasStep, boxes[i]);
        }

        GC.KeepAlive(canvases);
    }

    /// <summary>Draws one lane exactly as the metric specifies (for tests and overlays); returns its clipped box.</summary>
    internal static Rect Draw(Mat canvas, IReadOnlyList<LanePoint> points, int thickness, int reach, int width, int height)
    {
        int minX = int.MaxValue, minY = int.MaxValue, maxX = int.MinValue, maxY = int.MinValue;
        var pts = new Point[points.Count];
        for (int k = 0; k < points.Count; k++)
        {
            var p = new Point(
                (int)Math.Round(points[k].X, MidpointRounding.ToEven),
                (int)Math.Round(points[k].Y, MidpointRounding.ToEven));
            minX = Math.Min(minX, p.X);
            maxX = Math.Max(maxX, p.X);
            minY = Math.Min(minY, p.Y);
            maxY = Math.Max(maxY, p.Y);
            pts[k] = p;
        }

        // One open polyline per lane: OpenCV draws each segment as line() does (the same thick segment, and the caps
        // at both ends of the first segment and at the far end of every later one, i.e. at every vertex), so the
        // footprint is the union of the per-segment line() footprints, in one native call instead of one per segment.
        if (pts.Length > 1)
        {
            Cv2.Polylines(canvas, [pts], isClosed: false, Scalar.All(1), thickness, LineTypes.Link8);
        }

        int x0 = Math.Max(0, minX - reach), y0 = Math.Max(0, minY - reach);
        int x1 = Math.Min(width, maxX + reach + 1), y1 = Math.Min(height, maxY + reach + 1);
        return x1 > x0 && y1 > y0 ? new Rect(x0, y0, x1 - x0, y1 - y0) : default;
    }

    private static unsafe long Count(nint a, long step, Rect box, nint b)
    {
        if (box.Width <= 0 || box.Height <= 0)
        {
            return 0;
        }

        byte* pa = (byte*)a;
        byte* pb = (byte*)b;
        long count = 0;
        for (int y = box.Y; y < box.Y + box.Height; y++)
        {
            byte* ra = pa + (y * step) + box.X;
            byte* rb = pb is null ? null : pb + (y * step) + box.X;
            int x = 0;
            int n = box.Width;
            for (; x + 8 <= n; x += 8)
            {
                ulong va = *(ulong*)(ra + x);
                if (rb is not null)
                {
                    va &= *(ulong*)(rb + x);
                }

                count += BitOperations.PopCount(va);
            }

            for (; x < n; x++)
            {
                count += rb is null ? ra[x] : ra[x] & rb[x];
            }
        }

        return count;
    }

    private static unsafe void Clear(nint canvas, long step, Rect box)
    {
        if (box.Width <= 0 || box.Height <= 0)
        {
            return;
        }

        byte* p = (byte*)canvas;
        for (int y = box.Y; y < box.Y + box.Height; y++)
        {
            new Span<byte>(p + (y * step) + box.X, box.Width).Clear();
        }
    }

    private void EnsureCanvases(int width, int height, int count)
    {
        if (width != canvasWidth || height != canvasHeight)
        {
            DisposeCanvases();
            canvasWidth = width;
            canvasHeight = height;
        }

        while (canvases.Count < count)
        {
            var canvas = new Mat(height, width, MatType.CV_8UC1, Scalar.All(0));
            canvases.Add(canvas);
            canvasData.Add(canvas.Data);
            canvasStep = canvas.Step();
        }

        if (boxes.Length < count)
        {
            Array.Resize(ref boxes, Math.Max(count, boxes.Length * 2));
        }
    }

    private void DisposeCanvases()
    {
        foreach (Mat m in canvases)
        {
            m.Dispose();
        }

        canvases.Clear();
        canvasData.Clear();
    }

    /// <inheritdoc />
    public void Dispose() => DisposeCanvases();
}
