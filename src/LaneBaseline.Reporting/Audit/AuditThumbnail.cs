namespace LaneBaseline.Reporting.Audit;

/// <summary>A small JPEG of one overlay the audit drew, embedded in the page, and a link to the full-size file.</summary>
/// <param name="Rank">1 for the worst frame.</param>
/// <param name="Frame">Frame key.</param>
/// <param name="Href">The full-size overlay relative to the page (URL-escaped), or null.</param>
/// <param name="Jpeg">Encoded thumbnail.</param>
/// <param name="Width">Thumbnail width, px.</param>
/// <param name="Height">Thumbnail height, px.</param>
public sealed record AuditThumbnail(int Rank, string Frame, string? Href, ReadOnlyMemory<byte> Jpeg, int Width, int Height);
