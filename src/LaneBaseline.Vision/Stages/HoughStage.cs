using LaneBaseline.Core.Options;
using LaneBaseline.Vision.Pipeline;
using OpenCvSharp;

namespace LaneBaseline.Vision.Stages;

/// <summary>Line segments of the Canny edges by the progressive probabilistic Hough transform, filtered by angle.</summary>
/// <remarks>
/// Steps: (1) <c>HoughLinesP</c> on <see cref="Pipeline.Workspace.GradientSection.Edges"/> with ρ step <see cref="HoughOptions.RhoPx"/>,
/// θ step <see cref="HoughOptions.ThetaStepDeg"/>, <see cref="HoughOptions.Votes"/>, minimum length and maximum gap;
/// (2) keep segments whose angle from the horizontal lies in [<see cref="HoughOptions.MinAngleDeg"/>,
/// <see cref="HoughOptions.MaxAngleDeg"/>] (lane boundaries recede towards the horizon; horizontal clutter does not);
/// (3) keep the <see cref="HoughOptions.MaxSegments"/> longest, in full-frame image pixels (x, y down), longest first.
/// The transform runs at <see cref="HoughOptions.ImageScale"/>; votes and lengths are scaled with it.
/// Lines are parameterised as ρ = x cos θ + y sin θ (Duda and Hart 1972).
/// <para>References: [1] J. Matas, C. Galambos, J. Kittler, "Robust Detection of Lines Using the Progressive
/// Probabilistic Hough Transform", Computer Vision and Image Understanding 78(1):119–137, 2000,
/// DOI 10.1006/cviu.1999.0831. [2] R. O. Duda, P. E. Hart, "Use of the Hough transformation to detect lines and
/// curves in pictures", Communications of the ACM 15(1):11–15, 1972.</para>
/// </remarks>
public sealed class HoughStage : IFrameStage
{
    private readonly HoughOptions options;
    private readonly double minTan;
    private readonly double maxTan;

    /// <summary>Creates the stage.</summary>
    public HoughStage(HoughOptions options)
    {
        this.options = options;
        minTan = Math.Tan(options.MinAngleDeg * Math.PI / 180);
        maxTan = options.MaxAngleDeg >= 90 ? double.PositiveInfinity : Math.Tan(options.MaxAngleDeg * Math.PI / 180);
    }

    /// <inheritdoc />
    public string Name => "hough";

    /// <inheritdoc />
    public void Process(FrameWorkspace workspace)
    {
        ArgumentNullException.ThrowIfNull(workspace);
        double k = workspace.Gradient.EdgeScale;
        LineSegmentPoint[] lines = Cv2.HoughLinesP(
            workspace.Gradient.Edges,
            options.RhoPx,
            options.ThetaStepDeg * Math.PI / 180,
            Math.Max(1, (int)Math.Round(options.Votes * k)),
            options.MinLineLengthPx * k,
            options.MaxLineGapPx * k);
        HoughSegment[] kept = workspace.Hough.Segments;
        int count = 0;
        int top = workspace.BandTop;
        foreach (LineSegmentPoint l in lines)
        {
            double dx = l.P2.X - l.P1.X, dy = l.P2.Y - l.P1.Y;
            double adx = Math.Abs(dx), ady = Math.Abs(dy);
            if (ady < minTan * adx || ady > maxTan * adx)
            {
                continue;
            }

            double length = Math.Sqrt((dx * dx) + (dy * dy)) / k;
            // Pixel centres: resized pixel i covers full-resolution [i/k, (i+1)/k), centre (i + 0.5)/k - 0.5.
            var segment = new HoughSegment(
                ((l.P1.X + 0.5) / k) - 0.5, ((l.P1.Y + 0.5) / k) - 0.5 + top, ((l.P2.X + 0.5) / k) - 0.5, ((l.P2.Y + 0.5) / k) - 0.5 + top, length);

            // Insertion into the fixed-size array, longest first (no allocation, small n).
            int pos = count < kept.Length ? count : kept.Length - 1;
            if (count == kept.Length && kept[pos].Length >= length)
            {
                continue;
            }

            while (pos > 0 && kept[pos - 1].Length < length)
            {
                kept[pos] = kept[pos - 1];
                pos--;
            }

            kept[pos] = segment;
            if (count < kept.Length)
            {
                count++;
            }
        }

        workspace.Hough.SegmentCount = count;
    }

    /// <inheritdoc />
    public void Dispose()
    {
    }
}
