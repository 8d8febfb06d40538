using System.Text;
using System.Text.Json;
using System.Text.RegularExpressions;
using LaneBaseline.Core.Metrics;
using LaneBaseline.Core.Metrics.ConfidenceSweep;
using LaneBaseline.Core.Metrics.Coverage;
using LaneBaseline.Core.Metrics.Ground;
using LaneBaseline.Core.Metrics.IouF1;
using LaneBaseline.Core.Metrics.PointAccuracy;
using LaneBaseline.Core.Sharding;
using LaneBaseline.Testing;
using Xunit;

namespace LaneBaseline.Core.Tests.Metrics;

/// <summary>
/// The metric catalogue (DEVELOPERS.md, "Adding a metric"): every unit of <see cref="MetricCatalogue.Units"/> is
/// described in docs/metrics.md section 8 and has its folder under src/LaneBaseline.Core/Metrics, and the table and the
/// folders name no unit the catalogue lacks; every metric the score JSON and the shard state hold comes from a unit.
/// </summary>
public sealed partial class MetricCatalogueTests
{
    private static string[] UnitFolders() =>
        [.. Directory.GetDirectories(RepoPaths.Combine("src", "LaneBaseline.Core", "Metrics"))
            .Select(Path.GetFileName)
            .Where(n => n is not (null or "bin" or "obj"))
            .Select(n => n!)
            .Order(StringComparer.Ordinal)];

    private static string[] DocumentedUnits()
    {
        string doc = File.ReadAllText(RepoPaths.Combine("docs", "metrics.md"));
        int at = doc.IndexOf("## 8. Where each metric lives in the code", StringComparison.Ordinal);
        Assert.True(at >= 0, "docs/metrics.md lost its section 8 (the metric catalogue)");
        return [.. UnitRow().Matches(doc[at..]).Select(m => m.Groups[1].Value).Order(StringComparer.Ordinal)];
    }

    private static string[] CatalogueUnits() => [.. MetricCatalogue.Units.Select(u => u.Name).Order(StringComparer.Ordinal)];

    [Fact]
    public void EveryCatalogueUnit_IsDocumented()
    {
        string[] documented = DocumentedUnits();
        foreach (string unit in CatalogueUnits())
        {
            Assert.True(documented.Contains(unit), $"metric unit {unit} is in MetricCatalogue but not in docs/metrics.md section 8: add a row naming its per-frame, tally, JSON and shard state parts");
        }
    }

    [Fact]
    public void EveryDocumentedUnit_IsInTheCatalogue()
    {
        string[] units = CatalogueUnits();
        string[] documented = DocumentedUnits();
        Assert.NotEmpty(documented);
        foreach (string unit in documented)
        {
            Assert.True(units.Contains(unit), $"docs/metrics.md section 8 names Metrics/{unit}/, which is not in MetricCatalogue.Units");
        }
    }

    [Fact]
    public void EveryUnitFolder_IsInTheCatalogue_AndEveryUnitHasItsFolder()
    {
        // A unit's folder and namespace carry its name (LaneBaseline.Core.Metrics.<Name>).
        string[] folders = UnitFolders();
        foreach (IMetricUnit unit in MetricCatalogue.Units)
        {
            Assert.True(folders.Contains(unit.Name), $"metric unit {unit.Name} has no folder src/LaneBaseline.Core/Metrics/{unit.Name}/");
            Assert.Equal("LaneBaseline.Core.Metrics." + unit.Name, unit.GetType().Namespace);
        }

        string[] units = CatalogueUnits();
        foreach (string folder in folders)
        {
            Assert.True(units.Contains(folder), $"src/LaneBaseline.Core/Metrics/{folder}/ holds no unit of MetricCatalogue.Units");
        }
    }

    [Fact]
    public void JsonKeys_AreDistinct()
    {
        // Two units writing the same key would repeat a name in one object. Source: RFC 8259, Sec. 4 ("The names within an object SHOULD be unique").
        string[] keys = [.. MetricCatalogue.Units.Select(u => u.JsonKey)];
        Assert.Equal(keys.Length, keys.Distinct(StringComparer.Ordinal).Count());
    }

    [Fact]
    public void EveryDocumentedRow_NamesItsJsonKey()
    {
        string doc = File.ReadAllText(RepoPaths.Combine("docs", "metrics.md"));
        string section = doc[doc.IndexOf("## 8. Where each metric lives in the code", StringComparison.Ordinal)..];
        foreach (IMetricUnit unit in MetricCatalogue.Units)
        {
            string row = section.Split('\n').FirstOrDefault(l => l.StartsWith("| `Metrics/" + unit.Name + "/` |", StringComparison.Ordinal)) ?? string.Empty;
            Assert.True(row.Contains("`" + unit.JsonKey + "`", StringComparison.Ordinal), $"the docs/metrics.md section 8 row of {unit.Name} does not name its JSON key `{unit.JsonKey}`");
        }
    }

    // Every metric of a system's and of a tag's object in the score JSON is the part of a catalogue unit: a metric
    // written around the catalogue fails here. With a camera, scored lanes and coverage, every unit writes its part.
    [Fact]
    public void ScoreJson_HoldsOnlyCatalogueUnits_AndEveryUnitWrites()
    {
        var settings = new ScoreSettings { Camera = Core.Geometry.CameraModel.CreateDefault(1280, 720) };
        SystemScore[] results = ScoreRun.CreateResults([new ScoredSystem("a", "a.lanes.jsonl"), new ScoredSystem("b", "b.lanes.jsonl")], settings);
        FrameScore[] row = [Frame(settings), Frame(settings)];
        ScoreRun.Accumulate(results, row, settings.HalfIndex);
        foreach (SystemScore r in results)
        {
            r.Coverage = new FrameCoverage(1, 1, 0, 0, [], []);
        }

        using var stream = new MemoryStream();
        ScoreJsonWriter.Write(stream, results, settings, null, "truth.lanes.jsonl");
        using JsonDocument doc = JsonDocument.Parse(stream.ToArray());
        string[] frameKeys = ["frames", "truth_lanes", "pred_lanes", "intervals", "by_tag"];
        var unitKeys = MetricCatalogue.Units.Select(u => u.JsonKey).ToHashSet(StringComparer.Ordinal);
        JsonElement system = doc.RootElement.GetProperty("systems").GetProperty("a");
        string[] systemKeys = [.. system.EnumerateObject().Select(p => p.Name)];
        string[] tagKeys = [.. system.GetProperty("by_tag").GetProperty("day").EnumerateObject().Select(p => p.Name)];
        foreach (string key in systemKeys.Concat(tagKeys))
        {
            Assert.True(frameKeys.Contains(key) || unitKeys.Contains(key), $"score JSON key '{key}' is written by no metric unit of MetricCatalogue");
        }

        foreach (IMetricUnit unit in MetricCatalogue.Units)
        {
            Assert.True(systemKeys.Contains(unit.JsonKey), $"metric unit {unit.Name} wrote no '{unit.JsonKey}' into a system's object");
        }
    }

    // Every key of a system's entry in a shard state frame line, besides the lane counts, is written by a catalogue unit.
    [Fact]
    public void ShardState_HoldsOnlyCatalogueUnits()
    {
        var settings = new ScoreSettings { Camera = Core.Geometry.CameraModel.CreateDefault(1280, 720) };
        FrameScore frame = Frame(settings);
        var unitKeys = new HashSet<string>(StringComparer.Ordinal);
        foreach (IMetricUnit unit in MetricCatalogue.Units)
        {
            using var one = new MemoryStream();
            using (var json = new Utf8JsonWriter(one))
            {
                json.WriteStartObject();
                unit.WriteFrameState(json, frame);
                json.WriteEndObject();
            }

            using JsonDocument part = JsonDocument.Parse(one.ToArray());
            unitKeys.UnionWith(part.RootElement.EnumerateObject().Select(p => p.Name));
        }

        var header = new ScoreStateHeader { Shard = new ShardSpec(0, 1), Truth = "t", TruthFrames = 1, Systems = [new ScoredSystem("a", "a")], Settings = settings, Resamples = 0, Seed = 0 };
        using var stream = new MemoryStream();
        using (var writer = new ScoreStateWriter(new NonDisposing(stream), header))
        {
            writer.Write([frame]);
        }

        string line = Encoding.UTF8.GetString(stream.ToArray()).Split('\n')[1];
        using JsonDocument doc = JsonDocument.Parse(line);
        foreach (JsonProperty p in doc.RootElement.GetProperty("s")[0].EnumerateObject())
        {
            Assert.True(p.Name is "nt" or "np" || unitKeys.Contains(p.Name), $"shard state key '{p.Name}' is written by no metric unit of MetricCatalogue");
        }
    }

    // One frame with a lane that carries a score, road-plane errors and a tag.
    private static FrameScore Frame(ScoreSettings settings) => new()
    {
        Frame = "seq/000001.png",
        Tags = ["day"],
        Width = 1280,
        Height = 720,
        TruthLanes = 1,
        PredLanes = 1,
        IouF1 = new FrameIouF1([.. settings.Thresholds.Select(_ => 1)], [0.8]),
        Points = new FramePointAccuracy(1.0, 1),
        Sweep = new FrameConfidenceSweep(new int[FrameConfidenceSweep.Cutoffs], new int[FrameConfidenceSweep.Cutoffs], true),
        LaneScores = [0.9],
        LaneHits = [true],
        Ground = new FrameGroundErrors(new double[GroundErrors.DefaultLookAheadM.Count], new int[GroundErrors.DefaultLookAheadM.Count], double.NaN, 0, 0),
    };

    /// <summary>Keeps the stream readable after the state writer disposes its stream.</summary>
    private sealed class NonDisposing(Stream inner) : MemoryStream
    {
        public override void Write(byte[] buffer, int offset, int count) => inner.Write(buffer, offset, count);

        public override void Write(ReadOnlySpan<byte> buffer) => inner.Write(buffer);
    }

    // A table row starts with the unit's folder in backticks.
    [GeneratedRegex(@"^\| `Metrics/([A-Za-z][A-Za-z0-9]*)/` \|", RegexOptions.Multiline)]
    private static partial Regex UnitRow();
}
