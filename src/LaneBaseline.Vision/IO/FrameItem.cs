namespace LaneBaseline.Vision.IO;

/// <summary>One frame of a source: its position, its lane-file key and where to read it from.</summary>
/// <param name="Index">Zero-based position in the source order.</param>
/// <param name="Key">Lane-file frame key: path relative to the frames root with '/' separators, or <c>VIDEO#NNNNNN</c>.</param>
/// <param name="Path">Image file to decode, or null for a video frame (already decoded by the source).</param>
/// <param name="TimestampSeconds">Frame time in seconds (video position, or the index for stills).</param>
public sealed record FrameItem(int Index, string Key, string? Path, double TimestampSeconds);
