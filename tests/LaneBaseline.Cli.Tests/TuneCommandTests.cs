using System.Globalization;
using System.Text.RegularExpressions;
using LaneBaseline.Core.Options;
using LaneBaseline.Testing;
using Xunit;

namespace LaneBaseline.Cli.Tests;

/// <summary>Rendered night frames at full severity (dim paint, headlight pool) with exact truth, made once for the class.</summary>
public sealed class DimFrames : IDisposable
{
    public DimFrames()
    {
        (int exit, _, string err) = CliRunner.Run(
            "render", "--out", Dir.Path, "--seed", "11", "--count", "12", "--size", "640x360",
            "--conditions", "night", "--severity", "1", "--format", "png", "--threads", "2");
        Assert.True(exit == 0, err);
    }

    public TempDir Dir { get; } = new();

    public string Truth => Dir.File("truth.lanes.jsonl");

    public void Dispose() => Dir.Dispose();
}

public sealed partial class TuneCommandTests : IClassFixture<DimFrames>, IDisposable
{
    private readonly DimFrames frames;
    private readonly TempDir work = new();

    public TuneCommandTests(DimFrames frames)
    {
        this.frames = frames;
    }

    public void Dispose() => work.Dispose();

    private (int Exit, string Out, string Err) Tune(string output, params string[] extra) =>
        CliRunner.Run(["tune", "--frames", frames.Dir.Path, "--truth", frames.Truth, "--date", "2026-01-01", "-o", output, .. extra]);

    private static (double BaseTuning, double BaseHoldout, double TunedTuning, double TunedHoldout) Header(string yaml)
    {
        Match b = BaseRow().Match(yaml), t = TunedRow().Match(yaml);
        Assert.True(b.Success && t.Success, yaml);
        static double N(Group g) => double.Parse(g.Value, CultureInfo.InvariantCulture);
        return (N(b.Groups[1]), N(b.Groups[2]), N(t.Groups[1]), N(t.Groups[2]));
    }

    [Fact]
    public void Tuning_beats_the_default_preset_on_dim_frames_and_reports_the_holdout_score()
    {
        // Source: common practice (parameters are chosen on one part of a labelled set and the score is reported on
        // frames the search never saw). The truth is the renderer's exact geometry, not the pipeline's output.
        // The default preset equalises dim frames itself (CLAHE on a dark road, docs/detect.md) and scores 0.87 on these,
        // leaving a 12-trial search nothing to gain; the base here is the default without that equalisation, a preset
        // not suited to dim frames, so the check stays that the search improves on its base.
        string basePreset = work.File("no-equalisation.yaml");
        File.WriteAllText(basePreset, "color:\n  claheMaxRoadLightness: 0\n  claheMinVeilLightness: 255\n");
        string best = work.File("best.yaml");
        (int exit, string stdout, string err) = Tune(best, "--budget", "12", "--seed", "1", "--threads", "2", "--config", basePreset);
        Assert.True(exit == 0, err);
        string yaml = File.ReadAllText(best);
        (double baseTuning, double baseHoldout, double tunedTuning, double tunedHoldout) = Header(yaml);
        Assert.True(tunedTuning > baseTuning + 0.05, yaml);
        Assert.InRange(baseHoldout, 0, 1);
        Assert.InRange(tunedHoldout, 0, 1);
        Assert.Contains("holdout", stdout, StringComparison.Ordinal);
        Assert.Contains("# date: 2026-01-01T00:00:00Z", yaml, StringComparison.Ordinal);
        Assert.Contains("seed 1", yaml, StringComparison.Ordinal);

        // The output is a complete, valid preset that differs from the default in at least one searched key.
        PipelineOptions tuned = PresetLoader.Parse(yaml, best);
        Assert.NotEqual(PresetLoader.ToYaml(KnownPresets.Default), PresetLoader.ToYaml(tuned));

        // The split is by frame key: 12 frames, none in both sets.
        Match frameCounts = FramesRow().Match(yaml);
        Assert.True(frameCounts.Success, yaml);
        int nt = int.Parse(frameCounts.Groups[1].Value, CultureInfo.InvariantCulture);
        int nh = int.Parse(frameCounts.Groups[2].Value, CultureInfo.InvariantCulture);
        Assert.Equal(12, nt + nh);
        Assert.True(nh > 0 && nt > 0);

        // One log line per trial plus the header line, each with the documented fields.
        string[] log = File.ReadAllLines(best + ".trials.jsonl");
        Assert.Equal(13, log.Length);
        Assert.StartsWith("{\"tool\":\"lanebaseline\",\"schema_version\":1,\"run\":", log[0], StringComparison.Ordinal);
        Assert.All(log.Skip(1), l => Assert.Matches("^\\{\"index\":\\d+,\"phase\":\"(start|explore|refine)\",\"values\":\\{\"color\\.whiteMinContrast\":", l));
    }

    [Fact]
    public void Same_seed_gives_identical_preset_and_log_whatever_the_threads()
    {
        string one = work.File("one.yaml"), two = work.File("two.yaml");
        (int e1, _, string err1) = Tune(one, "--budget", "8", "--seed", "5", "--threads", "1");
        (int e2, _, string err2) = Tune(two, "--budget", "8", "--seed", "5", "--threads", "2");
        Assert.True(e1 == 0, err1);
        Assert.True(e2 == 0, err2);
        Assert.Equal(File.ReadAllBytes(one), File.ReadAllBytes(two));

        // Wall-clock seconds are the only field allowed to differ.
        Assert.Equal(Log(one), Log(two));
        Assert.Equal(9, Log(one).Length);
    }

    [Fact]
    public void Resume_continues_an_interrupted_log_to_the_same_result()
    {
        string full = work.File("full.yaml"), cut = work.File("cut.yaml");
        Assert.Equal(0, Tune(full, "--budget", "7", "--seed", "3").Exit);

        // Keep the header and four trials plus half a line, as a crash would leave it.
        string[] lines = File.ReadAllLines(full + ".trials.jsonl");
        File.WriteAllText(cut + ".trials.jsonl", string.Join("\n", lines.Take(5)) + "\n" + lines[5][..20]);
        (int exit, _, string err) = Tune(cut, "--budget", "7", "--seed", "3", "--resume");
        Assert.True(exit == 0, err);
        Assert.Contains("resuming after 4 logged trial(s)", err, StringComparison.Ordinal);
        Assert.Equal(File.ReadAllBytes(full), File.ReadAllBytes(cut));
        Assert.Equal(Log(full), Log(cut));

        // A log from another search is refused, naming the log's first line.
        (int other, _, string why) = Tune(cut, "--budget", "7", "--seed", "4", "--resume");
        Assert.Equal(3, other);
        Assert.Contains("cut.yaml.trials.jsonl:1", why, StringComparison.Ordinal);
    }

    [Fact]
    public void Tuning_and_reporting_on_the_same_frames_is_refused_unless_allowed()
    {
        string best = work.File("best.yaml");
        (int exit, _, string err) = Tune(best, "--holdout", "0", "--budget", "2");
        Assert.Equal(2, exit);
        Assert.Contains("no holdout frame", err, StringComparison.Ordinal);
        Assert.Contains("--allow-overlap", err, StringComparison.Ordinal);
        Assert.False(File.Exists(best));

        // The same truth file as --holdout-truth is the same frames too.
        (int exit2, _, string err2) = Tune(best, "--holdout-truth", frames.Truth, "--budget", "2");
        Assert.Equal(2, exit2);
        Assert.Contains("also in --truth", err2, StringComparison.Ordinal);
        Assert.False(File.Exists(best));

        (int allowed, _, string err3) = Tune(best, "--holdout", "0", "--allow-overlap", "--budget", "2");
        Assert.True(allowed == 0, err3);
        string yaml = File.ReadAllText(best);
        Assert.Contains("HOLDOUT OVERLAPS TUNING", yaml, StringComparison.Ordinal);
        Assert.Contains("# frames: 12 tuning, 12 holdout", yaml, StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("parameters:\n  - key: color.whiteMinContrast\n    min: 5\n    maks: 9\n", "space.yaml:4", "maks")]
    [InlineData("parameters:\n  - key: color.whiteMinContrast\n    min: 5\n    max: 9\n  - key: color.noSuchKey\n    min: 1\n    max: 2\n", "space.yaml:5", "color.noSuchKey")]
    [InlineData("parameters:\n  - key: region.estimateVanishingPoint\n    min: 0\n    max: 1\n", "space.yaml:2", "numeric")]
    public void A_bad_space_file_exits_3_naming_file_and_line(string text, string where, string what)
    {
        string space = work.File("space.yaml");
        File.WriteAllText(space, text);
        string best = work.File("best.yaml");
        (int exit, _, string err) = Tune(best, "--space", space, "--budget", "2");
        Assert.Equal(3, exit);
        Assert.Contains(where, err, StringComparison.Ordinal);
        Assert.Contains(what, err, StringComparison.Ordinal);
        Assert.DoesNotContain("   at ", err, StringComparison.Ordinal);
        Assert.False(File.Exists(best));
    }

    [Fact]
    public void Invalid_presets_are_scored_worst_and_logged_and_an_all_invalid_space_exits_3()
    {
        // whiteMinContrast is valid in 0-255 (configs/presets/default.yaml); 250-400 mixes valid and invalid values.
        string space = work.File("mixed.yaml");
        File.WriteAllText(space, "parameters:\n  - key: color.whiteMinContrast\n    min: 250\n    max: 400\n    type: int\n");
        string best = work.File("mixed-best.yaml");
        (int exit, _, string err) = Tune(best, "--space", space, "--budget", "5", "--seed", "2");
        Assert.True(exit == 0, err);
        string[] invalid = [.. File.ReadAllLines(best + ".trials.jsonl").Where(l => l.Contains("\"invalid\":", StringComparison.Ordinal))];
        Assert.NotEmpty(invalid);
        Assert.All(invalid, l => Assert.Contains("\"objective\":-1,", l, StringComparison.Ordinal));
        Assert.InRange(PresetLoader.Parse(File.ReadAllText(best), best).Color.WhiteMinContrast, 250, 255);

        File.WriteAllText(space, "parameters:\n  - key: color.whiteMinContrast\n    min: 300\n    max: 400\n    type: int\n");
        (int all, _, string why) = Tune(work.File("none.yaml"), "--space", space, "--budget", "3");
        Assert.Equal(3, all);
        Assert.Contains("mixed.yaml", why, StringComparison.Ordinal);
        Assert.Contains("every trial", why, StringComparison.Ordinal);
        Assert.False(File.Exists(work.File("none.yaml")));
    }

    private static string[] Log(string output) =>
        [.. File.ReadAllLines(output + ".trials.jsonl").Select(l => SecondsField().Replace(l, "\"seconds\":_"))];

    [GeneratedRegex(@"#\s+base preset\s+([0-9.]+)\s+([0-9.]+)")]
    private static partial Regex BaseRow();

    [GeneratedRegex(@"#\s+tuned preset\s+([0-9.]+)\s+([0-9.]+)")]
    private static partial Regex TunedRow();

    [GeneratedRegex(@"# frames: (\d+) tuning, (\d+) holdout")]
    private static partial Regex FramesRow();

    [GeneratedRegex("\"seconds\":[0-9.eE+-]+")]
    private static partial Regex SecondsField();
}
