using System.CommandLine;
using System.Text;
using System.Text.Json;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Testing;
using OpenCvSharp;
using Xunit;

namespace LaneBaseline.Cli.Tests;

/// <summary>
/// One command line (docs/cli.md "Shared vocabulary"): the same names, aliases and defaults on every command,
/// <c>-</c> for standard input and output, deprecated spellings still working with a note, typo suggestions and
/// examples in help.
/// </summary>
public sealed class CommandLineVocabularyTests : IDisposable
{
    private readonly TempDir dir = new();

    public void Dispose() => dir.Dispose();

    private static IEnumerable<Command> Commands() => Program.CreateRoot().Subcommands;

    private static (int Exit, string Out, string Err) RunWithInput(string stdin, params string[] args)
    {
        using var output = new StringWriter();
        using var error = new StringWriter();
        using var input = new MemoryStream(Encoding.UTF8.GetBytes(stdin));
        int exit = Program.Invoke(args, output, error, input);
        return (exit, output.ToString(), error.ToString());
    }

    private string Truth()
    {
        string path = dir.File("truth.lanes.jsonl");
        Lanes.WriteFile(path,
        [
            Lanes.Truth("s/000001.png", 640, 360, Lanes.Of((100, 359), (300, 180)), Lanes.Of((540, 359), (340, 180))),
            Lanes.Truth("s/000002.png", 640, 360, Lanes.Of((110, 359), (305, 180))),
        ]);
        return path;
    }

    // Source: docs/cli.md (shared vocabulary): every command names its main output -o/--output, its worker count
    // -j/--threads defaulting to the number of cores, and frame inputs --frames.
    [Fact]
    public void EveryCommand_UsesTheSharedNamesAliasesAndDefaults()
    {
        string[] writers = ["detect", "audit", "tune", "convert", "render", "report", "merge"];
        string[] threaded = ["detect", "score", "audit", "tune", "render", "report", "merge", "bench"];
        foreach (Command command in Commands())
        {
            List<Option> visible = [.. command.Options.Where(o => !o.Hidden)];
            Option? output = visible.FirstOrDefault(o => o.Name == "--output");
            Assert.Equal(writers.Contains(command.Name), output is not null);
            if (output is not null)
            {
                Assert.Equal(["-o"], output.Aliases);
            }

            // No other visible option takes -o or another spelling of the output.
            Assert.DoesNotContain(visible, o => o != output && (o.Aliases.Contains("-o") || o.Name == "--out"));
            Option? legacy = command.Options.FirstOrDefault(o => o.Name == "--out");
            Assert.True(legacy is null || legacy.Hidden, command.Name + ": --out is deprecated and hidden");

            Option? threads = visible.FirstOrDefault(o => o.Name == "--threads");
            Assert.Equal(threaded.Contains(command.Name), threads is not null);
            if (threads is not null)
            {
                Assert.Equal(["-j"], threads.Aliases);
                Assert.True(threads.HasDefaultValue, command.Name);
                object? value = threads.GetDefaultValue();
                Assert.Equal(Environment.ProcessorCount.ToString(System.Globalization.CultureInfo.InvariantCulture), Convert.ToString(value, System.Globalization.CultureInfo.InvariantCulture));
            }

            // Frame inputs are --frames everywhere (detect's positional FRAMES is hidden and deprecated).
            Assert.DoesNotContain(visible, o => o.Name != "--frames" && o.Name.Contains("frame", StringComparison.Ordinal) && o.Name is not ("--max-frames"));
            Assert.All(command.Arguments, a => Assert.True(!a.Name.Contains("FRAMES", StringComparison.Ordinal) || a.Hidden));

            // Defaults are stated once: by the help's [default: ...], not again in the description.
            foreach (Option o in visible.Where(o => o.HasDefaultValue))
            {
                // (--config lists the preset names, one of which is called "default".)
                string description = (o.Description ?? string.Empty).Replace("(default, ", "(", StringComparison.Ordinal);
                Assert.False(description.Contains("default", StringComparison.OrdinalIgnoreCase), command.Name + " " + o.Name + ": " + description);
            }
        }
    }

    // Source: docs/cli.md (shared vocabulary): an option name used by several commands means one thing: the same
    // short alias, the same value type and the same default on every command that has it.
    [Fact]
    public void EverySharedOptionName_HasOneAliasTypeAndDefault()
    {
        (List<string> problems, int shared) = Mismatches(Commands());

        // Settled on 2026-12-05 (docs/cli.md "Shared vocabulary"): audit/merge --overlays N became --overlay-count N,
        // score --seed became --bootstrap-seed, render's --size lost its parser default, bench's -j became one count
        // (--thread-counts for several) and its --max-frames an optional count. The old spellings are hidden.
        Assert.True(problems.Count == 0, string.Join("\n", problems));
        Assert.True(shared >= 10, "expected the shared options (--threads, --frames, --output, --truth, ...) on several commands; found " + shared);
    }

    // The check above can fail: the mismatches it settled, rebuilt on two small commands, are each reported.
    [Fact]
    public void SharedOptionCheck_ReportsAReappearingMismatch()
    {
        Command a = new("a") { new Option<ulong>("--seed") { DefaultValueFactory = _ => 0UL }, new Option<int>("--overlays") { DefaultValueFactory = _ => 0 }, new Option<int>("--threads", "-j") };
        Command b = new("b") { new Option<ulong>("--seed") { DefaultValueFactory = _ => 1UL }, new Option<string>("--overlays"), new Option<int>("--threads"), new Option<ulong>("--hidden") { Hidden = true } };
        (List<string> problems, int shared) = Mismatches([a, b]);
        Assert.Equal(3, shared);
        Assert.Equal(
        [
            "--seed: default '0' on a, '1' on b",
            "--overlays: Int32 on a, String on b",
            "--overlays: default '0' on a, '' on b",
            "--threads: aliases '-j' on a, '' on b",
        ], problems);
    }

    private static (List<string> Problems, int Shared) Mismatches(IEnumerable<Command> commands)
    {
        var seen = new Dictionary<string, (string Command, string Aliases, Type Type, string? Default)>(StringComparer.Ordinal);
        var problems = new List<string>();
        int shared = 0;
        foreach (Command command in commands)
        {
            foreach (Option o in command.Options.Where(o => !o.Hidden && o.Name.StartsWith("--", StringComparison.Ordinal) && o.Name is not ("--help" or "--config")))
            {
                string aliases = string.Join(",", o.Aliases.Order(StringComparer.Ordinal));
                Type type = o.ValueType.IsArray ? o.ValueType.GetElementType()! : o.ValueType; // one or several of the same thing
                string? value = o.HasDefaultValue && !o.ValueType.IsArray ? Convert.ToString(o.GetDefaultValue(), System.Globalization.CultureInfo.InvariantCulture) : null;
                if (seen.TryGetValue(o.Name, out var first))
                {
                    shared++;
                    if (first.Aliases != aliases)
                    {
                        problems.Add($"{o.Name}: aliases '{first.Aliases}' on {first.Command}, '{aliases}' on {command.Name}");
                    }

                    if (first.Type != type)
                    {
                        problems.Add($"{o.Name}: {first.Type.Name} on {first.Command}, {type.Name} on {command.Name}");
                    }

                    if (first.Default != value)
                    {
                        problems.Add($"{o.Name}: default '{first.Default}' on {first.Command}, '{value}' on {command.Name}");
                    }
                }
                else
                {
                    seen[o.Name] = (command.Name, aliases, type, value);
                }
            }
        }

        return (problems, shared);
    }

    [Fact]
    public void DeprecatedOut_StillWorks_WithANote()
    {
        string truth = Truth(), copy = dir.File("copy.lanes.jsonl");
        (int exit, _, string err) = CliRunner.Run("convert", truth, "--out", copy);
        Assert.Equal(0, exit);
        Assert.Contains("note: --out is deprecated; use -o/--output; it will be removed in the next release", err, StringComparison.Ordinal);
        Assert.Equal(File.ReadAllText(truth), File.ReadAllText(copy));
        Assert.Equal(2, CliRunner.Run("convert", truth, "--out", copy, "-o", copy).Exit);
        Assert.Equal(2, CliRunner.Run("convert", truth).Exit); // the output is still required
    }

    // Source: docs/cli.md ("Deprecated spellings"): each old spelling gives the same result as the new one, prints one
    // deprecation line on stderr, and giving both is a usage error.
    [Fact]
    public void ScoreDeprecatedSeed_GivesTheSameResult_WithOneLine()
    {
        string truth = Truth(), pred = dir.File("pred.lanes.jsonl");
        Lanes.WriteFile(pred, [Lanes.Truth("s/000001.png", 640, 360, Lanes.Of((104, 359), (300, 180))), Lanes.Truth("s/000002.png", 640, 360, Lanes.Of((110, 359), (305, 180)), Lanes.Of((500, 359), (360, 180)))]);
        string[] common = ["score", "--truth", truth, "--pred", pred, "--bootstrap", "40", "--bootstrap-unit", "frame"];
        (int exit, _, string err) = CliRunner.Run([.. common, "--bootstrap-seed", "5", "--json", dir.File("new.json")]);
        Assert.True(exit == 0, err);
        Assert.DoesNotContain("deprecated", err, StringComparison.Ordinal);
        (exit, _, err) = CliRunner.Run([.. common, "--seed", "5", "--json", dir.File("old.json")]);
        Assert.True(exit == 0, err);
        Assert.Equal(1, err.Split('\n').Count(l => l.Contains("deprecated", StringComparison.Ordinal)));
        Assert.Contains("note: --seed N is deprecated; use --bootstrap-seed N; it will be removed in the next release", err, StringComparison.Ordinal);
        Assert.Equal(WithoutPaths(dir.File("new.json")), WithoutPaths(dir.File("old.json")));

        // A settings file with the old key works the same way.
        string yaml = dir.File("score.yaml");
        File.WriteAllText(yaml, "seed: 5\n");
        (exit, _, err) = CliRunner.Run([.. common, "--config", yaml, "--json", dir.File("file.json")]);
        Assert.True(exit == 0, err);
        Assert.Contains("note: --seed N is deprecated", err, StringComparison.Ordinal);
        Assert.Equal(WithoutPaths(dir.File("new.json")), WithoutPaths(dir.File("file.json")));

        // A different seed gives different intervals (the seed is used), and both spellings at once is a usage error.
        Assert.Equal(0, CliRunner.Run([.. common, "--bootstrap-seed", "6", "--json", dir.File("six.json")]).Exit);
        Assert.NotEqual(WithoutPaths(dir.File("new.json")), WithoutPaths(dir.File("six.json")));
        Assert.Equal(2, CliRunner.Run([.. common, "--seed", "5", "--bootstrap-seed", "5"]).Exit);
    }

    [Theory]
    [InlineData("audit")]
    [InlineData("merge")]
    public void DeprecatedOverlays_GivesTheSameResult_WithOneLine(string command)
    {
        string truth = Truth(), pred = dir.File("pred.lanes.jsonl");
        // Crossing lanes in frame 1 give findings, so an overlay is drawn.
        Lanes.WriteFile(pred, [Lanes.Truth("s/000001.png", 640, 360, Lanes.Of((100, 359), (540, 180)), Lanes.Of((540, 359), (100, 180))), Lanes.Truth("s/000002.png", 640, 360, Lanes.Of((110, 359), (305, 180)))]);
        string state = dir.File("a.state");
        if (command == "merge")
        {
            Assert.Equal(0, CliRunner.Run("audit", "--pred", pred, "--baseline", truth, "--shard", "0/1", "--partial", state, "-j", "1").Exit);
        }

        string[] Args(string name, string option) => command == "audit"
            ? ["audit", "--pred", pred, "--baseline", truth, "-j", "1", "-o", dir.File(name + ".jsonl"), option, "1"]
            : ["merge", state, "-o", dir.File(name + ".jsonl"), option, "1"];
        (int exit, _, string err) = CliRunner.Run(Args("new", "--overlay-count"));
        Assert.True(exit == 0, err);
        Assert.DoesNotContain("deprecated", err, StringComparison.Ordinal);
        (exit, _, err) = CliRunner.Run(Args("old", "--overlays"));
        Assert.True(exit == 0, err);
        Assert.Equal(1, err.Split('\n').Count(l => l.Contains("deprecated", StringComparison.Ordinal)));
        Assert.Contains("note: --overlays N is deprecated; use --overlay-count N; it will be removed in the next release", err, StringComparison.Ordinal);
        Assert.Equal(File.ReadAllText(dir.File("new.jsonl")), File.ReadAllText(dir.File("old.jsonl")));
        string[] drawn = [.. Directory.GetFiles(dir.File("new.overlays")).Select(Path.GetFileName).Order(StringComparer.Ordinal)!];
        Assert.Single(drawn);
        Assert.Equal(drawn, Directory.GetFiles(dir.File("old.overlays")).Select(Path.GetFileName).Order(StringComparer.Ordinal));
        Assert.Equal(File.ReadAllBytes(Path.Combine(dir.File("new.overlays"), drawn[0])), File.ReadAllBytes(Path.Combine(dir.File("old.overlays"), drawn[0])));
        Assert.Equal(2, CliRunner.Run([.. Args("both", "--overlays"), "--overlay-count", "1"]).Exit);
    }

    [Fact]
    public void BenchDeprecatedThreadList_MeasuresTheSameCounts_WithOneLine()
    {
        string[] common = ["bench", "--render", "1", "--size", "128x64", "--warmup", "0", "--passes", "1"];
        (int exit, _, string err) = CliRunner.Run([.. common, "--thread-counts", "1,2", "--json", dir.File("new.json")]);
        Assert.True(exit == 0, err);
        Assert.DoesNotContain("deprecated", err, StringComparison.Ordinal);
        (exit, _, err) = CliRunner.Run([.. common, "-j", "1,2", "--json", dir.File("old.json")]);
        Assert.True(exit == 0, err);
        Assert.Contains("note: -j 1,2 is deprecated; use --thread-counts 1,2; it will be removed in the next release", err, StringComparison.Ordinal);
        (exit, _, err) = CliRunner.Run([.. common, "--threads", "2,1", "--json", dir.File("old-long.json")]);
        Assert.True(exit == 0, err);
        Assert.Contains("note: --threads 2,1 is deprecated; use --thread-counts 2,1; it will be removed in the next release", err, StringComparison.Ordinal);
        Assert.Equal([1, 2], Workers(dir.File("new.json")));
        Assert.Equal([1, 2], Workers(dir.File("old.json")));
        Assert.Equal([2, 1], Workers(dir.File("old-long.json")));

        // One count with -j, the number of cores without it; -j with --thread-counts is a usage error.
        Assert.Equal(0, CliRunner.Run([.. common, "-j", "1", "--json", dir.File("one.json")]).Exit);
        Assert.Equal([1], Workers(dir.File("one.json")));
        Assert.Equal(0, CliRunner.Run([.. common, "--json", dir.File("cores.json")]).Exit);
        Assert.Equal([Environment.ProcessorCount], Workers(dir.File("cores.json")));
        Assert.Equal(2, CliRunner.Run([.. common, "-j", "1", "--thread-counts", "1,2"]).Exit);

        static int[] Workers(string path)
        {
            using JsonDocument doc = JsonDocument.Parse(File.ReadAllText(path));
            return [.. doc.RootElement.GetProperty("runs").EnumerateArray().Select(r => r.GetProperty("workers").GetInt32())];
        }
    }

    // The score JSON with its settings' output paths removed (they name the file written).
    private static string WithoutPaths(string path)
    {
        using JsonDocument doc = JsonDocument.Parse(File.ReadAllText(path));
        return string.Join("\n", doc.RootElement.EnumerateObject().Where(p => p.Name is not ("settings" or "timing")).Select(p => p.Name + "=" + p.Value.GetRawText()));
    }

    [Fact]
    public void RenamedOptions_OldSpellingsGiveTheSameResult_WithANote_AndBothIsAUsageError()
    {
        string truth = Truth(), pred = dir.File("pred.lanes.jsonl");
        Lanes.WriteFile(pred, [Lanes.Truth("s/000001.png", 640, 360, Lanes.Of((104, 359), (302, 180))), Lanes.Truth("s/000002.png", 640, 360, Lanes.Of((300, 359), (320, 180)))]);

        // score --seed -> --bootstrap-seed: the same intervals from the same seed.
        string a = dir.File("a.json"), b = dir.File("b.json");
        (int exit, _, string err) = CliRunner.Run("score", "--truth", truth, "--pred", pred, "--bootstrap", "200", "--bootstrap-seed", "7", "--json", a);
        Assert.True(exit == 0, err);
        Assert.DoesNotContain("deprecated", err, StringComparison.Ordinal);
        (exit, _, err) = CliRunner.Run("score", "--truth", truth, "--pred", pred, "--bootstrap", "200", "--seed", "7", "--json", b);
        Assert.True(exit == 0, err);
        Assert.Contains("note: --seed N is deprecated; use --bootstrap-seed N; it will be removed in the next release", err, StringComparison.Ordinal);
        Assert.Equal(File.ReadAllText(a), File.ReadAllText(b));
        (exit, _, err) = CliRunner.Run("score", "--truth", truth, "--pred", pred, "--seed", "7", "--bootstrap-seed", "7");
        Assert.Equal(2, exit);
        Assert.Contains("give --bootstrap-seed once (--seed is its deprecated spelling)", err, StringComparison.Ordinal);

        // audit --overlays N -> --overlay-count N: the same overlays.
        string f1 = dir.File("f1.jsonl"), f2 = dir.File("f2.jsonl");
        (exit, _, err) = CliRunner.Run("audit", "--pred", pred, "--baseline", truth, "-o", f1, "--overlay-count", "2");
        Assert.True(exit == 0, err);
        (exit, _, err) = CliRunner.Run("audit", "--pred", pred, "--baseline", truth, "-o", f2, "--overlays", "2");
        Assert.True(exit == 0, err);
        Assert.Contains("note: --overlays N is deprecated; use --overlay-count N; it will be removed in the next release", err, StringComparison.Ordinal);
        Assert.Equal(File.ReadAllText(f1), File.ReadAllText(f2));
        string[] drawn = [.. Directory.GetFiles(dir.File("f1.overlays")).Select(Path.GetFileName)!];
        Assert.NotEmpty(drawn);
        Assert.Equal(drawn, Directory.GetFiles(dir.File("f2.overlays")).Select(Path.GetFileName));

        // A settings file may still use the old key (with the same note).
        string yaml = dir.File("s.yaml");
        File.WriteAllText(yaml, "seed: 7\nbootstrap: 200\n");
        string c = dir.File("c.json");
        (exit, _, err) = CliRunner.Run("score", "--truth", truth, "--pred", pred, "--config", yaml, "--json", c);
        Assert.True(exit == 0, err);
        Assert.Contains("note: --seed N is deprecated", err, StringComparison.Ordinal);
        Assert.Equal(File.ReadAllText(a), File.ReadAllText(c));
    }

    [Fact]
    public void DetectPositionalFrames_StillWorks_WithANote_AndGivingBothIsAUsageError()
    {
        string frames = dir.File("frames");
        Directory.CreateDirectory(frames);
        using (Mat m = new LaneBaseline.Vision.Tests.Pipeline.SyntheticRoad { Width = 320, Height = 180, Seed = 3 }.Render())
        {
            Cv2.ImWrite(Path.Combine(frames, "a.png"), m);
        }

        (int exit, _, string err) = CliRunner.Run("detect", frames, "-o", dir.File("a.lanes.jsonl"), "-j", "1");
        Assert.Equal(0, exit);
        Assert.Contains("note: the positional FRAMES is deprecated; use --frames FRAMES; it will be removed in the next release", err, StringComparison.Ordinal);
        (exit, _, err) = CliRunner.Run("detect", "--frames", frames, "-o", dir.File("b.lanes.jsonl"), "-j", "1");
        Assert.Equal(0, exit);
        Assert.DoesNotContain("deprecated", err, StringComparison.Ordinal);
        Assert.Equal(File.ReadAllText(dir.File("a.lanes.jsonl")), File.ReadAllText(dir.File("b.lanes.jsonl")));
        Assert.Equal(2, CliRunner.Run("detect", frames, "--frames", frames, "-o", dir.File("c.lanes.jsonl")).Exit);
        Assert.Equal(2, CliRunner.Run("detect", "-o", dir.File("c.lanes.jsonl")).Exit);
    }

    // Source: docs/cli.md: '-' is standard output; the JSON alone is on stdout, the table moves to stderr.
    [Fact]
    public void Score_PredFromStdin_JsonToStdout_KeepsStdoutPureJson()
    {
        string truth = Truth();
        (int exit, string stdout, string stderr) = RunWithInput(File.ReadAllText(truth), "score", "--truth", truth, "--pred", "-", "--json", "-", "--bootstrap", "0");
        Assert.Equal(0, exit);
        using JsonDocument doc = JsonDocument.Parse(stdout);
        // Prediction = truth: F1 1 at IoU 0.50 (3 lanes, all matched).
        Assert.Equal(3, doc.RootElement.GetProperty("iou_f1").GetProperty("thresholds").GetProperty("0.50").GetProperty("tp").GetInt32());
        Assert.Contains("F1@.50", stderr, StringComparison.Ordinal);

        // The same run from files gives the same results; the settings name standard input '-'.
        string json = dir.File("s.json");
        Assert.Equal(0, CliRunner.Run("score", "--truth", truth, "--pred", "stdin=" + truth, "--json", json, "--bootstrap", "0").Exit);
        using JsonDocument fromFile = JsonDocument.Parse(File.ReadAllText(json));
        foreach (string key in new[] { "iou_f1", "point_accuracy", "by_tag" })
        {
            Assert.Equal(fromFile.RootElement.GetProperty(key).GetRawText(), doc.RootElement.GetProperty(key).GetRawText());
        }

        Assert.DoesNotContain("lanebaseline-stdin-", stdout, StringComparison.Ordinal);
    }

    [Fact]
    public void Stdin_BadInput_IsNamedDash_AndExitsThree()
    {
        string truth = Truth();
        (int exit, _, string err) = RunWithInput("{\"frame\": 3}\n", "score", "--truth", truth, "--pred", "-");
        Assert.Equal(3, exit);
        Assert.StartsWith("error: -:1:", err, StringComparison.Ordinal);
        Assert.DoesNotContain("lanebaseline-stdin-", err, StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("score", "--truth", "-", "--pred", "-")]
    [InlineData("score", "--truth", "T", "--pred", "P", "--json", "-", "--csv", "-")]
    [InlineData("audit", "--pred", "-", "--baseline", "-", "-o", "x.jsonl")]
    public void TwoDashes_AreAUsageError(params string[] args)
    {
        (int exit, _, string err) = RunWithInput(string.Empty, args);
        Assert.Equal(2, exit);
        Assert.Contains("only one", err, StringComparison.Ordinal);
    }

    [Fact]
    public void Convert_StdinToStdout_IsAFilter()
    {
        string truth = Truth();
        (int exit, string stdout, string stderr) = RunWithInput(File.ReadAllText(truth), "convert", "-", "-o", "-");
        Assert.Equal(0, exit);
        Assert.Equal(File.ReadAllText(truth), stdout);
        Assert.Contains("convert: 2 frames, 3 lanes -> standard output", stderr, StringComparison.Ordinal);
    }

    [Fact]
    public void Audit_PredFromStdin_FindingsToStdout()
    {
        string truth = Truth(), file = dir.File("f.jsonl");
        (int exit, string stdout, _) = RunWithInput(File.ReadAllText(truth), "audit", "--pred", "-", "-o", "-", "-j", "1");
        Assert.Equal(0, exit);
        Assert.Equal(0, CliRunner.Run("audit", "--pred", truth, "-o", file, "-j", "1").Exit);
        Assert.Equal(File.ReadAllText(file), stdout);
    }

    [Fact]
    public void Detect_ToStdout_StreamsRecords_AndWritesNothingElse()
    {
        string frames = dir.File("frames");
        Directory.CreateDirectory(frames);
        for (int i = 0; i < 2; i++)
        {
            using Mat m = new LaneBaseline.Vision.Tests.Pipeline.SyntheticRoad { Width = 320, Height = 180, Seed = (ulong)i + 1 }.Render();
            Cv2.ImWrite(Path.Combine(frames, $"f{i}.png"), m);
        }

        (int exit, string stdout, string stderr) = CliRunner.Run("detect", "--frames", frames, "-o", "-", "-j", "1");
        Assert.Equal(0, exit);
        string[] lines = stdout.Split('\n', StringSplitOptions.RemoveEmptyEntries);
        Assert.Equal(2, lines.Length);
        Assert.All(lines, l => Assert.StartsWith("{\"frame\":\"f", l, StringComparison.Ordinal));
        Assert.Contains("2 frames written to standard output", stderr, StringComparison.Ordinal);
        Assert.Equal(["frames"], Directory.GetFileSystemEntries(dir.Path).Select(Path.GetFileName).Where(n => n != "truth.lanes.jsonl"));
    }

    [Fact]
    public void MissingOutputFolder_IsCreated()
    {
        string truth = Truth(), json = dir.File(Path.Combine("new", "deeper", "s.json"));
        Assert.Equal(0, CliRunner.Run("score", "--truth", truth, "--pred", truth, "--json", json, "--bootstrap", "0").Exit);
        Assert.True(File.Exists(json));
    }

    // Source: issue "outputs that never clobber" (missing output folders are created in every command). Before, detect
    // exited 3 and tune exited 2 when the output's folder did not exist.
    [Theory]
    [InlineData("detect")]
    [InlineData("audit")]
    [InlineData("tune")]
    [InlineData("convert")]
    [InlineData("render")]
    [InlineData("report")]
    [InlineData("merge")]
    [InlineData("bench")]
    public void MissingOutputFolder_IsCreated_InEveryCommand(string command)
    {
        string render = dir.File("r");
        Assert.Equal(0, CliRunner.Run("render", "-o", render, "--count", "2", "--size", "160x96", "--seed", "4", "-j", "1").Exit);
        string truth = Path.Combine(render, "truth.lanes.jsonl"), scoreJson = dir.File("s.json");
        Assert.Equal(0, CliRunner.Run("score", "--truth", truth, "--pred", truth, "--json", scoreJson, "--bootstrap", "0").Exit);
        string output = dir.File(Path.Combine("new", "deeper", command switch
        {
            "detect" or "merge" => "x.lanes.jsonl",
            "audit" => "findings.jsonl",
            "tune" => "best.yaml",
            "convert" => "x.openlabel.json",
            "render" => "frames",
            "report" => "report.html",
            _ => "bench.json",
        }));
        string[] args = command switch
        {
            "detect" => ["detect", "--frames", render, "-o", output, "-j", "1"],
            "audit" => ["audit", "--pred", truth, "-o", output],
            "tune" => ["tune", "--frames", render, "--truth", truth, "--budget", "2", "--holdout", "0", "--allow-overlap", "-j", "1", "-o", output],
            "convert" => ["convert", truth, "--to", "openlabel", "-o", output],
            "render" => ["render", "-o", output, "--count", "1", "--size", "160x96", "-j", "1"],
            "report" => ["report", "--score", scoreJson, "-o", output],
            "merge" => ["merge", truth, "-o", output],
            _ => ["bench", "--render", "1", "--size", "128x64", "--warmup", "0", "--passes", "1", "-j", "1", "--json", output],
        };
        (int exit, _, string err) = CliRunner.Run(args);
        Assert.True(exit == 0, command + ": " + err);
        Assert.True(command == "render" ? Directory.Exists(output) : File.Exists(output), command + ": " + output);
    }

    // Source: issue 16 ("lanebaseline --version prints the version and the commit"); the commit is one of this
    // repository's commits when the build ran in a git checkout (Source Link), else "unknown".
    [Fact]
    public void Version_PrintsTheVersionAndTheCommit()
    {
        (int exit, string stdout, string err) = CliRunner.Run("--version");
        Assert.True(exit == 0, err);
        System.Text.RegularExpressions.Match m = System.Text.RegularExpressions.Regex.Match(
            stdout.Trim(), "^lanebaseline ([0-9]+\\.[0-9]+\\.[0-9]+[-.0-9A-Za-z]*) \\(commit ([0-9a-f]{40}|unknown)\\)$");
        Assert.True(m.Success, stdout);
        string commit = m.Groups[2].Value;
        if (commit != "unknown")
        {
            var start = new System.Diagnostics.ProcessStartInfo("git", ["-C", RepoPaths.Combine("."), "cat-file", "-e", commit + "^{commit}"]) { RedirectStandardError = true };
            using var git = System.Diagnostics.Process.Start(start)!;
            git.WaitForExit();
            Assert.True(git.ExitCode == 0, "not a commit of this repository: " + commit);
        }
    }

    // Source: issue "outputs that never clobber": an existing output that is a FIFO is written in place, never renamed over.
    [Fact]
    public async Task Fifo_Output_IsWrittenInPlace()
    {
        if (!OperatingSystem.IsLinux())
        {
            return;
        }

        string truth = Truth(), fifo = dir.File("pipe.json");
        using (var mk = System.Diagnostics.Process.Start("mkfifo", [fifo]))
        {
            mk.WaitForExit();
            Assert.Equal(0, mk.ExitCode);
        }

        var reader = Task.Run(() => File.ReadAllText(fifo));
        Assert.Equal(0, CliRunner.Run("score", "--truth", truth, "--pred", truth, "--json", fifo, "--bootstrap", "0").Exit);
        using JsonDocument doc = JsonDocument.Parse(await reader.WaitAsync(TimeSpan.FromSeconds(60)));
        Assert.Equal(2, doc.RootElement.GetProperty("frames").GetInt32());
        using var check = System.Diagnostics.Process.Start("test", ["-p", fifo])!;
        check.WaitForExit();
        Assert.Equal(0, check.ExitCode); // still a FIFO
    }

    [Fact]
    public void Typo_SuggestsTheCommand()
    {
        (int exit, _, string err) = CliRunner.Run("scor");
        Assert.Equal(2, exit);
        Assert.Contains("Did you mean", err, StringComparison.Ordinal);
        Assert.Contains("\nscore", err.Replace("\r", string.Empty, StringComparison.Ordinal), StringComparison.Ordinal);
    }

    [Fact]
    public void Help_EndsWithExamplesThatParse_AndTheCautionAppearsOnceInTheRootHelp()
    {
        (int exit, string rootHelp, _) = CliRunner.Run("--help");
        Assert.Equal(0, exit);
        Assert.Equal(1, Count(rootHelp, Core.SafetyNotice.Text));
        foreach (Command command in Commands())
        {
            (int e, string help, _) = CliRunner.Run(command.Name, "--help");
            Assert.Equal(0, e);
            Assert.Equal(0, Count(help, Core.SafetyNotice.Text));
            string tail = help[help.LastIndexOf("Examples:", StringComparison.Ordinal)..];
            string[] examples = [.. tail.Split('\n').Skip(1).Select(l => l.Trim()).Where(l => l.Length > 0)];
            Assert.InRange(examples.Length, 1, 3);
            foreach (string example in examples)
            {
                // Every part of a pipeline is a command of this tool that parses without errors.
                foreach (string part in example.Split(" | "))
                {
                    string[] words = part.Split(" > ")[0].Split(' ', StringSplitOptions.RemoveEmptyEntries); // without a shell redirection
                    if (words[0] != "lanebaseline")
                    {
                        continue;
                    }

                    ParseResult parse = Program.CreateRoot().Parse(words[1..]);
                    Assert.True(parse.Errors.Count == 0, example + ": " + string.Join("; ", parse.Errors.Select(x => x.Message)));
                }
            }
        }

        static int Count(string text, string part)
        {
            int n = 0;
            for (int i = text.IndexOf(part, StringComparison.Ordinal); i >= 0; i = text.IndexOf(part, i + 1, StringComparison.Ordinal))
            {
                n++;
            }

            return n;
        }
    }
}
