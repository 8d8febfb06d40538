using OpenCvSharp;

namespace LaneBaseline.Vision.Pipeline.Workspace;

/// <summary>
/// What stage <c>color</c> writes (the marking evidence and the road's lightness statistics) and its reused
/// scratch. Owns the evidence <see cref="Mat"/>.
/// </summary>
public sealed class ColorSection : IDisposable
{
    private readonly Mat evidence = new Mat();

    internal ColorSection(int width, int height)
    {
        evidence.Create(height, width, MatType.CV_8UC1);
        Prefix = new int[width + 1];
        VeilPrefix = new int[width + 1];
        LightRow = new int[width];
    }

    /// <summary>Binary marking evidence (0 none, 255 strongest) in image pixels.</summary>
    public Mat Evidence => evidence;

    internal double RoadMedian { get; set; }

    internal double RoadSpread { get; set; }

    /// <summary>Whether the colour stage ran its ridge test on the CLAHE-equalised grey band in this frame (a dark road).</summary>
    internal bool Equalised { get; set; }

    /// <summary>
    /// Whether the road is veiled in this frame: its median lightness at or above
    /// <see cref="LaneBaseline.Core.Options.ColorOptions.ClaheMinVeilLightness"/> (a low sun ahead).
    /// </summary>
    internal bool Veiled { get; set; }

    /// <summary>Grey-world gains (B, G, R) the colour stage applied before its white and yellow tests (1 when off).</summary>
    internal (double B, double G, double R) GreyWorldGains { get; set; } = (1, 1, 1);

    /// <summary>Share (0–1) of the marking-evidence pixels kept by the colour stage's orientation test.</summary>
    internal double EvidenceKeptShare { get; set; } = 1;

    internal int[] Histogram { get; } = new int[256];

    internal int[] DiffHistogram { get; } = new int[256];

    internal int[] Prefix { get; }

    /// <summary>Prefix sums of the plain blurred grey row for the veil-headroom ridge test (veiled frames only).</summary>
    internal int[] VeilPrefix { get; }

    /// <summary>Per column, the highest row of a light source found by the colour stage's mirror test (int.MaxValue: none).</summary>
    internal int[] LightRow { get; }

    internal IEnumerable<Mat> OwnedBuffers => [evidence];

    /// <inheritdoc />
    public void Dispose() => evidence.Dispose();
}
