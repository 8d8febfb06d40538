namespace LaneBaseline.Core.Audit;

/// <summary>The limits and assumptions of the audit rules (defaults and sources in <see cref="AuditRules.All"/>).</summary>
public sealed record AuditSettings
{
    /// <summary>Horizon row in pixels, or null to estimate it per frame from the lanes' vanishing point.</summary>
    public double? HorizonRow { get; init; }

    /// <summary>Frame size for records that carry none (and no baseline record gives one), or null.</summary>
    public (int Width, int Height)? Size { get; init; }

    /// <summary>The size of a record that carries none (and no baseline record gives one): <see cref="Size"/>, else the camera's, else null.</summary>
    public (int Width, int Height)? SizeWithoutRecordSize() => Size ?? Camera.SizeOrNull();

    /// <summary>Frame rate of numbered sequences, frames per second (default 10, as <c>detect</c> and <c>render</c>).</summary>
    public double FramesPerSecond { get; init; } = 10;

    /// <summary>The frames are independent stills (<c>--stills</c>): the temporal rules (LBA-T) do not run.</summary>
    public bool Stills { get; init; }

    /// <summary>Largest lateral speed of the vehicle relative to the markings, m/s (default 3; an assumption).</summary>
    public double MaxLateralSpeedMps { get; init; } = 3.0;

    /// <summary>Allowance for label noise in a lateral move between frames, m (default 0.15).</summary>
    public double LateralNoiseM { get; init; } = 0.15;

    /// <summary>Lane width assumed to turn image widths into metres without a camera, m (default 3.5).</summary>
    public double AssumedLaneWidthM { get; init; } = 3.5;

    /// <summary>Baseline lanes with a score at or above this count as confident; lanes without a score always do.</summary>
    public double BaselineMinScore { get; init; } = 0.5;

    /// <summary>F1 at IoU 0.50 against the baseline below which a frame disagrees (default 0.5).</summary>
    public double MinAgreementF1 { get; init; } = 0.5;

    /// <summary>Tolerance for crossings, folds and slot order, px (default 2).</summary>
    public double OrderTolerancePx { get; init; } = 2.0;

    /// <summary>How far above the horizon a point may lie, as a fraction of the frame height (default 0.03).</summary>
    public double HorizonMarginFraction { get; init; } = 0.03;

    /// <summary>Shortest plausible vertical extent as a fraction of the frame height (default 0.05), at least 30 px.</summary>
    public double ShortLaneFraction { get; init; } = 0.05;

    /// <summary>Camera of the frames: enables the ground rules (LBA-G) and gives the horizon row; null without.</summary>
    public Geometry.CameraModel? Camera { get; init; }

    /// <summary>Design speed for the curve-radius rule, km/h (default 100).</summary>
    public double DesignSpeedKmh { get; init; } = 100;

    /// <summary>Superelevation e for the curve-radius rule (default 0.08, docs/checks.md worked example).</summary>
    public double Superelevation { get; init; } = 0.08;

    /// <summary>Side friction factor f for the curve-radius rule (default 0.12, docs/checks.md worked example).</summary>
    public double SideFriction { get; init; } = 0.12;

    /// <summary>Narrowest lane accepted on the ground, m (default 2.7 - 0.2 allowance).</summary>
    public double MinLaneWidthM { get; init; } = Geometry.RoadGeometry.MinLaneWidthM - 0.2;

    /// <summary>Widest lane accepted on the ground, m (default 3.75 + 0.2 allowance).</summary>
    public double MaxLaneWidthM { get; init; } = Geometry.RoadGeometry.MaxLaneWidthM + 0.2;

    /// <summary>Boundaries closer than this are the two lines of one double marking, m (default 0.5).</summary>
    public double DoubleLineMaxM { get; init; } = 0.5;

    /// <summary>Distance ahead where lane width is measured, m (default 10).</summary>
    public double WidthCheckDistanceM { get; init; } = 10;

    /// <summary>Second distance for the parallelism check, m (default 30).</summary>
    public double ParallelCheckDistanceM { get; init; } = 30;

    /// <summary>Largest change of a lane's width between the two distances, m (default 0.5).</summary>
    public double MaxWidthChangeM { get; init; } = 0.5;

    /// <summary>Shortest ground span of a lane for the curve fit, m (default 15).</summary>
    public double MinCurveSpanM { get; init; } = 15;

    /// <summary>Largest ratio of neighbouring lane widths at one row (default 3.75 / 2.7 x 1.05).</summary>
    public double MaxWidthRatio { get; init; } = Geometry.RoadGeometry.MaxLaneWidthM / Geometry.RoadGeometry.MinLaneWidthM * 1.05;

    /// <summary>Camera height assumed by the kink rule without a camera file, m (default 1.5; from memory).</summary>
    public double AssumedCameraHeightM { get; init; } = 1.5;

    /// <summary>Shortest road-plane piece between which the kink rule measures a turn, m (default 4).</summary>
    public double KinkPieceM { get; init; } = 4;

    /// <summary>How far ahead the kink rule looks, m (default 60, as the curve-radius rule's fit).</summary>
    public double KinkLookAheadM { get; init; } = 60;

    /// <summary>Turn allowed beyond the sharpest curve for label noise, degrees (default 3; common practice).</summary>
    public double KinkAllowanceDeg { get; init; } = 3;
}
