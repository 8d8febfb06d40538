namespace LaneBaseline.Vision.Synthetic;

/// <summary>
/// One piece of a road centreline whose curvature changes linearly with arc length: a straight (0 → 0), a
/// circular arc (κ → κ) or a clothoid (κ0 → κ1). Curvature is in 1/m, positive turning left.
/// </summary>
/// <param name="LengthM">Arc length of the piece in metres (positive).</param>
/// <param name="StartCurvaturePerM">Curvature at the start, 1/m.</param>
/// <param name="EndCurvaturePerM">Curvature at the end, 1/m.</param>
public readonly record struct RoadPiece(double LengthM, double StartCurvaturePerM, double EndCurvaturePerM)
{
    /// <summary>A straight piece.</summary>
    public static RoadPiece Straight(double lengthM) => new(lengthM, 0, 0);

    /// <summary>A circular arc of signed radius (positive: turning left).</summary>
    public static RoadPiece Arc(double lengthM, double signedRadiusM) => new(lengthM, 1 / signedRadiusM, 1 / signedRadiusM);

    /// <summary>
    /// A clothoid of parameter A (m) from curvature κ0 to κ1; its length follows from κ(s) = s / A²
    /// (standard highway geometry): L = A² · |κ1 − κ0|.
    /// </summary>
    public static RoadPiece Clothoid(double parameterAM, double startCurvaturePerM, double endCurvaturePerM) =>
        new(parameterAM * parameterAM * Math.Abs(endCurvaturePerM - startCurvaturePerM), startCurvaturePerM, endCurvaturePerM);

    /// <summary>Curvature at distance <paramref name="sM"/> into the piece (linear in s).</summary>
    public double CurvatureAt(double sM) =>
        StartCurvaturePerM + ((EndCurvaturePerM - StartCurvaturePerM) * Math.Clamp(sM / LengthM, 0, 1));

    /// <summary>"straight", "arc" or "clothoid".</summary>
    public string KindName =>
        StartCurvaturePerM == EndCurvaturePerM ? (StartCurvaturePerM == 0 ? "straight" : "arc") : "clothoid";
}
