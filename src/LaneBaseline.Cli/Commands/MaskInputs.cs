namespace LaneBaseline.Cli.Commands;

/// <summary>Mask-input settings of a score run.</summary>
internal sealed record MaskInputs((int Width, int Height)? Size, int MinRows, string? CsvPath);
