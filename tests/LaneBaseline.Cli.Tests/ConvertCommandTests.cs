using System.Text.Json;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Testing;
using Xunit;

namespace LaneBaseline.Cli.Tests;

public sealed class ConvertCommandTests : IDisposable
{
    private readonly TempDir dir = new();

    public void Dispose() => dir.Dispose();

    private string WriteTruth()
    {
        string path = dir.File("t.lanes.jsonl");
        Lanes.WriteFile(path,
        [
            new LaneRecord
            {
                Frame = "clip/000001.jpg", Width = 1920, Height = 1080, Tags = ["day"],
                Lanes =
                [
                    new Lane { Points = [new(400, 589), new(700, 250)], Slot = -1, Score = 0.75, Kind = "solid" },
                    new Lane { Points = [new(1300, 589), new(1100.5, 420.25), new(900, 250)], Slot = 1, Kind = "dashed" },
                ],
            },
            Lanes.Truth("clip/000002.jpg", 1920, 1080, Lanes.Of((820, 589), (822, 100))),
            Lanes.Truth("clip/000003.jpg", 1920, 1080),
        ]);
        return path;
    }

    [Fact]
    public void LaneFile_ToOpenLabel_ToLaneFile_IsByteIdentical()
    {
        string truth = WriteTruth(), ol = dir.File("t.json"), back = dir.File("back.lanes.jsonl");
        Assert.Equal(0, CliRunner.Run("convert", truth, "-o", ol).Exit);
        (int exit, string stdout, _) = CliRunner.Run("convert", ol, "-o", back);
        Assert.Equal(0, exit);
        Assert.Contains("3 frames, 3 lanes", stdout, StringComparison.Ordinal);
        Assert.Equal(File.ReadAllText(truth), File.ReadAllText(back));
    }

    [Fact]
    public void LaneFile_ToMasks_ToLaneFile_KeysSizesAndGeometryKept()
    {
        string truth = WriteTruth(), masks = dir.File("masks"), back = dir.File("m.lanes.jsonl");
        Assert.Equal(0, CliRunner.Run("convert", truth, "-o", masks).Exit);
        // Layout: DIR/<frame key with its extension replaced by .png>.
        Assert.True(File.Exists(Path.Combine(masks, "clip", "000001.png")));
        Assert.True(File.Exists(Path.Combine(masks, "clip", "000003.png")));
        Assert.Equal(0, CliRunner.Run("convert", masks, "-o", back, "--reference", truth).Exit);
        var records = ReadAll(back);
        Assert.Equal(["clip/000001.jpg", "clip/000002.jpg", "clip/000003.jpg"], records.Select(r => r.Frame));
        Assert.All(records, r => Assert.Equal((1920, 1080), (r.Width!.Value, r.Height!.Value)));
        Assert.Equal([2, 1, 0], records.Select(r => r.Lanes.Count));
        // Lane order follows the mask ids (file order); geometry within 1 px at mid-height
        // (tolerance stated in docs/formats.md and checked row by row in MaskRoundTripTests).
        Assert.True(Core.Geometry.Polylines.TryXAt(records[0].Lanes[0].Points, 419.5, out double x));
        Assert.Equal(550, x, 1.0); // original: x = 400 + (589 - 419.5) * 300 / 339 = 550
        Assert.Null(records[0].Lanes[0].Slot); // slot, score, kind and tags are lost in masks (docs/formats.md)
    }

    [Fact]
    public void Masks_WithoutReference_KeyedByMaskPath_SizedByMask()
    {
        string truth = WriteTruth(), masks = dir.File("masks"), back = dir.File("m.lanes.jsonl");
        Assert.Equal(0, CliRunner.Run("convert", truth, "-o", masks, "--mask-width-px", "9").Exit);
        Assert.Equal(0, CliRunner.Run("convert", masks, "-o", back).Exit);
        Assert.Equal("clip/000001.png", ReadAll(back)[0].Frame);
    }

    [Fact]
    public void BadInputs_Exit3_NamingTheFile()
    {
        string truth = WriteTruth();
        string pred = dir.File("p.lanes.jsonl");
        Lanes.WriteFile(pred, [Lanes.Pred("x.png", Lanes.Of((1, 2), (3, 4)))]);
        (int exit, _, string err) = CliRunner.Run("convert", pred, "-o", dir.File("masks"));
        Assert.Equal(3, exit);
        Assert.Contains("p.lanes.jsonl:1: width: required key is missing", err, StringComparison.Ordinal);

        Directory.CreateDirectory(dir.File("empty"));
        (exit, _, err) = CliRunner.Run("convert", dir.File("empty"), "-o", dir.File("o.jsonl"));
        Assert.Equal(3, exit);
        Assert.Contains("no mask PNGs", err, StringComparison.Ordinal);

        Directory.CreateDirectory(dir.File("rgb"));
        File.WriteAllBytes(dir.File("rgb/a.png"), [1, 2, 3]);
        (exit, _, err) = CliRunner.Run("convert", dir.File("rgb"), "-o", dir.File("o.jsonl"));
        Assert.Equal(3, exit);
        Assert.Contains("a.png: cannot be decoded as an image", err, StringComparison.Ordinal);
        Assert.False(File.Exists(dir.File("o.jsonl")));
        Assert.Empty(Directory.GetFiles(dir.Path, "*.tmp"));

        Assert.Equal(3, CliRunner.Run("convert", dir.File("missing.jsonl"), "-o", dir.File("o.json")).Exit);
        Assert.Equal(2, CliRunner.Run("convert", truth, "-o", dir.File("o.json"), "--to", "svg").Exit);
    }

    private static List<LaneRecord> ReadAll(string path)
    {
        using LaneFileReader r = LaneFileReader.Open(path, sizeRequired: false);
        return [.. r.ReadAll()];
    }
}
