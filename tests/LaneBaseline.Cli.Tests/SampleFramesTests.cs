using Xunit;

namespace LaneBaseline.Cli.Tests;

public sealed class SampleFramesTests
{
    private static string RepoRoot()
    {
        var dir = new DirectoryInfo(AppContext.BaseDirectory);
        while (dir is not null && !File.Exists(Path.Combine(dir.FullName, "LaneBaseline.sln")))
        {
            dir = dir.Parent;
        }

        return dir?.FullName ?? throw new InvalidOperationException("repository root not found");
    }

    [Fact]
    public void SampleFrames_RegenerateBitForBit()
    {
        // Source: sample-frames/README.md (the committed set is reproducible from its command); the first two
        // scenes do not depend on --count, so rendering two of the eleven checks them without the whole set.
        string samples = Path.Combine(RepoRoot(), "sample-frames");
        string o = Path.Combine(Path.GetTempPath(), "lb-samples-" + Guid.NewGuid().ToString("N"));
        try
        {
            int code = Program.Invoke(
                ["render", "--out", o, "--seed", "2026", "--count", "2", "--sequence-length", "4", "--quality", "88", "--threads", "2"],
                TextWriter.Null,
                TextWriter.Null);
            Assert.Equal(0, code);
            foreach (string f in Directory.GetFiles(Path.Combine(o, "lap-0000")).Concat(Directory.GetFiles(Path.Combine(o, "lap-0001"))))
            {
                string rel = Path.GetRelativePath(o, f);
                Assert.True(File.ReadAllBytes(f).AsSpan().SequenceEqual(File.ReadAllBytes(Path.Combine(samples, rel))), rel + " differs from the committed sample");
            }

            string[] committed = File.ReadAllLines(Path.Combine(samples, "truth.lanes.jsonl"));
            string[] fresh = File.ReadAllLines(Path.Combine(o, "truth.lanes.jsonl"));
            Assert.Equal(8, fresh.Length);
            Assert.Equal(committed.Take(8), fresh);
            Assert.Equal(File.ReadAllText(Path.Combine(samples, "camera.json")), File.ReadAllText(Path.Combine(o, "camera.json")));
        }
        finally
        {
            if (Directory.Exists(o))
            {
                Directory.Delete(o, recursive: true);
            }
        }
    }
}
