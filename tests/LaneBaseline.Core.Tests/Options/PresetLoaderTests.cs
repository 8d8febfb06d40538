using System.Reflection;
using LaneBaseline.Core;
using LaneBaseline.Core.Options;
using Xunit;

namespace LaneBaseline.Core.Tests.Options;

public sealed class PresetLoaderTests
{
    [Fact]
    public void DefaultPreset_StatesEveryKey_AndEqualsTheRecordDefaults()
    {
        // The documented default file and the code defaults must never drift apart (common practice: one truth).
        // The default preset alone carries a fitted calibration (scripts/calibrate-default.sh); the record has none.
        PipelineOptions loaded = KnownPresets.Load("default");
        Assert.NotNull(loaded.Calibration);
        Assert.Equal(new PipelineOptions(), loaded with { Calibration = null });
        string text = KnownPresets.GetText("default");
        foreach (string key in AllKeys().Where(k => !k.StartsWith("metric.", StringComparison.Ordinal)))
        {
            Assert.True(PresetLoader.FindLine(text, key) > 0, "default.yaml lacks " + key);
        }
    }

    [Fact]
    public void EveryPreset_Loads_Validates_AndRoundTrips()
    {
        Assert.Contains("default", KnownPresets.Names);
        Assert.Contains("low-light", KnownPresets.Names);
        Assert.Contains("wide-angle", KnownPresets.Names);
        foreach (string name in KnownPresets.Names)
        {
            PipelineOptions options = KnownPresets.Load(name);
            Assert.Empty(options.Validate());
            Assert.Equal(options, PresetLoader.Parse(PresetLoader.ToYaml(options), name + " (round trip)"));
        }
    }

    [Fact]
    public void RenamedPreset_OldNameStillLoads_WithOneDeprecationLine()
    {
        // Project decision (docs/detect.md): a renamed preset keeps its old name for one release.
        Assert.Contains("near-boundaries", KnownPresets.Names);
        Assert.DoesNotContain("four-lanes", KnownPresets.Names);
        using var notes = new StringWriter();
        PipelineOptions old = KnownPresets.Resolve("four-lanes", notes);
        Assert.Equal(KnownPresets.Load("near-boundaries"), old);
        Assert.Equal(4, old.Search.MaxLanes);
        string line = Assert.Single(notes.ToString().Split('\n', StringSplitOptions.RemoveEmptyEntries));
        Assert.Contains("deprecated", line, StringComparison.Ordinal);
        Assert.Contains("near-boundaries", line, StringComparison.Ordinal);
        using var none = new StringWriter();
        _ = KnownPresets.Resolve("near-boundaries", none);
        Assert.Equal(string.Empty, none.ToString());
    }

    [Fact]
    public void PartialPreset_KeepsUnstatedDefaults()
    {
        PipelineOptions low = KnownPresets.Load("low-light");
        Assert.Equal(18, low.Color.WhiteMinContrast);
        Assert.Equal(new ColorOptions().WhiteSpreadFactor, low.Color.WhiteSpreadFactor);
        Assert.Equal(new WarpOptions(), low.Warp);
        Assert.NotEqual(new PipelineOptions(), low);
    }

    [Fact]
    public void MisspeltKey_IsAnError_NamingFileAndLine()
    {
        const string yaml = "color:\n  whiteMinContrast: 20\ngradient:\n  cannyLowThreshhold: 40\n";
        var ex = Assert.Throws<BadInputException>(() => PresetLoader.Parse(yaml, "my.yaml"));
        Assert.StartsWith("my.yaml:4:", ex.Message, StringComparison.Ordinal);
        Assert.Contains("cannyLowThreshhold", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void OutOfRangeValues_AreAllReported_WithFileLineAndKey()
    {
        const string yaml = "hough:\n  votes: 0\nwarp:\n  widthPx: 10\n  farRowFraction: .nan\n";
        var ex = Assert.Throws<BadInputException>(() => PresetLoader.Parse(yaml, "p.yaml"));
        Assert.Contains("p.yaml:2: hough.votes:", ex.Message, StringComparison.Ordinal);
        Assert.Contains("p.yaml:4: warp.widthPx:", ex.Message, StringComparison.Ordinal);
        Assert.Contains("p.yaml:5: warp.farRowFraction:", ex.Message, StringComparison.Ordinal);
    }

    // Source: docs/detect.md ("a preset with several errors lists all of them"): unknown keys, wrong types and
    // out-of-range values of one file come in one message, one line each, in file order.
    [Fact]
    public void SeveralKindsOfErrors_AreAllReported_InOneMessage()
    {
        const string yaml = "gradient:\n  cannyLowThreshhold: 40\nsearch:\n  windowCount: many\nhough:\n  votes: 0\nbogus: 1\n";
        var ex = Assert.Throws<BadInputException>(() => PresetLoader.Parse(yaml, "q.yaml"));
        string[] lines = ex.Message.Split('\n');
        Assert.Equal(4, lines.Length);
        Assert.StartsWith("q.yaml:2: gradient.cannyLowThreshhold: unknown key", lines[0], StringComparison.Ordinal);
        Assert.StartsWith("q.yaml:4: search.windowCount:", lines[1], StringComparison.Ordinal);
        Assert.StartsWith("q.yaml:6: hough.votes:", lines[2], StringComparison.Ordinal);
        Assert.StartsWith("q.yaml:7: bogus: unknown key", lines[3], StringComparison.Ordinal);
    }

    [Fact]
    public void WrongType_IsAnError_NamingTheLine()
    {
        var ex = Assert.Throws<BadInputException>(() => PresetLoader.Parse("search:\n  windowCount: many\n", "t.yaml"));
        Assert.StartsWith("t.yaml:2:", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Validate_ReturnsEveryFinding_NotOnlyTheFirst()
    {
        var options = new PipelineOptions
        {
            Gradient = new GradientOptions { BlurKernelPx = 4, CannyHysteresisRatio = double.NaN },
            Hough = new HoughOptions { MinAngleDeg = 80, MaxAngleDeg = 20 },
        };
        var keys = options.Validate().Select(f => f.Key).ToList();
        Assert.Contains("gradient.blurKernelPx", keys);        // even
        Assert.Contains("gradient.cannyHysteresisRatio", keys); // NaN
        Assert.Contains("hough.minAngleDeg", keys);             // min >= max
    }

    [Fact]
    public void Hash_IsStable_AndFollowsEveryValue()
    {
        var a = new PipelineOptions();
        Assert.Equal(PresetLoader.Hash(a), PresetLoader.Hash(new PipelineOptions()));
        Assert.Matches("^sha256:[0-9a-f]{16}$", PresetLoader.Hash(a));
        var b = a with { Fit = a.Fit with { PointSpacingPx = 21 } };
        Assert.NotEqual(PresetLoader.Hash(a), PresetLoader.Hash(b));
    }

    [Fact]
    public void UnknownPresetName_IsBadInput_ListingTheKnownOnes()
    {
        var ex = Assert.Throws<BadInputException>(() => KnownPresets.Resolve("nightt"));
        Assert.Contains("low-light", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void EveryOptionsType_IsASealedRecord_WithoutPublicSetters()
    {
        // Convention test (DEVELOPERS.md, conventions): options are immutable values.
        Type[] types = typeof(PipelineOptions).Assembly.GetTypes()
            .Where(t => t.Namespace == "LaneBaseline.Core.Options" && t.IsPublic && t.Name.EndsWith("Options", StringComparison.Ordinal))
            .ToArray();
        Assert.True(types.Length >= 10);
        foreach (Type t in types)
        {
            Assert.True(t.IsSealed, t.Name + " is not sealed");
            Assert.NotNull(t.GetMethod("<Clone>$"));
            foreach (PropertyInfo p in t.GetProperties())
            {
                MethodInfo? set = p.SetMethod;
                bool initOnly = set is not null && set.ReturnParameter.GetRequiredCustomModifiers().Any(m => m.Name == "IsExternalInit");
                Assert.True(set is null || initOnly, t.Name + "." + p.Name + " has a public setter");
            }
        }
    }

    [Fact]
    public void ConfigsReadme_HasOneLinePerKey()
    {
        string root = RepoRoot();
        string readme = File.ReadAllText(Path.Combine(root, "configs", "README.md"));
        foreach (string key in AllKeys())
        {
            Assert.Contains("`" + key + "`", readme, StringComparison.Ordinal);
        }
    }

    [Fact]
    public void DefaultPreset_ShowsTheMetricSectionCommentedOut_WithTheRecordDefaults()
    {
        // The optional metric section (used only with a camera) is shown commented out in default.yaml, so the
        // preset's text and configuration hash stay those of a run without a camera; uncommented it must state every
        // key with exactly the code's defaults (common practice: one truth).
        string[] lines = KnownPresets.GetText("default").Split('\n');
        int start = Array.FindIndex(lines, l => l.StartsWith("# metric:", StringComparison.Ordinal));
        Assert.True(start >= 0, "default.yaml lacks the commented metric section");
        string section = string.Join('\n', lines.Skip(start).TakeWhile(l => l.StartsWith('#')).Select(l => l[2..]));
        PipelineOptions loaded = PresetLoader.Parse(section, "default.yaml (metric)");
        Assert.Equal(new MetricViewOptions(), loaded.Metric);
        foreach (string key in AllKeys().Where(k => k.StartsWith("metric.", StringComparison.Ordinal)))
        {
            Assert.True(PresetLoader.FindLine(section, key) > 0, "default.yaml's metric section lacks " + key);
        }

        Assert.Null(KnownPresets.Load("default").Metric);
    }

    [Theory]
    [InlineData("metric:\n  metresPerPx: 0.6\n", "metric.metresPerPx")]
    [InlineData("metric:\n  farDistanceM: 4\n", "metric.farDistanceM")]
    [InlineData("metric:\n  minLaneWidthM: 5\n", "metric.minLaneWidthM")]
    [InlineData("metric:\n  metresPerPx: 0.01\n  lateralHalfWidthM: 50\n", "metric.lateralHalfWidthM")]
    public void MetricSection_OutOfRange_IsBadInputNamingTheKey(string yaml, string key)
    {
        BadInputException e = Assert.Throws<BadInputException>(() => PresetLoader.Parse(yaml, "m.yaml"));
        Assert.Contains(key, e.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void MetricSection_Given_RoundTrips_AndOffKeepsZero()
    {
        PipelineOptions o = PresetLoader.Parse("metric:\n  metresPerPx: 0\n  farDistanceM: 30\n", "m.yaml");
        Assert.NotNull(o.Metric);
        Assert.False(o.Metric!.IsEnabled());
        Assert.Equal(30, o.Metric.FarDistanceM);
        Assert.Equal(o, PresetLoader.Parse(PresetLoader.ToYaml(o), "round trip"));
    }

    private static IEnumerable<string> AllKeys()
    {
        foreach (PropertyInfo section in typeof(PipelineOptions).GetProperties())
        {
            string s = char.ToLowerInvariant(section.Name[0]) + section.Name[1..];
            foreach (PropertyInfo p in section.PropertyType.GetProperties())
            {
                yield return s + "." + char.ToLowerInvariant(p.Name[0]) + p.Name[1..];
            }
        }
    }

    private static string RepoRoot()
    {
        string? dir = AppContext.BaseDirectory;
        while (dir is not null && !File.Exists(Path.Combine(dir, "LaneBaseline.sln")))
        {
            dir = Path.GetDirectoryName(dir);
        }

        return dir ?? throw new InvalidOperationException("repository root not found");
    }
}
