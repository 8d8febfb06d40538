using System.Text.RegularExpressions;
using LaneBaseline.Testing;
using Xunit;

namespace LaneBaseline.Cli.Tests.Docs;

/// <summary>
/// One top-level type per source file, and the file named after it (DEVELOPERS.md, "Layout and why"; common practice
/// in C# code bases, the rule StyleCop calls SA1402/SA1649). Partial classes may span several files
/// (<c>DetectRunner.Outputs.cs</c>); <c>file</c>-scoped helper types may sit beside the type they serve.
/// </summary>
public sealed partial class SourceLayoutTests
{
    // Files still holding several types: the score metrics are being regrouped into one folder per metric (issue 13,
    // item 4); each is split there. The list may only shrink.
    private static readonly HashSet<string> Pending = new(StringComparer.Ordinal)
    {
        "src/LaneBaseline.Core/Metrics/Coverage/FrameCoverage.cs",
        "src/LaneBaseline.Core/Metrics/MaskFrameState.cs",
        "src/LaneBaseline.Core/Metrics/ScoreJsonWriter.cs",
        "src/LaneBaseline.Core/Metrics/ScoreRun.cs",
        "src/LaneBaseline.Core/Metrics/ScoreTally.cs",
        "src/LaneBaseline.Core/Metrics/ShardJobKey.cs",
        "src/LaneBaseline.Core/Metrics/ScoreGate.cs",
        "src/LaneBaseline.Core/Metrics/Bootstrap.cs",
    };

    [Fact]
    public void EverySourceFile_HoldsOneTopLevelType_NamedAfterIt()
    {
        string root = RepoPaths.Root;
        var problems = new List<string>();
        int files = 0;
        foreach (string file in Directory.EnumerateFiles(Path.Combine(root, "src"), "*.cs", SearchOption.AllDirectories))
        {
            string rel = Path.GetRelativePath(root, file).Replace('\\', '/');
            if (rel.Contains("/obj/", StringComparison.Ordinal) || rel.Contains("/bin/", StringComparison.Ordinal))
            {
                continue;
            }

            files++;
            string[] names = [.. File.ReadLines(file).Select(l => TopLevelType().Match(l)).Where(m => m.Success).Select(m => m.Groups["name"].Value)];
            string stem = Path.GetFileName(file).Split('.')[0];
            if (names.Length > 1 && !Pending.Contains(rel))
            {
                problems.Add(rel + ": " + names.Length + " top-level types (" + string.Join(", ", names) + "); give each its own file");
            }
            else if (names.Length == 1 && names[0] != stem)
            {
                problems.Add(rel + ": holds " + names[0] + "; name the file " + names[0] + ".cs");
            }
            else if (names.Length <= 1 && Pending.Contains(rel))
            {
                problems.Add(rel + ": now holds one type; take it off the pending list");
            }
        }

        Assert.True(files > 200, "the scan found only " + files + " source files: is the path right?");
        Assert.True(problems.Count == 0, string.Join('\n', problems));
    }

    [Fact]
    public void TheScan_SeesTypesItMustSee()
    {
        // The pattern must catch every declaration form the code uses, or the rule above passes on nothing.
        string[] declarations =
        [
            "public sealed class A", "internal static class B", "public sealed record C(int X);", "public readonly record struct D(int X)",
            "internal enum E", "public interface IF", "public abstract partial class G", "internal sealed partial record H",
        ];
        Assert.Equal(["A", "B", "C", "D", "E", "IF", "G", "H"], declarations.Select(d => TopLevelType().Match(d).Groups["name"].Value));
        Assert.DoesNotMatch(TopLevelType(), "    public sealed class Nested");
        Assert.DoesNotMatch(TopLevelType(), "file sealed class Helper");
    }

    [GeneratedRegex(@"^(public |internal )?((sealed|static|abstract|readonly|partial) )*(class|record|struct|enum|interface)\s+(struct\s+|class\s+)?(?<name>[A-Za-z_]\w*)")]
    private static partial Regex TopLevelType();
}
