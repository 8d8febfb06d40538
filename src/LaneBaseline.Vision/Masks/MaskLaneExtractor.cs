using LaneBaseline.Core;
using LaneBaseline.Core.Geometry;
using LaneBaseline.Core.LaneFiles;
using OpenCvSharp;

namespace LaneBaseline.Vision.Masks;

/// <summary>
/// Turns an instance mask (one channel, 8- or 16-bit, pixel value = lane id, 0 = background) into lanes: one
/// polyline per lane id through the row-wise centre of its pixels, smoothed, rescaled to the frame size and ordered
/// near to far (y decreasing).
/// </summary>
/// <remarks>
/// Coordinates: pixel (x, y), x right, y down, the centre of the top-left pixel is (0, 0). Steps:
/// <list type="number">
/// <item>For every row, the mean column of each id's pixels (the row-wise centre).</item>
/// <item>An id present in fewer than <see cref="MinRows"/> rows is dropped (reported through the returned list).</item>
/// <item>Centres are smoothed with a centred moving average of ±<see cref="SmoothRadiusRows"/> rows, shrunk
/// symmetrically at the ends so the end points are not pulled inwards.</item>
/// <item>Mask coordinates are scaled to the frame: <c>X = (x + 0.5) * W / w - 0.5</c> (the same for y), so pixel
/// centres map to pixel centres at any resolution.</item>
/// <item>The polyline is simplified with the Ramer–Douglas–Peucker algorithm at <see cref="SimplifyTolerancePx"/>
/// (Douglas &amp; Peucker, The Canadian Cartographer 10(2), 1973).</item>
/// </list>
/// Lane ids become lanes in ascending id order. Not thread-safe: one instance per worker; buffers are reused.
/// </remarks>
public sealed class MaskLaneExtractor
{
    private readonly Dictionary<int, IdRows> rowsById = [];
    private readonly List<int> activeIds = [];
    private int bufferHeight;

    /// <summary>Fewest mask rows a lane id must cover to become a lane (default 10).</summary>
    public int MinRows { get; init; } = 10;

    /// <summary>Half-width of the moving average over row centres, in mask rows (default 2).</summary>
    public int SmoothRadiusRows { get; init; } = 2;

    /// <summary>Ramer–Douglas–Peucker tolerance in frame pixels (default 0.5).</summary>
    public double SimplifyTolerancePx { get; init; } = 0.5;

    /// <summary>Extracts the lanes of one mask.</summary>
    /// <param name="mask">Single-channel CV_8U or CV_16U mask (not modified).</param>
    /// <param name="frameWidth">Frame width the lanes are expressed in.</param>
    /// <param name="frameHeight">Frame height the lanes are expressed in.</param>
    /// <param name="dropped">Receives (id, rows) of every id dropped for covering too few rows.</param>
    /// <param name="source">The mask's name in messages.</param>
    /// <exception cref="BadInputException">The mask holds more than <see cref="InputLimits.MaxLanesPerFrame"/> lane ids.</exception>
    public IReadOnlyList<Lane> Extract(Mat mask, int frameWidth, int frameHeight, List<(int Id, int Rows)> dropped, string source = "mask")
    {
        ArgumentNullException.ThrowIfNull(mask);
        ArgumentNullException.ThrowIfNull(dropped);
        int h = mask.Rows, w = mask.Cols;
        if (!Accumulate(mask, h, w))
        {
            foreach (int id in activeIds)
            {
                rowsById[id].Clear();
            }

            activeIds.Clear();
            throw BadInputException.At(source, 0, null, string.Create(
                System.Globalization.CultureInfo.InvariantCulture,
                $"the mask holds more than {InputLimits.MaxLanesPerFrame} lane ids; at most {InputLimits.MaxLanesPerFrame} per frame are accepted (the documented limit)"));
        }

        activeIds.Sort();
        var lanes = new List<Lane>(activeIds.Count);
        double sx = (double)frameWidth / w, sy = (double)frameHeight / h;
        var centres = new List<LanePoint>();
        foreach (int id in activeIds)
        {
            IdRows r = rowsById[id];
            centres.Clear();
            for (int y = r.MaxY; y >= r.MinY; y--)
            {
                if (r.Count[y] > 0)
                {
                    centres.Add(new LanePoint(r.Sum[y] / r.Count[y], y));
                }
            }

            if (centres.Count < Math.Max(2, MinRows))
            {
                dropped.Add((id, centres.Count));
            }
            else
            {
                var smooth = new List<LanePoint>(centres.Count);
                for (int k = 0; k < centres.Count; k++)
                {
                    int rad = Math.Min(SmoothRadiusRows, Math.Min(k, centres.Count - 1 - k));
                    double sum = 0;
                    for (int j = k - rad; j <= k + rad; j++)
                    {
                        sum += centres[j].X;
                    }

                    double x = sum / ((2 * rad) + 1);
                    smooth.Add(new LanePoint(((x + 0.5) * sx) - 0.5, ((centres[k].Y + 0.5) * sy) - 0.5));
                }

                lanes.Add(new Lane { Points = Polylines.Simplify(smooth, SimplifyTolerancePx) });
            }

            r.Clear();
        }

        activeIds.Clear();
        return lanes;
    }

    /// <summary>Collects each id's row centres; false (stopping early) when the mask holds too many ids.</summary>
    private unsafe bool Accumulate(Mat mask, int h, int w)
    {
        if (h != bufferHeight)
        {
            rowsById.Clear();
            bufferHeight = h;
        }

        bool wide = mask.Depth() == MatType.CV_16U;
        long step = mask.Step();
        byte* data = (byte*)mask.DataPointer;
        int lastId = 0;
        IdRows? last = null;
        for (int y = 0; y < h; y++)
        {
            byte* row = data + (y * step);
            for (int x = 0; x < w; x++)
            {
                int id = wide ? ((ushort*)row)[x] : row[x];
                if (id == 0)
                {
                    continue;
                }

                if (id != lastId || last is null)
                {
                    if (!rowsById.TryGetValue(id, out last))
                    {
                        if (rowsById.Count >= 2 * InputLimits.MaxLanesPerFrame)
                        {
                            ForgetInactive(); // buffers of ids seen only in earlier frames
                        }

                        last = new IdRows(h);
                        rowsById.Add(id, last);
                    }

                    if (!last.Active)
                    {
                        if (activeIds.Count >= InputLimits.MaxLanesPerFrame)
                        {
                            GC.KeepAlive(mask);
                            return false;
                        }

                        last.Active = true;
                        activeIds.Add(id);
                    }

                    lastId = id;
                }

                last.Add(x, y);
            }
        }

        GC.KeepAlive(mask);
        return true;
    }

    private void ForgetInactive()
    {
        foreach ((int id, IdRows rows) in rowsById)
        {
            if (!rows.Active)
            {
                rowsById.Remove(id);
            }
        }
    }

    private sealed class IdRows(int height)
    {
        public double[] Sum { get; } = new double[height];

        public int[] Count { get; } = new int[height];

        public int MinY { get; private set; } = int.MaxValue;

        public int MaxY { get; private set; } = -1;

        public bool Active { get; set; }

        public void Add(int x, int y)
        {
            Sum[y] += x;
            Count[y]++;
            MinY = Math.Min(MinY, y);
            MaxY = Math.Max(MaxY, y);
        }

        public void Clear()
        {
            if (MaxY >= 0)
            {
                Array.Clear(Sum, MinY, MaxY - MinY + 1);
                Array.Clear(Count, MinY, MaxY - MinY + 1);
            }

            MinY = int.MaxValue;
            MaxY = -1;
            Active = false;
        }
    }
}
