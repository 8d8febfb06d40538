using System.Text.Json;
using LaneBaseline.Core;
using LaneBaseline.Core.Interchange;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Testing;
using Xunit;

namespace LaneBaseline.Core.Tests.Interchange;

public sealed class OpenLabelTests : IDisposable
{
    private readonly TempDir dir = new();

    public void Dispose() => dir.Dispose();

    private static List<LaneRecord> Sample() =>
    [
        new LaneRecord
        {
            Frame = "dusk/000001.png", Width = 1280, Height = 720, Tags = ["dusk", "curve"],
            Lanes =
            [
                new Lane { Points = [new(412.25, 719), new(455.5, 600), new(498.125, 480)], Slot = -1, Score = 0.93, Kind = "solid" },
                new Lane { Points = [new(900, 719), new(800.1, 500)], Slot = 1, Kind = "dashed", ExtraJson = [new("note", "\"faint\"")] },
            ],
            ExtraJson = [new("weather", "{\"rain\":true}")],
        },
        new LaneRecord { Frame = "dusk/000002.png", Width = 1280, Height = 720, Lanes = [] },
        new LaneRecord { Frame = "dusk/000003.png", Lanes = [new Lane { Points = [new(1, 2), new(3, 4)] }] },
    ];

    [Fact]
    public void LaneFile_ToOpenLabel_AndBack_IsEqual()
    {
        string path = dir.File("a.json");
        using (OpenLabelWriter w = OpenLabelWriter.Create(path))
        {
            foreach (LaneRecord r in Sample())
            {
                w.Write(r);
            }

            w.Complete();
        }

        using OpenLabelSource src = OpenLabelSource.Open(path, new LaneSourceRequest());
        var back = new List<string>();
        while (src.TryRead(out LaneRecord r))
        {
            back.Add(LaneFileWriter.ToJsonLine(r));
        }

        // Lossless for every lane-file key (the serialised lines compare equal, numbers at full precision).
        Assert.Equal(Sample().Select(LaneFileWriter.ToJsonLine), back);
    }

    [Fact]
    public void Output_HasTheRequiredKeysOfTheStandard()
    {
        // Source: ASAM OpenLABEL 1.0.0 JSON schema (openlabel_json_schema-v1.0.0), as restated in
        // docs/checks.md: root 'openlabel'; metadata.schema_version "1.0.0" required; objects.{uid} require name
        // and type; frames.{n}.objects.{uid}.object_data.poly2d[] items require name, val, mode, closed; frame and
        // object keys are integer strings; frame_properties allows extra keys.
        string path = dir.File("b.json");
        using (OpenLabelWriter w = OpenLabelWriter.Create(path))
        {
            foreach (LaneRecord r in Sample())
            {
                w.Write(r);
            }

            w.Complete();
        }

        using JsonDocument doc = JsonDocument.Parse(File.ReadAllText(path));
        JsonElement ol = doc.RootElement.GetProperty("openlabel");
        Assert.Equal("1.0.0", ol.GetProperty("metadata").GetProperty("schema_version").GetString());
        var objects = ol.GetProperty("objects").EnumerateObject().ToList();
        Assert.Equal(3, objects.Count);
        foreach (JsonProperty o in objects)
        {
            Assert.True(long.TryParse(o.Name, out _));
            Assert.False(string.IsNullOrEmpty(o.Value.GetProperty("name").GetString()));
            Assert.Equal(OpenLabel.LaneMarkingType, o.Value.GetProperty("type").GetString());
        }

        var frames = ol.GetProperty("frames").EnumerateObject().ToList();
        Assert.Equal(["0", "1", "2"], frames.Select(f => f.Name));
        JsonElement poly = frames[0].Value.GetProperty("objects").GetProperty("0").GetProperty("object_data").GetProperty("poly2d")[0];
        Assert.Equal("lane", poly.GetProperty("name").GetString());
        Assert.Equal("MODE_POLY2D_ABSOLUTE", poly.GetProperty("mode").GetString());
        Assert.False(poly.GetProperty("closed").GetBoolean());
        Assert.Equal([412.25, 719, 455.5, 600, 498.125, 480], poly.GetProperty("val").EnumerateArray().Select(v => v.GetDouble()));
        // Every per-frame object uid is declared in the object table.
        foreach (JsonProperty f in frames)
        {
            foreach (JsonProperty o in f.Value.GetProperty("objects").EnumerateObject())
            {
                Assert.True(ol.GetProperty("objects").TryGetProperty(o.Name, out _));
            }
        }
    }

    [Fact]
    public void ForeignFile_WithoutOurProperties_UsesFrameNumbersAndSize_SkipsOtherTypes()
    {
        string path = dir.File("c.json");
        File.WriteAllText(path, """
            {"openlabel":{"metadata":{"schema_version":"1.0.0"},
             "objects":{"5":{"name":"m","type":"lane-marking"},"9":{"name":"car","type":"car"}},
             "frames":{"12":{"objects":{"9":{"object_data":{}},"5":{"object_data":{"poly2d":[{"name":"x","val":[10,20,30,5],"mode":"MODE_POLY2D_ABSOLUTE","closed":false}]}}}}}}}
            """);
        using OpenLabelSource src = OpenLabelSource.Open(path, new LaneSourceRequest { Size = (64, 32) });
        Assert.True(src.TryRead(out LaneRecord r));
        Assert.Equal("000012", r.Frame);
        Assert.Equal((64, 32), (r.Width!.Value, r.Height!.Value));
        Assert.Equal([new LanePoint(10, 20), new LanePoint(30, 5)], Assert.Single(r.Lanes).Points);
        Assert.Equal(1, src.SkippedObjects);
    }

    [Theory]
    [InlineData("""{"openlabel":{"metadata":{}}}""", "openlabel.metadata.schema_version: required key is missing")]
    [InlineData("""{"openlabel":{"metadata":{"schema_version":"0.9"}}}""", "'0.9' is not supported")]
    [InlineData("""{"openlabel":{"metadata":{"schema_version":"1.0.0"},"objects":{"0":{"name":"a","type":"lane-marking"}},"frames":{"0":{"objects":{"0":{"object_data":{"poly2d":[{"name":"l","val":[1,2,3],"mode":"MODE_POLY2D_ABSOLUTE","closed":false}]}}}}}}}""", "openlabel.frames.0.objects.0.object_data.poly2d[0].val: needs an even count")]
    [InlineData("""{"openlabel":{"metadata":{"schema_version":"1.0.0"},"objects":{"0":{"name":"a","type":"lane-marking"}},"frames":{"0":{"objects":{"0":{"object_data":{"poly2d":[{"name":"l","val":[1,2,3,4],"mode":"MODE_POLY2D_RS6FCC","closed":false}]}}}}}}}""", "poly2d[0].mode: 'MODE_POLY2D_RS6FCC' is not supported")]
    [InlineData("""{"openlabel":{"metadata":{"schema_version":"1.0.0"},"frames":{"0":{"objects":{"4":{}}}}}}""", "object uid '4' is not declared")]
    // Source: docs/metrics.md, `score`, `slot`, `kind` are validated: a wrong type in OpenLABEL is an error as in a lane file.
    [InlineData("""{"openlabel":{"metadata":{"schema_version":"1.0.0"},"objects":{"0":{"name":"a","type":"lane-marking"}},"frames":{"0":{"objects":{"0":{"object_data":{"poly2d":[{"name":"l","val":[1,2,3,4],"mode":"MODE_POLY2D_ABSOLUTE","closed":false,"attributes":{"num":[{"name":"slot","val":"a"}]}}]}}}}}}}""", "attributes.num.slot: val must be a number")]
    [InlineData("""{"openlabel":{"metadata":{"schema_version":"1.0.0"},"objects":{"0":{"name":"a","type":"lane-marking"}},"frames":{"0":{"objects":{"0":{"object_data":{"poly2d":[{"name":"l","val":[1,2,3,4],"mode":"MODE_POLY2D_ABSOLUTE","closed":false,"attributes":{"num":[{"name":"score","val":"0.5"}]}}]}}}}}}}""", "attributes.num.score: val must be a number")]
    [InlineData("""{"openlabel":{"metadata":{"schema_version":"1.0.0"},"objects":{"0":{"name":"a","type":"lane-marking"}},"frames":{"0":{"objects":{"0":{"object_data":{"poly2d":[{"name":"l","val":[1,2,3,4],"mode":"MODE_POLY2D_ABSOLUTE","closed":false,"attributes":{"text":[{"name":"kind","val":5}]}}]}}}}}}}""", "attributes.text.kind: val must be a string")]
    [InlineData("""{"openlabel": [1, 2""", "c.json:1: json: invalid JSON")]
    public void BadFiles_NameFileAndPath(string text, string expected)
    {
        string path = dir.File("c.json");
        File.WriteAllText(path, text);
        var ex = Assert.Throws<BadInputException>(() =>
        {
            using OpenLabelSource src = OpenLabelSource.Open(path, new LaneSourceRequest { Size = (100, 100) });
            while (src.TryRead(out _))
            {
            }
        });
        Assert.Contains(expected, ex.Message, StringComparison.Ordinal);
        Assert.StartsWith(path, ex.Message, StringComparison.Ordinal);
    }
}
