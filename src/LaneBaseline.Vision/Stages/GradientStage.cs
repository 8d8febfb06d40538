using LaneBaseline.Core.Options;
using LaneBaseline.Vision.Pipeline;
using OpenCvSharp;

namespace LaneBaseline.Vision.Stages;

/// <summary>Grey conversion, Gaussian blur and Canny edges over the search band below <see cref="RegionOptions.SearchTopFraction"/>.</summary>
/// <remarks>
/// Steps: (1) grey = 0.299 R + 0.587 G + 0.114 B of the whole frame; (2) Gaussian blur of the band with a
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
        Cv2.CvtColor(workspace.Frame, workspace.Gradient.Gray, ColorConversionCodes.BGR2GRAY);
        using Mat band = workspace.Gradient.Gray.RowRange(workspace.BandTop, workspace.Height);
        int k = options.BlurKernelPx;
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
