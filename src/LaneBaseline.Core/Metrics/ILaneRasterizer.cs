using LaneBaseline.Core.LaneFiles;

namespace LaneBaseline.Core.Metrics;

/// <summary>
/// Rasterises lanes as thick polylines on a frame-sized canvas and counts pixels, for the rasterised-IoU metric.
/// The implementation lives with the drawing library (Vision); Core stays free of native code.
/// </summary>
public interface ILaneRasterizer
{
    /// <summary>
    /// Computes every truth/prediction pixel intersection and each lane's own area, clipped to the frame.
    /// </summary>
    /// <param name="width">Frame width in pixels.</param>
    /// <param name="height">Frame height in pixels.</param>
    /// <param name="lineWidthPx">Line thickness passed to the line drawer.</param>
    /// <param name="truth">Truth lanes (rows).</param>
    /// <param name="predictions">Predicted lanes (columns).</param>
    /// <param name="intersections">Receives |T_i ∩ P_j| at [i * predictions.Count + j].</param>
    /// <param name="truthAreas">Receives |T_i|.</param>
    /// <param name="predictionAreas">Receives |P_j|.</param>
    void Measure(
        int width,
        int height,
        int lineWidthPx,
        IReadOnlyList<Lane> truth,
        IReadOnlyList<Lane> predictions,
        Span<long> intersections,
        Span<long> truthAreas,
        Span<long> predictionAreas);
}
