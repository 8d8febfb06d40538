using System.Globalization;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Random;
using LaneBaseline.Testing;

namespace LaneBaseline.Benchmarks;

/// <summary>
/// Writes large truth and prediction lane files for the memory soak (scripts/soak.sh): 1920x1080 frames with four
/// truth and four predicted lanes of 11 points, in sequences of 100 frames (so audit's temporal rules run), the
/// prediction jittered by a seeded SplitMix64. Invented data, for measuring memory only.
/// </summary>
internal static class SoakData
{
    public static void Write(int frames, string dir) => Write(frames, dir, 1920, 1080);

    /// <summary>The same lanes in frames of another size (the points are scaled from the 1920x1080 layout).</summary>
    public static void Write(int frames, string dir, int width, int height)
    {
        double sx = width / 1920.0, sy = height / 1080.0;
        Directory.CreateDirectory(dir);
        var rng = new SplitMix64(20261202);
        using LaneFileWriter truth = LaneFileWriter.Create(Path.Combine(dir, "truth.lanes.jsonl"));
        using LaneFileWriter pred = LaneFileWriter.Create(Path.Combine(dir, "pred.lanes.jsonl"));
        double[] xs = [300, 700, 1000, 1400];
        int[] slots = [-2, -1, 1, 2];
        for (int i = 0; i < frames; i++)
        {
            string key = string.Create(CultureInfo.InvariantCulture, $"drive{i / 100:0000}/{i % 100:000000}.png");
            double drift = 20 * Math.Sin(i / 37.0);
            Lane Make(int k, double dx) => new()
            {
                Slot = slots[k],
                Points = [.. Enumerable.Range(0, 11).Select(s =>
                {
                    double x0 = xs[k] + drift + dx, xt = 820 + ((x0 - 820) * 0.1);
                    double x = Math.Round(x0 + ((xt - x0) * s / 10), 2), y = 589 - ((589 - 280) * s / 10.0);
                    return width == 1920 && height == 1080 ? new LanePoint(x, y) : new LanePoint(Math.Round(x * sx, 2), Math.Round(y * sy, 2));
                })],
            };
            truth.Write(Lanes.Truth(key, width, height, [.. Enumerable.Range(0, 4).Select(k => Make(k, 0))]));
            pred.Write(Lanes.Truth(key, width, height, [.. Enumerable.Range(0, 4).Select(k => Make(k, rng.NextDouble(-12, 12)))]));
        }
    }
}
