namespace LaneBaseline.Core.Options;

/// <summary>
/// The metric bird's-eye view used when a camera file is given (<c>detect --camera</c>): one bird's-eye pixel is
/// <see cref="MetresPerPx"/> metres on the ground along both axes, so lane widths are limited in metres. An optional
/// section: absent from a preset, a camera run uses these defaults; without a camera it is never used.
/// </summary>
public sealed record MetricViewOptions
{
    /// <summary>Ground size of one bird's-eye pixel, in metres (0 = keep the vanishing-point trapezoid even with a camera; else 0.01–0.5). Default 0.05.</summary>
    public double MetresPerPx { get; init; } = 0.05;

    /// <summary>Half width of the ground area seen, left and right of the camera, in metres (2–50). Default 12.</summary>
    public double LateralHalfWidthM { get; init; } = 12;

    /// <summary>Distance ahead of the camera of the bottom bird's-eye row, in metres (0 = the ground seen by the frame's bottom row; else 0.5–50). Default 0.</summary>
    public double NearDistanceM { get; init; }

    /// <summary>Distance ahead of the camera of the top bird's-eye row, in metres (5–200, beyond the near distance). Default 40.</summary>
    public double FarDistanceM { get; init; } = 40;

    /// <summary>Smallest plausible lane width, in metres (1–10). Default 2.5.</summary>
    public double MinLaneWidthM { get; init; } = 2.5;

    /// <summary>Largest plausible lane width, in metres (1–10). Default 4.5.</summary>
    public double MaxLaneWidthM { get; init; } = 4.5;

    /// <summary>Whether the metric view is on (a camera is still needed).</summary>
    public bool IsEnabled() => MetresPerPx > 0;

    /// <summary>Bird's-eye width in pixels: 2 × half width / (m/px) + 1, rounded.</summary>
    public int WidthPx() => (int)Math.Round(2 * LateralHalfWidthM / MetresPerPx) + 1;

    /// <summary>Bird's-eye height in pixels for a near distance: (far − near) / (m/px) + 1, rounded.</summary>
    /// <param name="nearM">Near distance actually used, metres.</param>
    public int HeightPx(double nearM) => (int)Math.Round((FarDistanceM - nearM) / MetresPerPx) + 1;

    internal void Validate(List<OptionsFinding> f)
    {
        if (MetresPerPx != 0)
        {
            OptionsChecks.Range(f, "metric.metresPerPx", MetresPerPx, 0.01, 0.5);
        }

        OptionsChecks.Range(f, "metric.lateralHalfWidthM", LateralHalfWidthM, 2, 50);
        if (NearDistanceM != 0)
        {
            OptionsChecks.Range(f, "metric.nearDistanceM", NearDistanceM, 0.5, 50);
        }

        OptionsChecks.Range(f, "metric.farDistanceM", FarDistanceM, 5, 200);
        OptionsChecks.Less(f, "metric.nearDistanceM", NearDistanceM, "metric.farDistanceM", FarDistanceM);
        OptionsChecks.Range(f, "metric.minLaneWidthM", MinLaneWidthM, 1, 10);
        OptionsChecks.Range(f, "metric.maxLaneWidthM", MaxLaneWidthM, 1, 10);
        OptionsChecks.Less(f, "metric.minLaneWidthM", MinLaneWidthM, "metric.maxLaneWidthM", MaxLaneWidthM);
        if (MetresPerPx > 0 && WidthPx() > 2048)
        {
            f.Add(new OptionsFinding("metric.lateralHalfWidthM", "the view would be wider than 2048 pixels at metric.metresPerPx"));
        }

        if (MetresPerPx > 0 && HeightPx(Math.Max(NearDistanceM, 0)) > 4096)
        {
            f.Add(new OptionsFinding("metric.farDistanceM", "the view would be taller than 4096 pixels at metric.metresPerPx"));
        }
    }
}
