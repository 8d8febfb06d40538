namespace LaneBaseline.Core.LaneFiles;

/// <summary>The marking types a lane file may name in <c>lanes[].kind</c>.</summary>
public static class LaneKinds
{
    /// <summary>A continuous line.</summary>
    public const string Solid = "solid";

    /// <summary>A broken line (segments and gaps).</summary>
    public const string Dashed = "dashed";

    /// <summary>Two parallel lines.</summary>
    public const string DoubleLine = "double";

    /// <summary>The edge of the paved road without paint.</summary>
    public const string RoadEdge = "road-edge";

    /// <summary>Type not known.</summary>
    public const string Unknown = "unknown";

    /// <summary>Every valid kind, in the order the specification lists them.</summary>
    public static IReadOnlyList<string> All { get; } = [Solid, Dashed, DoubleLine, RoadEdge, Unknown];

    /// <summary>Whether <paramref name="kind"/> is one of <see cref="All"/> (exact, case-sensitive).</summary>
    public static bool IsValid(string kind) => All.Contains(kind, StringComparer.Ordinal);
}
