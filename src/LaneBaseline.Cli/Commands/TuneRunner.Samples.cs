using System.Collections.Concurrent;
using System.Diagnostics;
using System.Globalization;
using System.Security.Cryptography;
using System.Text;
using System.Text.Json;
using System.Text.RegularExpressions;
using LaneBaseline.Core;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Metrics;
using LaneBaseline.Core.Options;
using LaneBaseline.Core.Results;
using LaneBaseline.Core.Sharding;
using LaneBaseline.Core.Tuning;
using LaneBaseline.Vision.IO;
using LaneBaseline.Vision.Metrics;
using LaneBaseline.Vision.Pipeline;
using OpenCvSharp;
using YamlDotNet.RepresentationModel;

namespace LaneBaseline.Cli.Commands;

/// <summary>Tune, part 2: splitting the truth into tuning and holdout frames and loading (and checking) their images.</summary>
internal sealed partial class TuneRunner
{
    private (IReadOnlyList<LaneRecord> Tuning, IReadOnlyList<LaneRecord> Holdout, bool Overlap) Split()
    {
        List<LaneRecord> all = LaneFileReader.ReadTruth(request.Truth);
        if (request.HoldoutTruth is string second)
        {
            List<LaneRecord> other = LaneFileReader.ReadTruth(second);
            var keys = all.Select(r => r.Frame).ToHashSet(StringComparer.Ordinal);
            string[] shared = [.. other.Where(r => keys.Contains(r.Frame)).Select(r => r.Frame)];
            if (shared.Length > 0 && !request.AllowOverlap)
            {
                throw new UsageException(string.Create(
                    CultureInfo.InvariantCulture,
                    $"{shared.Length} frame(s) of --holdout-truth are also in --truth (first: {shared[0]}); a holdout score on frames the search has seen overstates the result. Remove them, or pass --allow-overlap to report it anyway"));
            }

            return (all, other, shared.Length > 0);
        }

        double f = request.HoldoutFraction;
        var tuning = all.Where(r => !IsHoldout(r.Frame, f)).ToList();
        var holdout = all.Where(r => IsHoldout(r.Frame, f)).ToList();
        if (tuning.Count == 0)
        {
            throw new UsageException(string.Create(CultureInfo.InvariantCulture, $"--holdout {f} leaves no tuning frame among the {all.Count} frames of {request.Truth}; lower it"));
        }

        if (holdout.Count == 0)
        {
            if (!request.AllowOverlap)
            {
                throw new UsageException(string.Create(
                    CultureInfo.InvariantCulture,
                    $"--holdout {f} leaves no holdout frame among the {all.Count} frames of {request.Truth}, so the score would be reported on the frames it was tuned on; give a larger --holdout, a --holdout-truth file, or --allow-overlap to report on the tuning frames"));
            }

            return (tuning, tuning, true);
        }

        return (tuning, holdout, false);
    }

    /// <summary>Whether a frame is a holdout frame: the top 53 bits of FNV-1a 64 of its key, as a fraction, fall below <paramref name="fraction"/>.</summary>
    public static bool IsHoldout(string frameKey, double fraction) =>
        (ShardSpec.Fnv1a64(frameKey) >> 11) * (1.0 / (1UL << 53)) < fraction;


    private (List<Sample> Tuning, List<Sample> Holdout) LoadSamples(IReadOnlyList<LaneRecord> tuningTruth, IReadOnlyList<LaneRecord> holdoutTruth)
    {
        var images = FrameListing.ListImages(request.Frames).ToDictionary(i => i.Key, StringComparer.Ordinal);
        long bytes = tuningTruth.Concat(holdoutTruth).DistinctBy(r => r.Frame).Sum(r => 3L * r.Width!.Value * r.Height!.Value);
        bool keep = bytes <= MemoryCapBytes;
        var tuning = new List<Sample>();
        var holdout = new List<Sample>();
        foreach ((IReadOnlyList<LaneRecord> set, List<Sample> into, string file) in new[] { (tuningTruth, tuning, request.Truth), (holdoutTruth, holdout, request.HoldoutTruth ?? request.Truth) })
        {
            foreach (LaneRecord r in set.OrderBy(r => r.Frame, StringComparer.Ordinal))
            {
                if (!images.TryGetValue(r.Frame, out FrameItem? item))
                {
                    throw BadInputException.At(file, r.LineNumber, "frame", "no image '" + r.Frame + "' under " + request.Frames);
                }

                if (keep && !decoded.ContainsKey(r.Frame))
                {
                    decoded.Add(r.Frame, Decode(item, r));
                }
                else if (!keep)
                {
                    // Too many pixels to keep: decode once now anyway, so a bad frame stops the run before any trial.
                    Decode(item, r).Dispose();
                }

                into.Add(new Sample(item with { TimestampSeconds = item.Index / ImageFps }, r, decoded.TryGetValue(r.Frame, out Mat? frame) ? frame : null));
            }
        }

        return (tuning, holdout);
    }

    private static Mat Decode(FrameItem item, LaneRecord truth)
    {
        Mat frame;
        try
        {
            frame = FrameLoader.Load(item.Path!, KnownPresets.Default.Limits);
        }
        catch (OpenCVException ex)
        {
            throw BadInputException.At(item.Path ?? item.Key, 0, null, ex.Message);
        }

        if (frame.Cols != truth.Width || frame.Rows != truth.Height)
        {
            string message = string.Create(CultureInfo.InvariantCulture, $"image size {frame.Cols}x{frame.Rows} differs from the truth's {truth.Width}x{truth.Height}");
            frame.Dispose();
            throw BadInputException.At(item.Path ?? item.Key, 0, null, message);
        }

        return frame;
    }
}
