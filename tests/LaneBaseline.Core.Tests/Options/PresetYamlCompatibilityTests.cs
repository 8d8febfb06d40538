using CsCheck;
using LaneBaseline.Core.Options;
using YamlDotNet.Serialization;
using YamlDotNet.Serialization.NamingConventions;
using Xunit;

namespace LaneBaseline.Core.Tests.Options;

// The preset reader and writer avoid reflection (so Native AOT builds can read presets). Reference: YamlDotNet's own
// reflection-based serializer and deserializer (the general-purpose library the project used before), which must
// agree with ours byte for byte on the written YAML (the configuration hash every lane record carries depends on it)
// and value for value on what is read.
public sealed class PresetYamlCompatibilityTests
{
    // OmitNull: an absent optional section (calibration) is not written, so uncalibrated presets keep their old text and hash.
    private static readonly ISerializer Reference = new SerializerBuilder().WithNamingConvention(CamelCaseNamingConvention.Instance)
        .ConfigureDefaultValuesHandling(DefaultValuesHandling.OmitNull).Build();
    private static readonly IDeserializer ReferenceReader = new DeserializerBuilder().WithNamingConvention(CamelCaseNamingConvention.Instance).Build();

    [Fact]
    public void ToYaml_EqualsYamlDotNet_ForEveryPreset()
    {
        foreach (string name in KnownPresets.Names)
        {
            PipelineOptions options = KnownPresets.Load(name);
            PipelineOptions uncalibrated = options with { Calibration = null };
            Assert.Equal(Reference.Serialize(uncalibrated), PresetLoader.ToYaml(uncalibrated));

            // The calibration section's lists are written in flow style ([a, b]); the reference reads them back.
            Assert.Equal(options, ReferenceReader.Deserialize<PipelineOptions>(PresetLoader.ToYaml(options)));
        }
    }

    [Fact]
    public void ToYamlAndParse_AgreeWithYamlDotNet_ForRandomValues()
    {
        Gen<double> value = Gen.OneOf(Gen.Double[-1e6, 1e6], Gen.Double[0, 1], Gen.Int[-100, 100].Select(i => (double)i), Gen.Double);
        Gen.Select(value, value, Gen.Int, Gen.Bool).Sample(
            (d1, d2, i, b) =>
            {
                var options = new PipelineOptions
                {
                    Warp = new WarpOptions { FarRowFraction = d1, BottomSpanFraction = d2, WidthPx = i },
                    Region = new RegionOptions { EstimateVanishingPoint = b, Smoothing = d1 },
                };
                string ours = PresetLoader.ToYaml(options);
                Assert.Equal(Reference.Serialize(options), ours);
                PipelineOptions back = ReferenceReader.Deserialize<PipelineOptions>(ours);
                Assert.Equal(back.Warp.FarRowFraction, d1);
                Assert.Equal(back.Warp.BottomSpanFraction, d2);
                Assert.Equal(back.Region.EstimateVanishingPoint, b);
            },
            iter: 500);
    }

    [Theory]
    [InlineData("warp:\n  widthPx: 300\n  widthPx: 310\n", "p.yaml:3: Duplicate key widthPx")]
    [InlineData("warp:\n  widthPx: 3.5\n", "p.yaml:2: warp.widthPx: '3.5' is not an integer")]
    [InlineData("region:\n  estimateVanishingPoint: maybe\n", "p.yaml:2: region.estimateVanishingPoint: 'maybe' is not true or false")]
    [InlineData("warp:\n  - 1\n  - 2\n", "p.yaml:2: warp: expected a mapping")]
    [InlineData("warps:\n  widthPx: 300\n", "p.yaml:1: warps: unknown key")]
    [InlineData("warp:\n  widthPx: [1, 2]\n", "p.yaml:2: warp.widthPx: expected an integer")]
    public void BadValues_NameFileLineAndKey(string yaml, string expected)
    {
        var ex = Assert.Throws<BadInputException>(() => PresetLoader.Parse(yaml, "p.yaml"));
        Assert.StartsWith(expected, ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Parse_ReadsWhatYamlDotNetReads()
    {
        // Source: YAML 1.2.2 core schema, Sec. 10.3.2 (.nan, .inf, exponent forms; from memory) — the values must
        // come through as the reference deserializer reads them, before range checks.
        const string yaml = "warp:\n  farRowFraction: 1.5e-1\n  widthPx: +400\nregion:\n  estimateVanishingPoint: False\n  smoothing: .5\n";
        PipelineOptions ours = PresetLoader.Parse(yaml, "p.yaml");
        PipelineOptions reference = ReferenceReader.Deserialize<PipelineOptions>(yaml);
        Assert.Equal(reference, ours);
        Assert.Equal(0.15, ours.Warp.FarRowFraction);
        Assert.False(ours.Region.EstimateVanishingPoint);
        var nan = Assert.Throws<BadInputException>(() => PresetLoader.Parse("gradient:\n  cannyHysteresisRatio: .nan\n", "n.yaml"));
        Assert.StartsWith("n.yaml:2: gradient.cannyHysteresisRatio:", nan.Message, StringComparison.Ordinal);
    }
}
