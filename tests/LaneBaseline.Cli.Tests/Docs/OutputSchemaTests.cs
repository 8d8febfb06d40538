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
                || where.EndsWith(".thresholds", StringComparison.Ordinal) || where.EndsWith("lateral_abs_error_m", StringComparison.Ordinal);
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
