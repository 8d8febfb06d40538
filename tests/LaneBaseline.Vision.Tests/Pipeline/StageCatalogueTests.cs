using LaneBaseline.Core.Options;
using LaneBaseline.Testing;
using LaneBaseline.Vision.Pipeline;
using OpenCvSharp;
using Xunit;

namespace LaneBaseline.Vision.Tests.Pipeline;

/// <summary>
/// The stage catalogue: every stage class is wired into the pipeline, and every stage the pipeline runs is documented
/// in docs/detect.md under its stable name (DEVELOPERS.md, "Adding a pipeline stage").
/// </summary>
public sealed class StageCatalogueTests
{
    private static IReadOnlyList<string> AllStageNames()
    {
        // The default preset (it carries a calibration), tracking on and a frame narrower than the working width:
        // every optional stage (resize, calibrate, track) is built.
        PipelineOptions options = KnownPresets.Default with { Tracking = new TrackingOptions { Enabled = true } };
        using var pipeline = new LanePipeline(options);
        using Mat frame = new SyntheticRoad { Width = 640, Height = 360, Seed = 2 }.Render();
        pipeline.Process(frame, 0);
        return pipeline.StageNames;
    }

    [Fact]
    public void EveryStageClass_IsBuiltByThePipeline()
    {
        Type[] stageTypes = [.. typeof(LanePipeline).Assembly.GetTypes().Where(t => typeof(IFrameStage).IsAssignableFrom(t) && t is { IsClass: true, IsAbstract: false })];
        IReadOnlyList<string> names = AllStageNames();
        Assert.Equal(names.Count, names.Distinct(StringComparer.Ordinal).Count());
        Assert.True(
            stageTypes.Length == names.Count,
            $"{stageTypes.Length} stage classes ({string.Join(", ", stageTypes.Select(t => t.Name))}) but the pipeline builds {names.Count} ({string.Join(", ", names)}): register the new stage in StageFactory.CreateStages");
    }

    [Fact]
    public void EveryStage_IsDocumentedInDetectMd()
    {
        string doc = File.ReadAllText(RepoPaths.Combine("docs", "detect.md"));
        Assert.All(AllStageNames(), name => Assert.True(doc.Contains("`" + name + "`", StringComparison.Ordinal), $"stage '{name}' is missing from docs/detect.md"));
    }
}
