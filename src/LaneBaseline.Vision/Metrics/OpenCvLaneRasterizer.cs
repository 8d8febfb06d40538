using System.Runtime.CompilerServices;
using LaneBaseline.Core;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Metrics;
using OpenCvSharp;

namespace LaneBaseline.Vision.Metrics;

/// <summary>
/// Rasterises lanes with OpenCV's own line drawer (<c>line</c>, 8-connected, the given thickness) on a frame-sized
/// canvas, so the footprint — including OpenCV's <c>2*ceil(t/2)+1</c> cross-section, round caps and clipping at the
/// frame border — is exactly the one the metric specifies.
/// </summary>
/// <remarks>
/// Points are rounded half to even (x right, y down). One 8-bit canvas per frame size is reused for every lane: each
/// lane is drawn, its footprint is read back inside its bounding box (on each row only the columns its segments can
/// reach) as runs of set pixels per row (run-length encoding) and those runs are cleared, so memory is one frame plus the runs, whatever the number of lanes
/// (before 2026-12-04 every lane had its own frame-sized canvas: 100,000 lanes in a 1280x720 frame asked for 92 GB).
/// Areas are sums of run lengths and intersections are merges of two lanes' runs on the rows both cover, so the
/// counts are exactly those of the frame-sized masks. Not thread-safe: one instance per worker.
/// </remarks>
public sealed class OpenCvLaneRasterizer : ILaneRasterizer, IDisposable
{
    private Mat? canvas;
    private nint canvasData;
    private long canvasStep;
    private int canvasWidth;
    private int canvasHeight;
    private Rect[] boxes = new Rect[16];
    private int[] rowBase = new int[16]; // lane i's rows: rowStarts[rowBase[i] + r] .. rowStarts[rowBase[i] + r + 1]
    private int[] rowStarts = new int[1024];
    private int[] runs = new int[2048]; // pairs (x0, x1), x1 exclusive
    private Point[] points = new Point[64];
    private int[] rowLo = new int[1024]; // per box row: first column to scan
    private int[] rowHi = new int[1024]; // per box row: column after the last to scan

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
        if (nt > InputLimits.MaxLanesPerFrame || np > InputLimits.MaxLanesPerFrame || (long)width * height > InputLimits.MaxFramePixels)
        {
            throw new BadInputException(string.Create(
                System.Globalization.CultureInfo.InvariantCulture,
                $"a {width}x{height} frame with {nt} truth and {np} predicted lanes is beyond the documented limits ({InputLimits.MaxLanesPerFrame} lanes, {InputLimits.MaxFramePixels} pixels per frame; docs/reliability.md)"));
        }

        EnsureCanvas(width, height);
        if (boxes.Length < total)
        {
            Array.Resize(ref boxes, Math.Max(total, boxes.Length * 2));
            Array.Resize(ref rowBase, Math.Max(total, rowBase.Length * 2));
        }

        int reach = (lineWidthPx / 2) + 2;
        int rowCount = 0, runCount = 0;
        for (int i = 0; i < total; i++)
        {
            Lane lane = i < nt ? truth[i] : predictions[i - nt];
            Rect box = DrawOne(lane.Points, lineWidthPx, reach, width, height);
            boxes[i] = box;
            rowBase[i] = rowCount;
            long area = Harvest(box, ref rowCount, ref runCount);
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
                Rect a = boxes[i], b = boxes[nt + j];
                int y0 = Math.Max(a.Y, b.Y), y1 = Math.Min(a.Y + a.Height, b.Y + b.Height);
                intersections[(i * np) + j] = y1 > y0 && a.X < b.X + b.Width && b.X < a.X + a.Width
                    ? Intersect(rowBase[i] + (y0 - a.Y), rowBase[nt + j] + (y0 - b.Y), y1 - y0)
                    : 0;
            }
        }

        GC.KeepAlive(canvas);
    }

    /// <summary>Draws one lane exactly as the metric specifies (for tests and overlays); returns its clipped box.</summary>
    internal static Rect Draw(Mat canvas, IReadOnlyList<LanePoint> points, int thickness, int reach, int width, int height)
    {
        var pts = new Point[points.Count];
        return Draw(canvas, points, pts, thickness, reach, width, height);
    }

    private static Rect Draw(Mat canvas, IReadOnlyList<LanePoint> points, Point[] pts, int thickness, int reach, int width, int height)
    {
        int minX = int.MaxValue, minY = int.MaxValue, maxX = int.MinValue, maxY = int.MinValue;
        int n = points.Count;
        for (int k = 0; k < n; k++)
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
        if (n > 1)
        {
            Cv2.Polylines(canvas, [pts], isClosed: false, Scalar.All(1), thickness, LineTypes.Link8);
        }

        int x0 = Math.Max(0, minX - reach), y0 = Math.Max(0, minY - reach);
        int x1 = Math.Min(width, maxX + reach + 1), y1 = Math.Min(height, maxY + reach + 1);
        return x1 > x0 && y1 > y0 ? new Rect(x0, y0, x1 - x0, y1 - y0) : default;
    }

    private Rect DrawOne(IReadOnlyList<LanePoint> lanePoints, int thickness, int reach, int width, int height)
    {
        if (points.Length != lanePoints.Count)
        {
            points = new Point[lanePoints.Count];
        }

        Rect box = Draw(canvas!, lanePoints, points, thickness, reach, width, height);
        RowWindows(box, reach + 1);
        return box;
    }

    /// <summary>
    /// For every row of the box, the columns the footprint can reach: every drawn pixel lies within <c>reach</c> of a
    /// point of one of the lane's segments, so in row y it lies within <c>reach</c> columns of the part of a segment
    /// between rows y - reach and y + reach. Scanning only these windows, not the whole box, is what keeps a long
    /// diagonal lane cheap; the counts are unchanged because nothing is drawn outside them.
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private void RowWindows(Rect box, int reach)
    {
        if (rowLo.Length < box.Height)
        {
            rowLo = new int[Math.Max(box.Height, rowLo.Length * 2)];
            rowHi = new int[rowLo.Length];
        }

        int top = box.Y, bottom = box.Y + box.Height - 1;
        rowLo.AsSpan(0, box.Height).Fill(int.MaxValue);
        rowHi.AsSpan(0, box.Height).Fill(int.MinValue);
        for (int k = 0; k + 1 < points.Length; k++)
        {
            Point p = points[k], q = points[k + 1];
            int ya = Math.Min(p.Y, q.Y), yb = Math.Max(p.Y, q.Y);
            int from = Math.Max(top, ya - reach), to = Math.Min(bottom, yb + reach);
            int segLo = Math.Min(p.X, q.X), segHi = Math.Max(p.X, q.X);
            if (p.Y == q.Y || segHi - segLo <= 2 * reach)
            {
                // A horizontal or short segment: its whole x-range (a window at most 2·reach wider than the exact one,
                // which costs less to scan than it costs to compute).
                int lo = segLo - reach, hi = segHi + reach + 1;
                for (int r = from - top; r <= to - top; r++)
                {
                    rowLo[r] = Math.Min(rowLo[r], lo);
                    rowHi[r] = Math.Max(rowHi[r], hi);
                }

                continue;
            }

            double slope = (double)(q.X - p.X) / (q.Y - p.Y); // x per row
            for (int y = from; y <= to; y++)
            {
                double a = Math.Max(ya, y - reach), b = Math.Min(yb, y + reach);
                double xa = p.X + (slope * (a - p.Y));
                double xb = p.X + (slope * (b - p.Y));
                int r = y - top;
                rowLo[r] = Math.Min(rowLo[r], (int)Math.Floor(Math.Min(xa, xb)) - reach - 1);
                rowHi[r] = Math.Max(rowHi[r], (int)Math.Ceiling(Math.Max(xa, xb)) + reach + 2);
            }
        }

        if (points.Length == 1)
        {
            rowLo.AsSpan(0, box.Height).Fill(box.X);
            rowHi.AsSpan(0, box.Height).Fill(box.X + box.Width);
        }
    }

    /// <summary>Reads the drawn lane's runs inside its row windows into the arenas, clears them and returns the area.</summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private unsafe long Harvest(Rect box, ref int rowCount, ref int runCount)
    {
        EnsureCapacity(ref rowStarts, rowCount + box.Height + 1);
        rowStarts[rowCount] = runCount;
        long area = 0;
        byte* data = (byte*)canvasData;
        for (int y = box.Y; y < box.Y + box.Height; y++)
        {
            int x0 = Math.Max(box.X, rowLo[y - box.Y]), x1 = Math.Min(box.X + box.Width, rowHi[y - box.Y]);
            if (x1 <= x0)
            {
                rowCount++;
                rowStarts[rowCount] = runCount;
                continue;
            }

            var row = new Span<byte>(data + (y * canvasStep) + x0, x1 - x0);
            int x = 0;
            while (x < row.Length)
            {
                int set = row[x..].IndexOfAnyExcept((byte)0);
                if (set < 0)
                {
                    break;
                }

                int from = x + set;
                int gap = row[from..].IndexOf((byte)0);
                int to = gap < 0 ? row.Length : from + gap;
                row[from..to].Clear();
                EnsureCapacity(ref runs, (runCount * 2) + 2);
                runs[runCount * 2] = x0 + from;
                runs[(runCount * 2) + 1] = x0 + to;
                runCount++;
                area += to - from;
                x = to;
            }

            rowCount++;
            rowStarts[rowCount] = runCount;
        }

        rowCount++; // the next lane's rows start after this lane's closing entry
        return area;
    }

    /// <summary>Pixels set in both lanes on <paramref name="rows"/> consecutive rows starting at the given row entries.</summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private long Intersect(int rowA, int rowB, int rows)
    {
        long count = 0;
        for (int r = 0; r < rows; r++)
        {
            int a = rowStarts[rowA + r], aEnd = rowStarts[rowA + r + 1];
            int b = rowStarts[rowB + r], bEnd = rowStarts[rowB + r + 1];
            while (a < aEnd && b < bEnd)
            {
                int a0 = runs[a * 2], a1 = runs[(a * 2) + 1], b0 = runs[b * 2], b1 = runs[(b * 2) + 1];
                int lo = Math.Max(a0, b0), hi = Math.Min(a1, b1);
                if (hi > lo)
                {
                    count += hi - lo;
                }

                if (a1 < b1)
                {
                    a++;
                }
                else
                {
                    b++;
                }
            }
        }

        return count;
    }

    private static void EnsureCapacity(ref int[] array, int needed)
    {
        if (array.Length < needed)
        {
            Array.Resize(ref array, Math.Max(needed, array.Length * 2));
        }
    }

    private void EnsureCanvas(int width, int height)
    {
        if (canvas is not null && width == canvasWidth && height == canvasHeight)
        {
            return;
        }

        canvas?.Dispose();
        canvas = new Mat(height, width, MatType.CV_8UC1, Scalar.All(0));
        canvasData = canvas.Data;
        canvasStep = canvas.Step();
        canvasWidth = width;
        canvasHeight = height;
    }

    /// <inheritdoc />
    public void Dispose()
    {
        canvas?.Dispose();
        canvas = null;
    }
}
