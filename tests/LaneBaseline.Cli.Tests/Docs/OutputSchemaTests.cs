using System.Text.Json;
using Json.Schema;
using LaneBaseline.Testing;
using Xunit;

namespace LaneBaseline.Cli.Tests.Docs;

/// <summary>
/// The JSON Schemas of the command line's JSON outputs (docs/schema/*.schema.json) checked by an independent,
/// general-purpose validator (JsonSchema.Net, draft 2020-12) against real outputs of the commands, and every key of
/// those outputs checked for the one key style (snake_case).
/// </summary>
public sealed class OutputSchemaTests : IDisposable
{
    // One instance per process: the validator keeps a global registry of schemas by their $id.
    private static readonly JsonSchema Score = JsonSchema.FromText(File.ReadAllText(RepoPaths.Combine("docs", "schema", "score.schema.json")));
    private static readonly JsonSchema Bench = JsonSchema.FromText(File.ReadAllText(RepoPaths.Combine("docs", "schema", "bench.schema.json")));
    private static readonly JsonSchema Camera = JsonSchema.FromText(File.ReadAllText(RepoPaths.Combine("docs", "schema", "camera.schema.json")));
    private static readonly JsonSchema TuneLog = JsonSchema.FromText(File.ReadAllText(RepoPaths.Combine("docs", "schema", "tune-log.schema.json")));
    private static readonly JsonSchema AuditSummary = JsonSchema.FromText(File.ReadAllText(RepoPaths.Combine("docs", "schema", "audit-summary.schema.json")));
    private static readonly JsonSchema AuditFindings = JsonSchema.FromText(File.ReadAllText(RepoPaths.Combine("docs", "schema", "audit-findings.schema.json")));
    private static readonly JsonSchema AuditState = JsonSchema.FromText(File.ReadAllText(RepoPaths.Combine("docs", "schema", "audit-state.schema.json")));
    private static readonly JsonSchema ScoreState = JsonSchema.FromText(File.ReadAllText(RepoPaths.Combine("docs", "schema", "score-state.schema.json")));
    private static readonly JsonSchema OpenLabelOutput = JsonSchema.FromText(File.ReadAllText(RepoPaths.Combine("docs", "schema", "openlabel.schema.json")));
    private readonly TempDir dir = new();

    public void Dispose() => dir.Dispose();

    [Fact]
    public void ScoreJson_OneSystem_AndSeveral_FollowTheSchema_WithTheSameSystemObject()
    {
        string truth = RepoPaths.Combine("sample-frames", "truth.lanes.jsonl"), one = dir.File("one.json"), two = dir.File("two.json");
        string shifted = dir.File("shifted.lanes.jsonl");
        File.WriteAllLines(shifted, File.ReadLines(truth).Take(10));
        Assert.Equal(0, CliRunner.Run("score", "--truth", truth, "--pred", "base=" + truth, "--json", one, "--bootstrap", "50", "-j", "1").Exit);
        Assert.Equal(0, CliRunner.Run("score", "--truth", truth, "--pred", "base=" + truth, "--pred", "part=" + shifted, "--json", two, "--bootstrap", "50", "-j", "1").Exit);
        using JsonDocument a = Valid(Score, one), b = Valid(Score, two);

        // One layout whatever the number of systems: systems.NAME holds the same object in both files, and with one
        // system the top level repeats it (the keys of docs/metrics.md stay where they were).
        JsonElement baseOne = a.RootElement.GetProperty("systems").GetProperty("base");
        Assert.Equal(Compact(baseOne), Compact(b.RootElement.GetProperty("systems").GetProperty("base")));
        foreach (string key in new[] { "frames", "truth_lanes", "pred_lanes", "iou_f1", "point_accuracy", "by_tag" })
        {
            Assert.Equal(Compact(baseOne.GetProperty(key)), Compact(a.RootElement.GetProperty(key)));
        }

        Assert.Equal("lanebaseline", a.RootElement.GetProperty("tool").GetString());
        Assert.Equal(1, a.RootElement.GetProperty("schema_version").GetInt32());

        // The schema can fail: a result without tp, or with a second system and no paired block.
        Assert.False(Evaluate(Score, a.RootElement.GetRawText().Replace("\"tp\"", "\"true_positives\"", StringComparison.Ordinal)));
        Assert.False(Evaluate(Score, b.RootElement.GetRawText().Replace("\"paired\"", "\"pairs_\"", StringComparison.Ordinal)));

        // Per-tag intervals and paired differences are checked too: only they require "units" and "ci95".
        Assert.Equal(2, baseOne.GetProperty("by_tag").GetProperty("night").GetProperty("intervals").GetProperty("mf1").GetArrayLength());
        Assert.Equal(2, b.RootElement.GetProperty("paired").GetProperty("base - part").GetProperty("by_tag").GetProperty("night").GetProperty("mf1").GetProperty("ci95").GetArrayLength());
        Assert.False(Evaluate(Score, a.RootElement.GetRawText().Replace("\"units\"", "\"unitz\"", StringComparison.Ordinal)));
        Assert.False(Evaluate(Score, b.RootElement.GetRawText().Replace("\"ci95\"", "\"ci_95\"", StringComparison.Ordinal)));
    }

    [Fact]
    public void BenchJson_FollowsTheSchema()
    {
        string json = dir.File("bench.json");
        Assert.Equal(0, CliRunner.Run("bench", "--render", "2", "--size", "128x96", "-j", "1", "--warmup", "0", "--passes", "1", "--json", json).Exit);
        using JsonDocument doc = Valid(Bench, json);
        Assert.False(Evaluate(Bench, doc.RootElement.GetRawText().Replace("\"frame_ms\"", "\"frameMs\"", StringComparison.Ordinal)));
    }

    // Issue 16: render's camera.json (version 2) follows docs/schema/camera.schema.json, keys in snake_case, and the
    // schema can fail (a version 1 key instead of its version 2 key).
    [Fact]
    public void CameraJson_FromRender_FollowsTheSchema()
    {
        string o = dir.File("r");
        Assert.Equal(0, CliRunner.Run("render", "-o", o, "--count", "1", "--sequence-length", "1", "--seed", "3").Exit);
        string cam = Path.Combine(o, "camera.json");
        using JsonDocument doc = Valid(Camera, cam);
        Assert.Equal("lanebaseline", doc.RootElement.GetProperty("tool").GetString());
        Assert.Equal(2, doc.RootElement.GetProperty("schema_version").GetInt32());
        Assert.False(Evaluate(Camera, doc.RootElement.GetRawText().Replace("\"mount_height_m\"", "\"mountHeightM\"", StringComparison.Ordinal)));
        Assert.False(Evaluate(Camera, doc.RootElement.GetRawText().Replace("\"ground_x_m\"", "\"groundXM\"", StringComparison.Ordinal)));
        Assert.Equal(Core.Geometry.CameraModel.Load(cam), Core.Geometry.CameraModel.Parse(File.ReadAllText(cam), "camera.json"));
    }

    // Issue 16: every line of audit's findings file follows docs/schema/audit-findings.schema.json (snake_case), and every
    // line of an audit shard state follows docs/schema/audit-state.schema.json (its header names the tool and the
    // schema version); both schemas can fail.
    [Fact]
    public void AuditFindingsAndState_FollowTheirSchemas()
    {
        string truth = RepoPaths.Combine("sample-frames", "truth.lanes.jsonl"), camera = RepoPaths.Combine("sample-frames", "camera.json");
        string pred = dir.File("pred.lanes.jsonl");
        // A prediction that trips image, temporal and ground rules: every lane of every other frame shifted 60 px.
        int n = 0;
        File.WriteAllLines(pred, File.ReadLines(truth).Select(line => n++ % 2 == 0 ? line : System.Text.RegularExpressions.Regex.Replace(line, @"\[(\d+(?:\.\d+)?),", m => "[" + (double.Parse(m.Groups[1].Value, System.Globalization.CultureInfo.InvariantCulture) + 60).ToString(System.Globalization.CultureInfo.InvariantCulture) + ",")));
        string findings = dir.File("f.jsonl"), state = dir.File("a0.state");
        (int exit, _, string err) = CliRunner.Run("audit", "--pred", pred, "--baseline", truth, "--camera", camera, "-o", findings);
        Assert.True(exit is 0 or 4, err);
        string[] lines = File.ReadAllLines(findings);
        Assert.True(lines.Length >= 10, "expected findings from the shifted lanes, got " + lines.Length);
        for (int i = 0; i < lines.Length; i++)
        {
            using JsonDocument line = ValidText(AuditFindings, lines[i], "findings line " + (i + 1));
            AssertSnakeCase(line.RootElement, "findings line " + (i + 1));
        }

        Assert.False(Evaluate(AuditFindings, lines[0].Replace("\"severity\":\"", "\"severity\":\"x", StringComparison.Ordinal)));
        Assert.False(Evaluate(AuditFindings, lines[0].Replace("\"rank\":", "\"Rank\":", StringComparison.Ordinal)));

        (exit, _, err) = CliRunner.Run("audit", "--pred", pred, "--baseline", truth, "--camera", camera, "--shard", "0/2", "--partial", state);
        Assert.True(exit == 0, err);
        string[] stateLines = File.ReadAllLines(state);
        Assert.Contains(stateLines, l => l.Contains("\"t\":\"finding\"", StringComparison.Ordinal));
        for (int i = 0; i < stateLines.Length; i++)
        {
            using JsonDocument line = ValidText(AuditState, stateLines[i], "state line " + (i + 1));
            if (i == 0)
            {
                Assert.Equal("lanebaseline", line.RootElement.GetProperty("tool").GetString());
                Assert.Equal(2, line.RootElement.GetProperty("schema_version").GetInt32());
                Assert.Equal(JsonValueKind.Object, line.RootElement.GetProperty("job").GetProperty("settings").GetProperty("camera").ValueKind);
            }
        }

        Assert.False(Evaluate(AuditState, stateLines[0].Replace("\"frames_per_second\"", "\"framesPerSecond\"", StringComparison.Ordinal)));
        Assert.False(Evaluate(AuditState, stateLines[0].Replace("\"schema_version\":2", "\"schema_version\":3", StringComparison.Ordinal)));
    }

    // Issue 16: convert's JSON output (ASAM OpenLABEL 1.0.0) follows docs/schema/openlabel.schema.json, keys in
    // snake_case, the producer named by metadata.annotator and the version by OpenLABEL's own metadata.schema_version
    // (the standard's root holds only "openlabel", so no root "tool"); the schema can fail (a camelCase key, a second
    // root key). Source: ASAM OpenLABEL 1.0.0 (root "openlabel", metadata.schema_version, poly2d name/val/mode/closed).
    [Fact]
    public void OpenLabelJson_FromConvert_FollowsTheSchema()
    {
        string lanes = dir.File("in.lanes.jsonl"), json = dir.File("out.json");
        File.WriteAllText(lanes, string.Join("\n",
            "{\"frame\":\"seq/000001.png\",\"width\":640,\"height\":360,\"tags\":[\"night\"],\"lanes\":[{\"points\":[[100,359],[300,180]],\"slot\":-1,\"score\":0.75,\"kind\":\"dashed\"},{\"points\":[[540,359],[340,180]]}]}",
            "{\"frame\":\"seq/000002.png\",\"width\":640,\"height\":360,\"lanes\":[]}") + "\n");
        (int exit, _, string err) = CliRunner.Run("convert", lanes, "--to", "openlabel", "-o", json);
        Assert.True(exit == 0, err);
        using JsonDocument doc = Valid(OpenLabelOutput, json);
        JsonElement metadata = doc.RootElement.GetProperty("openlabel").GetProperty("metadata");
        Assert.Equal("lanebaseline", metadata.GetProperty("annotator").GetString());
        Assert.Equal("1.0.0", metadata.GetProperty("schema_version").GetString());
        Assert.Equal(2, doc.RootElement.GetProperty("openlabel").GetProperty("objects").EnumerateObject().Count());
        string text = doc.RootElement.GetRawText();
        Assert.False(Evaluate(OpenLabelOutput, text.Replace("\"frame_properties\"", "\"frameProperties\"", StringComparison.Ordinal)));
        Assert.False(Evaluate(OpenLabelOutput, "{\"tool\":\"lanebaseline\"," + text[1..]));
    }

    // Issue 16: audit --summary-json follows docs/schema/audit-summary.schema.json (tool, schema_version, snake_case),
    // lists every rule of the catalogue, and the schema can fail (a camelCase key, an unknown severity).
    [Fact]
    public void AuditSummaryJson_FollowsTheSchema_AndListsEveryRule()
    {
        string truth = RepoPaths.Combine("sample-frames", "truth.lanes.jsonl"), findings = dir.File("f.jsonl"), summary = dir.File("s.json");
        (int exit, _, string err) = CliRunner.Run("audit", "--pred", truth, "-o", findings, "--summary-json", summary, "--stills");
        Assert.True(exit == 0, err);
        using JsonDocument doc = Valid(AuditSummary, summary);
        Assert.Equal("lanebaseline", doc.RootElement.GetProperty("tool").GetString());
        Assert.Equal(1, doc.RootElement.GetProperty("schema_version").GetInt32());
        Assert.True(doc.RootElement.GetProperty("stills").GetBoolean());
        Assert.Equal(
            Core.Audit.AuditRules.All.Select(r => r.Id),
            doc.RootElement.GetProperty("rules").EnumerateArray().Select(r => r.GetProperty("id").GetString()));
        string text = Compact(doc.RootElement);
        Assert.True(Evaluate(AuditSummary, text));
        Assert.False(Evaluate(AuditSummary, text.Replace("\"flagged_frames\"", "\"flaggedFrames\"", StringComparison.Ordinal)));
        Assert.False(Evaluate(AuditSummary, text.Replace("\"severity\":\"error\"", "\"severity\":\"fatal\"", StringComparison.Ordinal)));
    }

    // Issue 16: every line of tune's trial log follows docs/schema/tune-log.schema.json (the first names the tool and
    // the schema version), keys in snake_case except the preset keys under "values", and the schema can fail.
    [Fact]
    public void TuneTrialLog_EveryLineFollowsTheSchema()
    {
        string render = dir.File("r"), best = dir.File("best.yaml");
        Assert.Equal(0, CliRunner.Run("render", "-o", render, "--count", "3", "--size", "160x96", "--seed", "5", "-j", "1").Exit);
        (int exit, _, string err) = CliRunner.Run(
            "tune", "--frames", render, "--truth", Path.Combine(render, "truth.lanes.jsonl"), "--budget", "3", "--holdout", "0",
            "--allow-overlap", "--date", "2026-01-01", "-j", "1", "-o", best);
        Assert.True(exit == 0, err);
        string[] lines = File.ReadAllLines(best + ".trials.jsonl");
        Assert.Equal(4, lines.Length);
        using (JsonDocument header = ValidText(TuneLog, lines[0], best + ".trials.jsonl:1"))
        {
            Assert.Equal("lanebaseline", header.RootElement.GetProperty("tool").GetString());
            Assert.Equal(1, header.RootElement.GetProperty("schema_version").GetInt32());
        }

        for (int i = 1; i < lines.Length; i++)
        {
            ValidText(TuneLog, lines[i], best + ".trials.jsonl:" + (i + 1)).Dispose();
        }

        Assert.False(Evaluate(TuneLog, lines[0].Replace("\"tuning_frames\"", "\"tuningFrames\"", StringComparison.Ordinal)));
        Assert.False(Evaluate(TuneLog, lines[1].Replace("\"phase\":\"start\"", "\"phase\":\"begin\"", StringComparison.Ordinal)));
    }

    // Issue 16: a trial log written before the header carried tool and schema_version (the run object alone) is still
    // resumed: the resumed run reuses its trials and writes the same preset as an uninterrupted run.
    [Fact]
    public void TuneResume_ReadsALogWithTheOldHeader()
    {
        string render = dir.File("r"), one = dir.File("one.yaml"), two = dir.File("two.yaml");
        Assert.Equal(0, CliRunner.Run("render", "-o", render, "--count", "3", "--size", "160x96", "--seed", "5", "-j", "1").Exit);
        string[] tune = ["tune", "--frames", render, "--truth", Path.Combine(render, "truth.lanes.jsonl"), "--budget", "3", "--holdout", "0", "--allow-overlap", "--date", "2026-01-01", "-j", "1"];
        Assert.Equal(0, CliRunner.Run([.. tune, "-o", one]).Exit);
        string[] log = File.ReadAllLines(one + ".trials.jsonl");
        using (JsonDocument header = JsonDocument.Parse(log[0]))
        {
            string old = "{\"run\":" + header.RootElement.GetProperty("run").GetRawText() + "}";
            File.WriteAllLines(two + ".trials.jsonl", [old, log[1], log[2]]);
        }

        (int exit, _, string err) = CliRunner.Run([.. tune, "-o", two, "--resume"]);
        Assert.True(exit == 0, err);
        Assert.Equal(File.ReadAllText(one), File.ReadAllText(two));
        Assert.Equal(4, File.ReadAllLines(two + ".trials.jsonl").Length);
    }

    // Issue 16: every line of a partial score state follows docs/schema/score-state.schema.json (the header names the
    // tool and schema_version), and merge still reads a state written before, whose header says "version" and has no
    // tool: merging old and new states gives the same score JSON.
    [Fact]
    public void ScoreState_EveryLineFollowsTheSchema_AndOldHeadersStillMerge()
    {
        string truth = RepoPaths.Combine("sample-frames", "truth.lanes.jsonl");
        string s0 = dir.File("s0.state"), s1 = dir.File("s1.state"), old1 = dir.File("old1.state");
        foreach ((string shard, string state) in new[] { ("0/2", s0), ("1/2", s1) })
        {
            (int exit, _, string err) = CliRunner.Run("score", "--truth", truth, "--pred", "base=" + truth, "--shard", shard, "--partial", state, "--bootstrap", "20", "-j", "1");
            Assert.True(exit == 0, err);
        }

        string[] lines = File.ReadAllLines(s1);
        Assert.True(lines.Length > 1);
        using (JsonDocument header = ValidText(ScoreState, lines[0], s1 + ":1"))
        {
            Assert.Equal("lanebaseline", header.RootElement.GetProperty("tool").GetString());
            Assert.Equal(1, header.RootElement.GetProperty("schema_version").GetInt32());
        }

        for (int i = 1; i < lines.Length; i++)
        {
            Assert.True(Evaluate(ScoreState, lines[i]), s1 + ":" + (i + 1));
        }

        Assert.False(Evaluate(ScoreState, lines[0].Replace("\"truth_frames\"", "\"truthFrames\"", StringComparison.Ordinal)));

        string legacy = lines[0].Replace("\"tool\":\"lanebaseline\",", string.Empty, StringComparison.Ordinal)
            .Replace("\"schema_version\":1", "\"version\":1", StringComparison.Ordinal);
        Assert.NotEqual(lines[0], legacy);
        File.WriteAllLines(old1, [legacy, .. lines[1..]]);
        string a = dir.File("a.json"), b = dir.File("b.json");
        Assert.Equal(0, CliRunner.Run("merge", s0, s1, "-o", a).Exit);
        (int code, _, string why) = CliRunner.Run("merge", s0, old1, "-o", b);
        Assert.True(code == 0, why);
        Assert.Equal(File.ReadAllText(a), File.ReadAllText(b));
        Valid(Score, a).Dispose();
    }

    private static JsonDocument ValidText(JsonSchema schema, string text, string where)
    {
        EvaluationResults result = schema.Evaluate(JsonDocument.Parse(text).RootElement, new EvaluationOptions { OutputFormat = OutputFormat.List });
        Assert.True(result.IsValid, where + ": " + text);
        var doc = JsonDocument.Parse(text);
        AssertSnakeCase(doc.RootElement, "$");
        return doc;
    }

    private static JsonDocument Valid(JsonSchema schema, string path)
    {
        string text = File.ReadAllText(path);
        EvaluationResults result = schema.Evaluate(JsonDocument.Parse(text).RootElement, new EvaluationOptions { OutputFormat = OutputFormat.List });
        Assert.True(result.IsValid, path + ": " + string.Join("; ", (result.Details ?? []).Where(d => d.Errors is not null).SelectMany(d => d.Errors!.Select(e => d.InstanceLocation + ": " + e.Value))));
        var doc = JsonDocument.Parse(text);
        AssertSnakeCase(doc.RootElement, "$");
        return doc;
    }

    private static string Compact(JsonElement e) => JsonSerializer.Serialize(e);

    private static bool Evaluate(JsonSchema schema, string text) => schema.Evaluate(JsonDocument.Parse(text).RootElement).IsValid;

    // Source: issue "one key style": keys are lower case words joined by '_' (names chosen by the user, such as
    // system names, tags and thresholds, are data and are skipped).
    private static void AssertSnakeCase(JsonElement e, string where)
    {
        if (e.ValueKind == JsonValueKind.Array)
        {
            foreach (JsonElement item in e.EnumerateArray())
            {
                AssertSnakeCase(item, where + "[]");
            }
        }
        else if (e.ValueKind == JsonValueKind.Object)
        {
            bool userKeys = where.EndsWith(".systems", StringComparison.Ordinal) || where.EndsWith(".by_tag", StringComparison.Ordinal)
                || where.EndsWith(".paired", StringComparison.Ordinal) || where.EndsWith(".predictions", StringComparison.Ordinal)
                || where.EndsWith(".thresholds", StringComparison.Ordinal) || where == "$.values" || where.EndsWith("lateral_abs_error_m", StringComparison.Ordinal);
            foreach (JsonProperty p in e.EnumerateObject())
            {
                if (!userKeys)
                {
                    Assert.Matches("^[a-z0-9@.]+(_[a-z0-9@.]+)*$", p.Name);
                }

                AssertSnakeCase(p.Value, where + "." + p.Name);
            }
        }
    }
}
