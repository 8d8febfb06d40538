namespace LaneBaseline.Core.Audit;

/// <summary>The frame size a camera file fixes.</summary>
internal static class CameraSizeExtensions
{
    public static (int Width, int Height)? SizeOrNull(this Geometry.CameraModel? camera) =>
        camera is null ? null : (camera.ImageWidth, camera.ImageHeight);
}
