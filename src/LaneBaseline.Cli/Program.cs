using System.CommandLine;
using System.Runtime.InteropServices;
using LaneBaseline.Cli.Commands;

namespace LaneBaseline.Cli;

/// <summary>Entry point: builds the command tree and maps parse errors to exit code 2.</summary>
internal static class Program
{
    /// <summary>How long a command may take to stop after Ctrl-C before the process ends anyway (temporaries removed).</summary>
    private static readonly TimeSpan StopGrace = TimeSpan.FromSeconds(10);

    private static int Main(string[] args)
    {
        NativeLibraryResolver.Install();

        // Ctrl-C / SIGTERM: cancel the command, which stops at its next check, removes its temporaries and exits 130.
        // A second signal, or a command still running after StopGrace, ends the process at once after removing them.
        using var interrupt = new CancellationTokenSource();
        int signals = 0;
        void OnSignal(PosixSignalContext context)
        {
            context.Cancel = true;
            if (Interlocked.Increment(ref signals) > 1)
            {
                Stop();
            }

            interrupt.Cancel();
            new Thread(() =>
            {
                Thread.Sleep(StopGrace);
                Stop();
            })
            { IsBackground = true }.Start();
        }

        using var sigint = PosixSignalRegistration.Create(PosixSignal.SIGINT, OnSignal);
        using var sigterm = PosixSignalRegistration.Create(PosixSignal.SIGTERM, OnSignal);
        using Stream input = Console.OpenStandardInput();
        return Invoke(args, Console.Out, Console.Error, input, interrupt.Token);
    }

    private static void Stop()
    {
        Core.IO.TemporaryFiles.DeleteAll();
        Console.Error.WriteLine("cancelled");
        Environment.Exit(ExitCodes.Cancelled);
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
        HelpExamples.Install(root);
        VersionText.Install(root);
        return root;
    }

    /// <summary>Runs the tool in-process (used by tests) with the given writers.</summary>
    public static int Invoke(string[] args, TextWriter output, TextWriter error) => Invoke(args, output, error, Stream.Null);

    /// <summary>Runs the tool with the given writers and standard input (read where an input is <c>-</c>).</summary>
    public static int Invoke(string[] args, TextWriter output, TextWriter error, Stream input, CancellationToken cancellationToken = default)
    {
        using var stdout = new TextWriterStream(output);
        using IDisposable streams = StandardStreams.Use(stdout, input);
        RootCommand root = CreateRoot();
        try
        {
            args = SettingsFile.Expand(root, args);
        }
        catch (Core.BadInputException ex)
        {
            // A settings file with several errors lists each on its own line (as a preset does).
            foreach (string problem in ex.Problems)
            {
                error.WriteLine("error: " + CommandRunner.OneLine(problem));
            }

            return ExitCodes.InputError;
        }

        ParseResult parse = root.Parse(args);
        // Signals are handled in Main (the library's own handler would end the process before temporaries are removed).
        var config = new InvocationConfiguration { Output = output, Error = error, ProcessTerminationTimeout = null };
        if (parse.Errors.Count > 0)
        {
            foreach (var e in parse.Errors)
            {
                error.WriteLine("usage error: " + e.Message);
            }

            WriteSuggestions(parse, error);

            error.WriteLine("Run 'lanebaseline " + (parse.CommandResult.Command is RootCommand ? string.Empty : parse.CommandResult.Command.Name + " ") + "--help' for the options.");
            return ExitCodes.UsageError;
        }

        return parse.InvokeAsync(config, cancellationToken).GetAwaiter().GetResult();
    }

    /// <summary>System.CommandLine's own typo corrections ("Did you mean ...") for unmatched tokens, on stderr.</summary>
    private static void WriteSuggestions(ParseResult parse, TextWriter error)
    {
        if (parse.UnmatchedTokens.Count == 0 || parse.Action is not System.CommandLine.Invocation.ParseErrorAction action)
        {
            return;
        }

        action.ShowHelp = false;
        action.ShowTypoCorrections = true;
        using var suggestions = new StringWriter();
        parse.Invoke(new InvocationConfiguration { Output = suggestions, Error = TextWriter.Null });
        foreach (string line in suggestions.ToString().Split('\n', StringSplitOptions.RemoveEmptyEntries | StringSplitOptions.TrimEntries))
        {
            error.WriteLine(line);
        }
    }
}
