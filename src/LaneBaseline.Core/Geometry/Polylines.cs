using LaneBaseline.Core.LaneFiles;

namespace LaneBaseline.Core.Geometry;

/// <summary>Small polyline helpers in pixel coordinates (x right, y down).</summary>
public static class Polylines
{
    /// <summary>
    /// Ramer–Douglas–Peucker simplification: keeps the end points and every point farther than
    /// <paramref name="tolerancePx"/> from the chord of its span (Douglas &amp; Peucker, The Canadian Cartographer
    /// 10(2), 1973). Iterative, so long polylines cannot overflow the stack.
    /// </summary>
    public static IReadOnlyList<LanePoint> Simplify(IReadOnlyList<LanePoint> points, double tolerancePx)
    {
        ArgumentNullException.ThrowIfNull(points);
        int n = points.Count;
        if (n <= 2)
        {
            return [.. points];
        }

        var keep = new bool[n];
        keep[0] = keep[n - 1] = true;
        var stack = new Stack<(int A, int B)>();
        stack.Push((0, n - 1));
        while (stack.Count > 0)
        {
            (int a, int b) = stack.Pop();
            double best = -1;
            int index = -1;
            for (int i = a + 1; i < b; i++)
            {
                double d = DistanceToSegment(points[i], points[a], points[b]);
                if (d > best)
                {
                    best = d;
                    index = i;
                }
            }

            if (index >= 0 && best > tolerancePx)
            {
                keep[index] = true;
                stack.Push((a, index));
                stack.Push((index, b));
            }
        }

        var result = new List<LanePoint>();
        for (int i = 0; i < n; i++)
        {
            if (keep[i])
            {
                result.Add(points[i]);
            }
        }

        return result;
    }

    /// <summary>Euclidean distance from <paramref name="p"/> to the segment a–b.</summary>
    public static double DistanceToSegment(LanePoint p, LanePoint a, LanePoint b)
    {
        double dx = b.X - a.X, dy = b.Y - a.Y;
        double len2 = (dx * dx) + (dy * dy);
        double t = len2 == 0 ? 0 : Math.Clamp((((p.X - a.X) * dx) + ((p.Y - a.Y) * dy)) / len2, 0, 1);
        double ex = a.X + (t * dx) - p.X, ey = a.Y + (t * dy) - p.Y;
        return Math.Sqrt((ex * ex) + (ey * ey));
    }

    /// <summary>The closed y-range [min, max] of a polyline.</summary>
    public static (double Min, double Max) YExtent(IReadOnlyList<LanePoint> points)
    {
        double ymin = double.PositiveInfinity, ymax = double.NegativeInfinity;
        for (int i = 0; i < points.Count; i++)
        {
            ymin = Math.Min(ymin, points[i].Y);
            ymax = Math.Max(ymax, points[i].Y);
        }

        return (ymin, ymax);
    }

    /// <summary>
    /// x at an image row (the one rule used by the metrics, the auditor and lane sampling) by linear interpolation on the first segment (in point order) whose closed y-range holds
    /// the row; a horizontal segment at that row gives its first point's x.
    /// </summary>
    public static bool TryXAt(IReadOnlyList<LanePoint> points, double row, out double x)
    {
        for (int i = 0; i + 1 < points.Count; i++)
        {
            LanePoint a = points[i], b = points[i + 1];
            double lo = Math.Min(a.Y, b.Y), hi = Math.Max(a.Y, b.Y);
            if (row >= lo && row <= hi)
            {
                x = a.Y == b.Y ? a.X : a.X + ((row - a.Y) * (b.X - a.X) / (b.Y - a.Y));
                return true;
            }
        }

        x = double.NaN;
        return false;
    }

    /// <summary>Arc length of the polyline in pixels.</summary>
    public static double Length(IReadOnlyList<LanePoint> points)
    {
        ArgumentNullException.ThrowIfNull(points);
        double sum = 0;
        for (int i = 1; i < points.Count; i++)
        {
            sum += Math.Sqrt(Math.Pow(points[i].X - points[i - 1].X, 2) + Math.Pow(points[i].Y - points[i - 1].Y, 2));
        }

        return sum;
    }
}
