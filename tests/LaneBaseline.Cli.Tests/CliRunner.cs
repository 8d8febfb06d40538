namespace LaneBaseline.Cli.Tests;

/// <summary>Runs the command-line tool in-process with captured output.</summary>
internal static class CliRunner
{
    public static (int Exit, string Out, string Err) Run(params string[] args)
    {
        using var output = new StringWriter();
        using var error = new StringWriter();
        int exit = Program.Invoke(args, output, error);
        return (exit, output.ToString(), error.ToString());
    }
}
