using LaneBaseline.Core;
using LaneBaseline.Core.Metrics;
using OpenCvSharp;

namespace LaneBaseline.Vision.Masks;

/// <summary>
/// Per-lane mask IoU between two instance masks: pixel counts of every (truth id, prediction id) pair, then one
/// Hungarian assignment maximising total IoU (Kuhn 1955; Munkres 1957). A prediction mask of another size is first
/// resized to the truth's with nearest-neighbour sampling (ids are labels, never blended).
/// </summary>
public static class MaskIou
{
    /// <summary>Compares one frame's masks; <paramref name="pred"/> null means no predicted lanes.</summary>
    /// <returns>One entry per truth id in ascending id order, and the number of prediction ids.</returns>
    public static (List<MaskLaneIou> Lanes, int PredLanes) Compare(string frame, Mat truth, Mat? pred)
    {
        ArgumentNullException.ThrowIfNull(truth);
        var areaT = new SortedDictionary<int, long>();
        var areaP = new SortedDictionary<int, long>();
        var inter = new Dictionary<(int, int), long>();
        if (pred is not null && (pred.Rows != truth.Rows || pred.Cols != truth.Cols))
        {
            using var resized = new Mat();
            Cv2.Resize(pred, resized, new Size(truth.Cols, truth.Rows), 0, 0, InterpolationFlags.Nearest);
            Count(truth, resized, areaT, areaP, inter);
        }
        else
        {
            Count(truth, pred, areaT, areaP, inter);
        }

        if (areaT.Count > InputLimits.MaxLanesPerFrame || areaP.Count > InputLimits.MaxLanesPerFrame)
        {
            throw BadInputException.At(frame, 0, null, string.Create(
                System.Globalization.CultureInfo.InvariantCulture,
                $"the {(areaT.Count > InputLimits.MaxLanesPerFrame ? "truth" : "prediction")} mask holds {Math.Max(areaT.Count, areaP.Count)} lane ids; at most {InputLimits.MaxLanesPerFrame} per frame are accepted (the documented limit)"));
        }

        int[] tIds = [.. areaT.Keys], pIds = [.. areaP.Keys];
        var iou = new double[tIds.Length * pIds.Length];
        for (int i = 0; i < tIds.Length; i++)
        {
            for (int j = 0; j < pIds.Length; j++)
            {
                long n = inter.GetValueOrDefault((tIds[i], pIds[j]));
                long u = areaT[tIds[i]] + areaP[pIds[j]] - n;
                iou[(i * pIds.Length) + j] = u > 0 ? (double)n / u : 0;
            }
        }

        int[] assign = Hungarian.Maximize(iou, tIds.Length, pIds.Length);
        var result = new List<MaskLaneIou>(tIds.Length);
        for (int i = 0; i < tIds.Length; i++)
        {
            int j = assign[i];
            double v = j >= 0 ? iou[(i * pIds.Length) + j] : 0;
            result.Add(new MaskLaneIou(frame, tIds[i], j >= 0 && v > 0 ? pIds[j] : null, v));
        }

        return (result, pIds.Length);
    }

    private static unsafe void Count(Mat truth, Mat? pred, SortedDictionary<int, long> areaT, SortedDictionary<int, long> areaP, Dictionary<(int, int), long> inter)
    {
        bool tWide = truth.Depth() == MatType.CV_16U, pWide = pred is not null && pred.Depth() == MatType.CV_16U;
        long tStep = truth.Step(), pStep = pred?.Step() ?? 0;
        byte* tData = (byte*)truth.DataPointer;
        byte* pData = pred is null ? null : (byte*)pred.DataPointer;
        int rows = truth.Rows, cols = truth.Cols;
        for (int y = 0; y < rows; y++)
        {
            byte* tr = tData + (y * tStep);
            byte* pr = pData is null ? null : pData + (y * pStep);
            for (int x = 0; x < cols; x++)
            {
                int t = tWide ? ((ushort*)tr)[x] : tr[x];
                int p = pr is null ? 0 : pWide ? ((ushort*)pr)[x] : pr[x];
                if (t != 0)
                {
                    areaT[t] = areaT.GetValueOrDefault(t) + 1;
                }

                if (p != 0)
                {
                    areaP[p] = areaP.GetValueOrDefault(p) + 1;
                }

                if (t != 0 && p != 0)
                {
                    inter[(t, p)] = inter.GetValueOrDefault((t, p)) + 1;
                }
            }
        }

        GC.KeepAlive(truth);
        GC.KeepAlive(pred);
    }
}
