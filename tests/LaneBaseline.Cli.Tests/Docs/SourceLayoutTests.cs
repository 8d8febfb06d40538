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
            if (names.Length > 1)
            {
                problems.Add(rel + ": " + names.Length + " top-level types (" + string.Join(", ", names) + "); give each its own file");
            }
            else if (names.Length == 1 && names[0] != stem)
            {
                problems.Add(rel + ": holds " + names[0] + "; name the file " + names[0] + ".cs");
            }
        }

        Assert.True(files > 200, "the scan found only " + files + " source files: is the path right?");
        Assert.True(problems.Count == 0, string.Join('\n', problems));
    }

    [Fact]
    public void NoCommand_CallsAnotherCommandsMembers()
    {
        // DEVELOPERS.md, "Adding a command": commands share through Outputs/ writers, CommandArguments, LaneInputs and
        // Core services, never through another command's statics (Program.cs only calls each command's Create).
        string commands = RepoPaths.Combine("src", "LaneBaseline.Cli", "Commands");
        var problems = new List<string>();
        string[] files = Directory.GetFiles(commands, "*.cs");
        Assert.True(files.Length >= 10, "the scan found only " + files.Length + " command files");
        foreach (string file in files)
        {
            string own = Path.GetFileName(file).Split('.')[0];
            foreach (Match m in CommandMember().Matches(File.ReadAllText(file)))
            {
                if (m.Groups["command"].Value + "Command" != own.Replace("Runner", "Command", StringComparison.Ordinal) && m.Groups["command"].Value + "Command" != own)
                {
                    problems.Add(Path.GetFileName(file) + ": " + m.Value);
                }
            }
        }

        Assert.True(problems.Count == 0, "calls into another command:\n" + string.Join('\n', problems));
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

    [GeneratedRegex(@"\b(?<command>[A-Z][a-z]+)Command\.(?!Create\b)[A-Z]\w*")]
    private static partial Regex CommandMember();
}
