using LaneBaseline.Core.Options;
using LaneBaseline.Core.Results;
using LaneBaseline.Vision.Pipeline;

namespace LaneBaseline.Vision.Stages.Search;

/// <summary>
/// Step (1) of the <c>search</c> stage: seeds (bottom positions in bird's-eye pixels) from the column histogram of the
/// bottom rows, from the tracker's predictions and from Hough segments that map to near-vertical bird's-eye lines.
/// </summary>
internal sealed class SeedFinder
{
    private readonly SearchOptions search;

    /// <summary>Creates the seed finder.</summary>
    public SeedFinder(SearchOptions search)
    {
        this.search = search;
    }

    /// <summary>Fills the workspace's candidates: histogram peaks, then tracker seeds, then Hough seeds.</summary>
    public void Find(FrameWorkspace ws)
    {
        FindPeaks(ws);
        AddSeeds(ws, ws.Track.PriorSeedX, ws.Track.PriorSeedCount);
        AddHoughSeeds(ws);
    }

    private unsafe void FindPeaks(FrameWorkspace ws)
    {
        int bw = ws.Warp.BirdsEyeWidth, bh = ws.Warp.BirdsEyeHeight;
        double[] col = ws.Search.ColumnMass;
        double[] sm = ws.Search.Smoothed;
        Array.Clear(col);
        byte* b = (byte*)ws.Warp.BirdsEye.DataPointer;
        long step = ws.Warp.BirdsEye.Step();
        int r0 = bh - (int)Math.Round(search.HistogramRowsFraction * bh);
        for (int y = Math.Max(0, r0); y < bh; y++)
        {
            byte* row = b + (y * step);
            for (int x = 0; x < bw; x++)
            {
                col[x] += row[x];
            }
        }

        const int half = 3;
        for (int x = 0; x < bw; x++)
        {
            double s = 0;
            for (int k = Math.Max(0, x - half); k <= Math.Min(bw - 1, x + half); k++)
            {
                s += col[k];
            }

            sm[x] = s / 255.0;
        }

        int hw = search.WindowHalfWidthPx, sep = search.MinSeparationPx;
        int count = 0;
        while (count < FrameWorkspace.MaxCandidates)
        {
            int best = -1;
            double bestV = 0;
            for (int x = 0; x < bw; x++)
            {
                if (sm[x] > bestV)
                {
                    bestV = sm[x];
                    best = x;
                }
            }

            if (best < 0)
            {
                break;
            }

            double mass = 0;
            for (int x = Math.Max(0, best - hw); x <= Math.Min(bw - 1, best + hw); x++)
            {
                mass += col[x] / 255.0;
            }

            if (mass < search.MinPeakMass)
            {
                break;
            }

            ws.Search.CandidateX[count] = best;
            ws.Search.CandidateMass[count] = mass;
            count++;
            for (int x = Math.Max(0, best - sep); x <= Math.Min(bw - 1, best + sep); x++)
            {
                sm[x] = -1;
            }
        }

        ws.Search.CandidateCount = count;
    }

    /// <summary>Adds seeds predicted by the tracker (search around the previous fits) where no seed is near.</summary>
    private void AddSeeds(FrameWorkspace ws, double[] seeds, int count)
    {
        for (int i = 0; i < count && ws.Search.CandidateCount < FrameWorkspace.MaxCandidates; i++)
        {
            double xb = seeds[i];
            bool near = false;
            for (int c = 0; c < ws.Search.CandidateCount; c++)
            {
                near |= Math.Abs(ws.Search.CandidateX[c] - xb) < search.MinSeparationPx / 2.0;
            }

            if (!near && xb >= 0 && xb < ws.Warp.BirdsEyeWidth)
            {
                ws.Search.CandidateX[ws.Search.CandidateCount] = xb;
                ws.Search.CandidateMass[ws.Search.CandidateCount] = 0;
                ws.Search.CandidateCount++;
            }
        }
    }

    private void AddHoughSeeds(FrameWorkspace ws)
    {
        int bw = ws.Warp.BirdsEyeWidth, bh = ws.Warp.BirdsEyeHeight;
        PlaneHomography hm = ws.Region.ImageToBirdsEye;
        for (int i = 0; i < ws.Hough.SegmentCount && ws.Search.CandidateCount < FrameWorkspace.MaxCandidates; i++)
        {
            HoughSegment s = ws.Hough.Segments[i];
            if (s.Y1 < ws.Region.RoiTop || s.Y2 < ws.Region.RoiTop
                || !hm.TryMap(s.X1, s.Y1, out double u1, out double v1) || !hm.TryMap(s.X2, s.Y2, out double u2, out double v2)
                || Math.Abs(v2 - v1) < 1)
            {
                continue;
            }

            double slope = (u2 - u1) / (v2 - v1);
            if (Math.Abs(slope) > 0.3)
            {
                continue;
            }

            double xb = u1 + (slope * (bh - 1 - v1));
            if (xb < 0 || xb >= bw)
            {
                continue;
            }

            bool near = false;
            for (int c = 0; c < ws.Search.CandidateCount; c++)
            {
                if (Math.Abs(ws.Search.CandidateX[c] - xb) < search.MinSeparationPx)
                {
                    near = true;
                    break;
                }
            }

            if (!near)
            {
                ws.Search.CandidateX[ws.Search.CandidateCount] = xb;
                ws.Search.CandidateMass[ws.Search.CandidateCount] = 0;
                ws.Search.CandidateCount++;
            }
        }
    }
}
