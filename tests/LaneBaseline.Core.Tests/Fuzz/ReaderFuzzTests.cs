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
