using System.CommandLine;
using LaneBaseline.Cli.Commands;

namespace LaneBaseline.Cli;

/// <summary>Entry point: builds the command tree and maps parse errors to exit code 2.</summary>
internal static class Program
{
    private static int Main(string[] args)
    {
        NativeLibraryResolver.Install();
        return Invoke(args, Console.Out, Console.Error);
    }

    /// <summary>Builds the root command with every subcommand.</summary>
    public static RootCommand CreateRoot()
    {
        RootCommand root = new(
            "LaneBaseline: a classical, explainable CPU lane-detection baseline and lane scorer.\n" + SafetyNotice.Text);
        // One line per command; keep the list sorted as the contract lists them.
        root.Subcommands.Add(DetectCommand.Create());
        root.Subcommands.Add(ScoreCommand.Create());
        root.Subcommands.Add(AuditCommand.Create());
        root.Subcommands.Add(TuneCommand.Create());
        root.Subcommands.Add(ConvertCommand.Create());
        root.Subcommands.Add(RenderCommand.Create());
        root.Subcommands.Add(ReportCommand.Create());
        root.Subcommands.Add(MergeCommand.Create());
        root.Subcommands.Add(BenchCommand.Create());
        return root;
    }

    /// <summary>Runs the tool in-process (used by tests) with the given writers.</summary>
    public static int Invoke(string[] args, TextWriter output, TextWriter error)
    {
        ParseResult parse = CreateRoot().Parse(args);
        var config = new InvocationConfiguration { Output = output, Error = error };
        if (parse.Errors.Count > 0)
        {
            foreach (var e in parse.Errors)
            {
                error.WriteLine("usage error: " + e.Message);
            }

            error.WriteLine("Run 'lanebaseline " + (parse.CommandResult.Command is RootCommand ? string.Empty : parse.CommandResult.Command.Name + " ") + "--help' for the options.");
            return ExitCodes.UsageError;
        }

        return parse.Invoke(config);
    }
}
