using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Geometry;

namespace LaneBaseline.Core.Audit;

/// <summary>Row-wise helpers shared by the rules (pixel coordinates: x right, y down).</summary>
internal static class LaneSampling
{
    public static bool XAt(Lane lane, double row, out double x) => Polylines.TryXAt(lane.Points, row, out x);

    public static (double Min, double Max) Extent(Lane lane) => Polylines.YExtent(lane.Points);

    /// <summary>The common y-range of two lanes, clipped below <paramref name="top"/>.</summary>
    public static (double Lo, double Hi) Common(Lane a, Lane b, double top)
    {
        (double a0, double a1) = Extent(a);
        (double b0, double b1) = Extent(b);
        return (Math.Max(Math.Max(a0, b0), top), Math.Min(a1, b1));
    }

    /// <summary>Least-squares x = a*y + b over the near half of a lane (10 samples), or null when it spans under 20 px.</summary>
    public static (double A, double B)? NearFit(Lane lane)
    {
        (double lo, double hi) = Extent(lane);
        if (hi - lo < 20)
        {
            return null;
        }

        double mid = (lo + hi) / 2, sy = 0, sx = 0, syy = 0, sxy = 0;
        int n = 0;
        for (int k = 0; k <= 10; k++)
        {
            double y = hi - ((hi - mid) * k / 10.0);
            if (XAt(lane, y, out double x))
            {
                sy += y;
                sx += x;
                syy += y * y;
                sxy += x * y;
                n++;
            }
        }

        double den = (n * syy) - (sy * sy);
        if (n < 2 || den == 0)
        {
            return null;
        }

        double a = ((n * sxy) - (sx * sy)) / den;
        return (a, (sx - (a * sy)) / n);
    }

    /// <summary>The horizon row estimated as the median pairwise vanishing row of the lanes' near-half line fits.</summary>
    public static double? EstimateHorizon(IReadOnlyList<Lane> lanes, int height)
    {
        var fits = lanes.Select(NearFit).Where(f => f is not null).Select(f => f!.Value).ToList();
        var rows = new List<double>();
        for (int i = 0; i < fits.Count; i++)
        {
            for (int j = i + 1; j < fits.Count; j++)
            {
                double da = fits[i].A - fits[j].A;
                if (Math.Abs(da) < 0.05)
                {
                    continue;
                }

                double y = (fits[j].B - fits[i].B) / da;
                if (y > -height && y < height)
                {
                    rows.Add(y);
                }
            }
        }

        if (rows.Count == 0)
        {
            return null;
        }

        rows.Sort();
        return rows.Count % 2 == 1 ? rows[rows.Count / 2] : (rows[(rows.Count / 2) - 1] + rows[rows.Count / 2]) / 2;
    }

    /// <summary>Median spacing of neighbouring lanes at a row (pairs at least 10 px apart), or null with fewer than two.</summary>
    public static double? LaneWidthPxAt(IReadOnlyList<Lane> lanes, double row)
    {
        var xs = new List<double>();
        foreach (Lane l in lanes)
        {
            if (XAt(l, row, out double x))
            {
                xs.Add(x);
            }
        }

        xs.Sort();
        var gaps = new List<double>();
        for (int i = 1; i < xs.Count; i++)
        {
            if (xs[i] - xs[i - 1] >= 10)
            {
                gaps.Add(xs[i] - xs[i - 1]);
            }
        }

        gaps.Sort();
        return gaps.Count == 0 ? null : gaps.Count % 2 == 1 ? gaps[gaps.Count / 2] : (gaps[(gaps.Count / 2) - 1] + gaps[gaps.Count / 2]) / 2;
    }
}
