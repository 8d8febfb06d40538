namespace LaneBaseline.Core.Options;

/// <summary>Kalman tracking of the fit coefficients over a sequence, driven by frame timestamps (off for unrelated stills).</summary>
public sealed record TrackingOptions
{
    /// <summary>Whether frames form one sequence (tracking and vanishing-point smoothing on). Default false.</summary>
    public bool Enabled { get; init; }

    /// <summary>Process noise of the lateral offset C, in bird's-eye pixels per √second (0–1000). Default 60.</summary>
    public double OffsetNoisePxPerSqrtS { get; init; } = 60;

    /// <summary>Measurement noise of the lateral offset C, in bird's-eye pixels (0.01–1000). Default 4.</summary>
    public double MeasurementNoisePx { get; init; } = 4;

    /// <summary>A track is dropped after this many frames without a measurement (1–1000). Default 5.</summary>
    public int MaxMissedFrames { get; init; } = 5;

    internal void Validate(List<OptionsFinding> f)
    {
        OptionsChecks.Range(f, "tracking.offsetNoisePxPerSqrtS", OffsetNoisePxPerSqrtS, 0, 1000);
        OptionsChecks.Range(f, "tracking.measurementNoisePx", MeasurementNoisePx, 0.01, 1000);
        OptionsChecks.Range(f, "tracking.maxMissedFrames", MaxMissedFrames, 1, 1000);
    }
}
