using LaneBaseline.Core.Random;

namespace LaneBaseline.Vision.Synthetic;

/// <summary>Per-scene colours and light (BGR, 0–255), drawn from the scene seed.</summary>
internal readonly record struct SceneLook(
    double SurfaceB, double SurfaceG, double SurfaceR,
    double VergeB, double VergeG, double VergeR,
    double SkyTopB, double SkyTopG, double SkyTopR,
    double SkyLowB, double SkyLowG, double SkyLowR,
    double PaintBrightness, double Exposure, double SunAzimuthRad, double SunElevationRad, double SunColumnFraction)
{
    public static SceneLook From(SceneSpec scene)
    {
        SplitMix64 rng = SplitMix64.ForStream(scene.SceneSeed, 1);
        double grey = scene.Concrete ? rng.NextDouble(150, 180) : rng.NextDouble(78, 112);
        double tint = rng.NextDouble(-4, 4);
        double vergeG = rng.NextDouble(85, 125);
        double dry = rng.NextDouble();
        double sky = rng.NextDouble(0.85, 1.1);
        return new SceneLook(
            grey + tint, grey, grey - tint,
            rng.NextDouble(45, 70), vergeG, vergeG * ((dry * 0.45) + 0.6),
            Math.Min(255, 215 * sky), Math.Min(255, 160 * sky), Math.Min(255, 110 * sky),
            Math.Min(255, 235 * sky), Math.Min(255, 225 * sky), Math.Min(255, 212 * sky),
            rng.NextDouble(0.85, 1.0),
            rng.NextDouble(0.92, 1.06),
            rng.NextDouble(-1.2, 1.2),
            rng.NextDouble(0.35, 0.9),
            rng.NextDouble(0.25, 0.75));
    }
}
