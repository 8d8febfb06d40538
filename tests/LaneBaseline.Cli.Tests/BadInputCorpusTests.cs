using LaneBaseline.Testing;
using Xunit;

namespace LaneBaseline.Cli.Tests;

public sealed class BadInputCorpusTests
{
    public static TheoryData<string> CorpusFiles()
    {
        var data = new TheoryData<string>();
        foreach (string f in Directory.GetFiles(RepoPaths.Combine("tests", "corpus", "lane-files"), "*.jsonl").Order(StringComparer.Ordinal))
        {
            data.Add(Path.GetFileName(f));
        }

        return data;
    }

    // Source: CLI contract (exit 3 = bad input, the message names the file) and lane-file specification rules;
    // tests/corpus/lane-files/INDEX.md says what is wrong with each file.
    [Theory]
    [MemberData(nameof(CorpusFiles))]
    public void Score_CorpusFileAsTruth_Exits3_NamingTheFile(string name)
    {
        string path = RepoPaths.Combine("tests", "corpus", "lane-files", name);
        (int exit, _, string err) = CliRunner.Run("score", "--truth", path, "--pred", path, "--bootstrap", "0");
        Assert.Equal(3, exit);
        Assert.StartsWith("error: " + path, err, StringComparison.Ordinal);
        Assert.DoesNotContain("   at ", err, StringComparison.Ordinal);
    }

    [Fact]
    public void Corpus_HasAtLeast40Files_EachDescribedInIndex()
    {
        string dir = RepoPaths.Combine("tests", "corpus", "lane-files");
        string index = File.ReadAllText(Path.Combine(dir, "INDEX.md"));
        string[] files = Directory.GetFiles(dir, "*.jsonl");
        Assert.True(files.Length >= 40);
        Assert.All(files, f => Assert.Contains("| " + Path.GetFileName(f) + " |", index, StringComparison.Ordinal));
    }
}
