namespace LaneBaseline.Vision.Synthetic;

/// <summary>The marking conventions the renderer draws.</summary>
public static class KnownMarkingStandards
{
    /// <summary>
    /// United States: lines 4–6 in (0.10–0.15 m) (MUTCD 2009, Sec. 3A.06); broken lines 10 ft strokes and 30 ft
    /// gaps (MUTCD 2003, Sec. 3A.05); yellow left edge on divided roads (MUTCD 2003, Sec. 3B.01); lanes 10–12 ft
    /// (FHWA, "Lane Width"); double-line gap 0.10–0.18 m (Vienna Convention 1968, Annex 2; 0.15 m chosen).
    /// </summary>
    public static MarkingStandard UnitedStates { get; } = new()
    {
        Name = "us",
        MinLineWidthM = 0.1016,
        MaxLineWidthM = 0.1524,
        DashLengthM = 3.048,
        GapLengthM = 9.144,
        MinLaneWidthM = 3.048,
        MaxLaneWidthM = 3.6576,
        YellowLeftEdge = true,
        DoubleLineGapM = 0.15,
    };

    /// <summary>
    /// United Kingdom: lane lines above 40 mph 2 m mark / 7 m gap, 100 mm wide, 150 mm alternative (Traffic Signs
    /// Manual ch. 5, 2009, Table 4-2); 3.65 m trunk-road lanes (DMRB TD 27/96), narrower down to 3.0 m.
    /// </summary>
    public static MarkingStandard UnitedKingdom { get; } = new()
    {
        Name = "uk",
        MinLineWidthM = 0.10,
        MaxLineWidthM = 0.15,
        DashLengthM = 2.0,
        GapLengthM = 7.0,
        MinLaneWidthM = 3.0,
        MaxLaneWidthM = 3.65,
        YellowLeftEdge = false,
        DoubleLineGapM = 0.12,
    };

    /// <summary>
    /// Continental Europe: lines at least 0.10 m (0.12–0.20 m used), broken strokes 2–10 m outside towns
    /// (Vienna Convention 1968, Annex 2; 3 m / 9 m chosen, the example pattern); lanes 2.75–3.75 m
    /// (DMRB TD 27/96 European motorway range 3.50–3.75 m; urban minima ~2.75 m).
    /// </summary>
    public static MarkingStandard Europe { get; } = new()
    {
        Name = "eu",
        MinLineWidthM = 0.12,
        MaxLineWidthM = 0.20,
        DashLengthM = 3.0,
        GapLengthM = 9.0,
        MinLaneWidthM = 2.75,
        MaxLaneWidthM = 3.75,
        YellowLeftEdge = false,
        DoubleLineGapM = 0.12,
    };

    /// <summary>All standards, in a fixed order.</summary>
    public static IReadOnlyList<MarkingStandard> All { get; } = [UnitedStates, UnitedKingdom, Europe];
}
