using LaneBaseline.Core.Options;
using LaneBaseline.Vision.Pipeline;
using OpenCvSharp;

namespace LaneBaseline.Vision.Stages;

/// <summary>Grey conversion, Gaussian blur and Canny edges over the search band below <see cref="RegionOptions.SearchTopFraction"/>.</summary>
/// <remarks>
/// Steps: (1) grey = 0.299 R + 0.587 G + 0.114 B of the band (the rows above on demand); (2) Gaussian blur of the band with a
/// <see cref="GradientOptions.BlurKernelPx"/> kernel; (3) Canny with lower threshold
/// <see cref="GradientOptions.CannyLowThreshold"/> and upper threshold lower × <see cref="GradientOptions.CannyHysteresisRatio"/>,
/// 3×3 Sobel, L1 gradient norm, on the band resized by hough.imageScale (area averaging). Output:
/// <see cref="Pipeline.Workspace.GradientSection.Edges"/> (band rows only, at that scale) and the full-resolution blurred band used by the
/// ridge gate. Pixel (x, y), y down.
/// <para>References: [1] J. Canny, "A Computational Approach to Edge Detection", IEEE Trans. PAMI 8(6):679–698, 1986,
/// DOI 10.1109/TPAMI.1986.4767851.</para>
/// </remarks>
public sealed class GradientStage : IFrameStage
{
    private readonly GradientOptions options;

    /// <summary>Creates the stage.</summary>
    public GradientStage(GradientOptions options)
    {
        this.options = options;
    }

    /// <inheritdoc />
    public string Name => "gradient";

    /// <inheritdoc />
    public void Process(FrameWorkspace workspace)
    {
        ArgumentNullException.ThrowIfNull(workspace);
        // Grey of the band and the blur kernel's reach above it (a filter on a row range reads the rows beyond it); the
        // rows above are converted when something asks for them (GradientSection.Gray).
        int k = options.BlurKernelPx;
        int first = Math.Max(0, workspace.BandTop - (k / 2));
        using (Mat colourRows = workspace.Frame.RowRange(first, workspace.Height))
        using (Mat greyRows = workspace.Gradient.GrayBand.RowRange(first, workspace.Height))
        {
            Cv2.CvtColor(colourRows, greyRows, ColorConversionCodes.BGR2GRAY);
        }

        workspace.Gradient.GrayAboveBandCurrent = false;
        using Mat band = workspace.Gradient.GrayBand.RowRange(workspace.BandTop, workspace.Height);
        if (k > 1)
        {
            Cv2.GaussianBlur(band, workspace.Gradient.Blurred, new Size(k, k), 0);
        }
        else
        {
            band.CopyTo(workspace.Gradient.Blurred);
        }

        Mat source = workspace.Gradient.Blurred;
        if (workspace.Gradient.EdgeScale < 1)
        {
            Cv2.Resize(workspace.Gradient.Blurred, workspace.Gradient.SmallBand, workspace.Gradient.EdgeSize, 0, 0, InterpolationFlags.Area);
            source = workspace.Gradient.SmallBand;
        }

        Cv2.Canny(source, workspace.Gradient.Edges, options.CannyLowThreshold, options.CannyLowThreshold * options.CannyHysteresisRatio);
    }

    /// <inheritdoc />
    public void Dispose()
    {
    }
}
