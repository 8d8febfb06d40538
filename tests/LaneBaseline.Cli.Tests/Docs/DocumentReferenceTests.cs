using System.Text.RegularExpressions;
using LaneBaseline.Testing;
using Xunit;

namespace LaneBaseline.Cli.Tests.Docs;

/// <summary>
/// The repository stands on its own: every Markdown document that a doc, a test, a source file, a script or a preset
/// names must exist in the tree (project rule; the specification lives in docs/).
/// </summary>
public sealed partial class DocumentReferenceTests
{
    private static readonly string[] Extensions = [".md", ".cs", ".sh", ".yaml", ".json"];

    [Fact]
    public void EveryCitedMarkdownFile_ExistsInTheTree()
    {
        string root = RepoPaths.Root;
        var missing = new List<string>();
        int checkedRefs = 0;
        foreach (string file in SourceFiles(root))
        {
            string text = File.ReadAllText(file);
            foreach (Match m in MdReference().Matches(text))
            {
                string cited = m.Groups[1].Value;
                checkedRefs++;
                if (!Resolves(root, Path.GetDirectoryName(file)!, cited))
                {
                    int line = text.AsSpan(0, m.Index).Count('\n') + 1;
                    missing.Add(Path.GetRelativePath(root, file) + ":" + line + ": " + cited);
                }
            }
        }

        Assert.True(checkedRefs > 50, "the scan found only " + checkedRefs + " references: is the pattern broken?");
        Assert.True(missing.Count == 0, "documents cited but not in the tree:\n" + string.Join('\n', missing));
    }

    [Fact]
    public void TheScan_FindsAMissingDocument()
    {
        // The check itself can fail: a made-up name is reported, a real one is not.
        Assert.False(Resolves(RepoPaths.Root, RepoPaths.Root, "docs/no-such-page.md"));
        Assert.True(Resolves(RepoPaths.Root, RepoPaths.Root, "docs/metrics.md"));
        Assert.Equal("docs/x.md", MdReference().Match("see `docs/" + "x.md` here").Groups[1].Value);
    }

    /// <summary>A name resolves relative to the repository root or to the citing file's folder.</summary>
    private static bool Resolves(string root, string folder, string cited) =>
        File.Exists(Path.Combine(root, cited)) || File.Exists(Path.Combine(folder, cited));

    private static IEnumerable<string> SourceFiles(string root)
    {
        foreach (string top in new[] { "docs", "src", "tests", "scripts", "configs", "sample-frames", ".ci" })
        {
            string d = Path.Combine(root, top);
            if (!Directory.Exists(d))
            {
                continue;
            }

            foreach (string f in Directory.EnumerateFiles(d, "*", SearchOption.AllDirectories))
            {
                string rel = Path.GetRelativePath(root, f).Replace('\\', '/');
                if (rel.Contains("/bin/", StringComparison.Ordinal) || rel.Contains("/obj/", StringComparison.Ordinal)
                    || rel.Contains("BenchmarkDotNet.Artifacts", StringComparison.Ordinal) || rel.StartsWith("tests/corpus/", StringComparison.Ordinal))
                {
                    continue;
                }

                if (Extensions.Contains(Path.GetExtension(f)))
                {
                    yield return f;
                }
            }
        }

        foreach (string f in Directory.EnumerateFiles(root, "*.md"))
        {
            yield return f;
        }
    }

    // A path-like token ending in .md, not inside a code string literal (those are file names the code opens): letters, digits, '_', '-', '.', '/'; not part of a URL.
    [GeneratedRegex(@"(?<![\w/:.""-])((?:\.\./|[\w-]+/)*[\w.-]*[\w-]\.md)\b")]
    private static partial Regex MdReference();
}
