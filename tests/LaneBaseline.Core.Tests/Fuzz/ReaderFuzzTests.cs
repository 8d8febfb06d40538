using System.Text;
using CsCheck;
using LaneBaseline.Core.Geometry;
using LaneBaseline.Core.Interchange;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Options;
using LaneBaseline.Testing;
using Xunit;

namespace LaneBaseline.Core.Tests.Fuzz;

// Property (CLI contract: bad input is exit 3 with a message, never an unhandled exception): every reader of a
// user-supplied file, fed random mutations of a valid file, either accepts it or throws BadInputException whose
// message starts with the file name.
public sealed class ReaderFuzzTests
{
    [Fact]
    public void PresetParser_MutatedDefaultPreset_OnlyBadInput()
    {
        byte[] valid = Encoding.UTF8.GetBytes(KnownPresets.GetText("default"));
        Mutations.Of(valid).Sample(bytes => Expect("preset.yaml", () => PresetLoader.Parse(Encoding.UTF8.GetString(bytes), "preset.yaml")), iter: 3000);
    }

    [Fact]
    public void CameraParser_MutatedCameraFile_OnlyBadInput()
    {
        byte[] valid = Encoding.UTF8.GetBytes(CameraModel.CreateDefault(1280, 720).ToJson());
        Mutations.Of(valid).Sample(bytes => Expect("camera.json", () => CameraModel.Parse(Encoding.UTF8.GetString(bytes), "camera.json")), iter: 800);
    }

    [Fact]
    public void OpenLabelReader_MutatedFile_OnlyBadInput()
    {
        using var dir = new TempDir();
        string validPath = dir.File("valid.json");
        using (OpenLabelWriter w = OpenLabelWriter.Create(validPath))
        {
            w.Write(Lanes.Truth("a.png", 640, 360, Lanes.Vertical(100, 360), Lanes.Of((300, 359), (320, 200))));
            w.Write(Lanes.Truth("b.png", 640, 360, Lanes.Of((10, 350), (60, 100))));
        }

        byte[] valid = File.ReadAllBytes(validPath);
        int n = 0;
        Mutations.Of(valid).Sample(
            bytes =>
            {
                string path = dir.File($"m{Interlocked.Increment(ref n)}.json");
                File.WriteAllBytes(path, bytes);
                Expect(path, () =>
                {
                    using OpenLabelSource source = OpenLabelSource.Open(path, new LaneSourceRequest { SizeRequired = true });
                    while (source.TryRead(out _))
                    {
                    }
                });
            },
            iter: 400,
            threads: 1);
    }

    // Hostile records (issue 17, docs/reliability.md): lone surrogate escapes (any \uXXXX in a key, tag or unknown
    // key), lane counts and frame sizes either side of the documented limits: accepted, or BadInputException naming
    // the file; never another exception.
    [Fact]
    public void LaneReader_HostileRecords_OnlyBadInput()
    {
        Gen.Select(Gen.Int[0, 2], Gen.Int[InputLimits.MaxLanesPerFrame - 3, InputLimits.MaxLanesPerFrame + 3], Gen.Int[16380, 16388], Gen.Int[0, 0xFFFF]).Sample(
            (where, lanes, side, unit) =>
            {
                string esc = "\\u" + unit.ToString("x4", System.Globalization.CultureInfo.InvariantCulture);
                var line = new StringBuilder("{\"frame\":\"" + (where == 0 ? esc : "f") + "\",\"width\":" + side.ToString(System.Globalization.CultureInfo.InvariantCulture)
                    + ",\"height\":16384,\"tags\":[\"" + (where == 1 ? esc : "t") + "\"],\"" + (where == 2 ? esc : "k") + "\":1,\"lanes\":[");
                for (int i = 0; i < lanes; i++)
                {
                    line.Append(i == 0 ? "" : ",").Append("{\"points\":[[1,2],[3,4]]}");
                }

                byte[] bytes = Encoding.UTF8.GetBytes(line.Append("]}\n").ToString());
                Expect("h.lanes.jsonl", () =>
                {
                    using var reader = LaneFileReader.FromStream(new MemoryStream(bytes), "h.lanes.jsonl", sizeRequired: true);
                    Assert.True(reader.ReadAll().Single().Lanes.Count <= InputLimits.MaxLanesPerFrame);
                });
            },
            iter: 120);
    }

    // Nesting either side of the YAML depth limit, block and flow style (issue 17): BadInputException only.
    [Fact]
    public void PresetParser_NestingAroundTheLimit_OnlyBadInput()
    {
        Gen.Select(Gen.Int[1, 3 * InputLimits.MaxYamlDepth], Gen.Bool).Sample(
            (depth, flow) =>
            {
                string yaml = flow
                    ? "color:\n  x: " + new string('[', depth) + new string(']', depth) + "\n"
                    : "color:\n" + string.Concat(Enumerable.Range(1, depth).Select(i => new string(' ', 2 * i) + "k:\n")) + "\n";
                Expect("n.yaml", () => PresetLoader.Parse(yaml, "n.yaml"));
            },
            iter: 150);
    }

    private static void Expect(string file, Action read)
    {
        try
        {
            read();
        }
        catch (BadInputException ex)
        {
            Assert.StartsWith(file, ex.Message, StringComparison.Ordinal);
        }
    }
}
