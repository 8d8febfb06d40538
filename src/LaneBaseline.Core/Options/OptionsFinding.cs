namespace LaneBaseline.Core.Options;

/// <summary>One validation finding: the camelCase key path as written in a preset (<c>gradient.blurKernelPx</c>) and the reason.</summary>
/// <param name="Key">Key path in the preset, sections separated by '.'.</param>
/// <param name="Problem">What is wrong, in plain words, including the valid range.</param>
public sealed record OptionsFinding(string Key, string Problem);
