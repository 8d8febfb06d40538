using System.Text.Json;
using Json.Schema;
using LaneBaseline.Testing;
using Xunit;

namespace LaneBaseline.Cli.Tests.Docs;

/// <summary>
/// The lane-file JSON Schema (docs/schema/lane-record.schema.json, described in docs/lane-file.md) checked by an
/// independent, general-purpose validator (JsonSchema.Net, JSON Schema draft 2020-12) against the bundled truth and
/// the real output of every lane-file writer.
/// </summary>
public sealed class LaneFileSchemaTests : IDisposable
{
    private readonly TempDir dir = new();
    // One instance per process: the validator keeps a global registry of schemas by their $id.
    private static readonly JsonSchema Schema = JsonSchema.FromText(File.ReadAllText(RepoPaths.Combine("docs", "schema", "lane-record.schema.json")));

    public void Dispose() => dir.Dispose();

    [Fact]
    public void SampleTruth_IsValid()
    {
        Assert.Equal(44, AssertAllValid(RepoPaths.Combine("sample-frames", "truth.lanes.jsonl")));
    }

    [Fact]
    public void WritersOutput_IsValid()
    {
        // render: truth with sizes, tags, slots and kinds
        string rendered = dir.File("r");
        Assert.Equal(0, CliRunner.Run("render", "--out", rendered, "--seed", "5", "--count", "2", "--sequence-length", "2", "--size", "640x360").Exit);
        string truth = Path.Combine(rendered, "truth.lanes.jsonl");
        Assert.Equal(4, AssertAllValid(truth));

        // detect: predictions with scores and the extra config key
        string pred = dir.File("p.lanes.jsonl");
        Assert.Equal(0, CliRunner.Run("detect", rendered, "-o", pred, "--threads", "1").Exit);
        Assert.Equal(4, AssertAllValid(pred));

        // convert: through OpenLABEL and masks and back to lane files
        string ol = dir.File("t.json"), back = dir.File("back.lanes.jsonl"), masks = dir.File("m"), back2 = dir.File("back2.lanes.jsonl");
        Assert.Equal(0, CliRunner.Run("convert", truth, "-o", ol).Exit);
        Assert.Equal(0, CliRunner.Run("convert", ol, "-o", back).Exit);
        Assert.Equal(4, AssertAllValid(back));
        Assert.Equal(0, CliRunner.Run("convert", truth, "-o", masks).Exit);
        Assert.Equal(0, CliRunner.Run("convert", masks, "--reference", truth, "-o", back2).Exit);
        Assert.Equal(4, AssertAllValid(back2));
    }

    [Theory]
    [InlineData("{\"lanes\":[]}")]                                                          // no frame
    [InlineData("{\"frame\":\"a.png\"}")]                                                   // no lanes
    [InlineData("{\"frame\":\"a.png\",\"lanes\":[{\"points\":[[1,2]]}]}")]                  // one point
    [InlineData("{\"frame\":\"a.png\",\"lanes\":[{\"points\":[[1,2],[3,4]],\"score\":1.5}]}")] // score above 1
    [InlineData("{\"frame\":\"a.png\",\"lanes\":[{\"points\":[[1,2],[3,4]],\"kind\":\"zigzag\"}]}")]
    [InlineData("{\"frame\":\"a.png\",\"width\":0,\"height\":5,\"lanes\":[]}")]
    public void Schema_RejectsWhatTheReaderRejects(string line)
    {
        // The same records are bad input for the reader (docs/lane-file.md, Errors): the schema must agree.
        Assert.False(Evaluate(line), line);
        string path = dir.File("bad.lanes.jsonl");
        File.WriteAllText(path, line + "\n");
        Assert.Equal(3, CliRunner.Run("convert", path, "-o", dir.File("out.json")).Exit);
    }

    private static int AssertAllValid(string path)
    {
        int n = 0;
        foreach (string line in File.ReadLines(path))
        {
            if (line.Length == 0)
            {
                continue;
            }

            Assert.True(Evaluate(line), path + ": record " + (n + 1) + " fails the schema");
            n++;
        }

        return n;
    }

    private static bool Evaluate(string line)
    {
        using JsonDocument doc = JsonDocument.Parse(line);
        return Schema.Evaluate(doc.RootElement, new EvaluationOptions { OutputFormat = OutputFormat.Flag }).IsValid;
    }
}
