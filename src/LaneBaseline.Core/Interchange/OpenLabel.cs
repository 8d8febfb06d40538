namespace LaneBaseline.Core.Interchange;

/// <summary>
/// The names LaneBaseline uses in ASAM OpenLABEL 1.0.0 files. The standard fixes the structure (root
/// <c>openlabel</c>, <c>metadata.schema_version</c>, <c>objects.{uid}</c> with <c>name</c> and <c>type</c>,
/// <c>frames.{n}.objects.{uid}.object_data.poly2d[]</c> with <c>name</c>, <c>val</c>, <c>mode</c>, <c>closed</c>) but
/// no class names: <see cref="LaneMarkingType"/> is ours. See docs/formats.md.
/// </summary>
public static class OpenLabel
{
    /// <summary>The schema version written and accepted.</summary>
    public const string SchemaVersion = "1.0.0";

    /// <summary>Our object <c>type</c> for a lane marking (boundary).</summary>
    public const string LaneMarkingType = "lane-marking";

    /// <summary>The only poly2d mode we write and read: absolute pixel coordinates.</summary>
    public const string AbsoluteMode = "MODE_POLY2D_ABSOLUTE";

    /// <summary>The <c>name</c> of each poly2d item we write.</summary>
    public const string PolylineName = "lane";

    /// <summary>Key under <c>frame_properties</c> holding our frame key, size, tags and unknown keys.</summary>
    public const string FramePropertiesKey = "lanebaseline";

    /// <summary>Key on a poly2d item holding a lane's unknown lane-file keys.</summary>
    public const string LaneExtraKey = "lanebaseline_extra";
}
