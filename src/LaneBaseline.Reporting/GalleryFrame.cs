namespace LaneBaseline.Reporting;

/// <summary>One thumbnail of the gallery with the scores that ranked it.</summary>
/// <param name="System">System whose prediction is drawn.</param>
/// <param name="Frame">Frame key.</param>
/// <param name="Tags">Truth tags of the frame.</param>
/// <param name="Tp">True positives at IoU 0.50.</param>
/// <param name="Fp">False positives at IoU 0.50.</param>
/// <param name="Fn">False negatives at IoU 0.50.</param>
/// <param name="F1">Frame F1 at IoU 0.50.</param>
/// <param name="PointAccuracy">Frame point accuracy, NaN without truth lanes.</param>
/// <param name="Jpeg">The thumbnail, JPEG-encoded.</param>
/// <param name="Width">Thumbnail width in pixels.</param>
/// <param name="Height">Thumbnail height in pixels.</param>
public sealed record GalleryFrame(
    string System,
    string Frame,
    IReadOnlyList<string> Tags,
    long Tp,
    long Fp,
    long Fn,
    double F1,
    double PointAccuracy,
    ReadOnlyMemory<byte> Jpeg,
    int Width,
    int Height);
