namespace LaneBaseline.Reporting;

/// <summary>Worst frames per truth tag (condition) for one system: the same thumbnails as the gallery, grouped by tag.</summary>
/// <param name="System">The system whose frames are shown (the first one scored).</param>
/// <param name="Groups">One group per shown tag, in the order of the per-tag chart.</param>
/// <param name="TagsLeftOut">Tags present in the truth but not shown because of the cap, in ordinal order.</param>
/// <param name="Selection">One sentence saying how frames were chosen and the caps.</param>
public sealed record ConditionGallery(string System, IReadOnlyList<ConditionGroup> Groups, IReadOnlyList<string> TagsLeftOut, string Selection);
