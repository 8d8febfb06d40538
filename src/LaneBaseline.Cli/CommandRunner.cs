using System.CommandLine;
using LaneBaseline.Core;

namespace LaneBaseline.Cli;

/// <summary>Runs a command body and maps exceptions to the contract's exit codes with one clear line on stderr.</summary>
internal static class CommandRunner
{
    public static int Run(ParseResult parseResult, Func<TextWriter, TextWriter, int> body)
    {
        TextWriter stdout = parseResult.InvocationConfiguration.Output;
        TextWriter stderr = parseResult.InvocationConfiguration.Error;
        using var spool = Core.IO.InputSpool.Begin();
        try
        {
            return body(stdout, stderr);
        }
        catch (BadInputException ex)
        {
            stderr.WriteLine("error: " + ex.Message);
            return ExitCodes.InputError;
        }
        catch (UsageException ex)
        {
            stderr.WriteLine("usage error: " + ex.Message);
            return ExitCodes.UsageError;
        }
        catch (OperationCanceledException)
        {
            stderr.WriteLine("cancelled");
            return ExitCodes.Cancelled;
        }
#pragma warning disable CA1031 // the composition root turns every unexpected failure into exit 1 without a stack trace
        catch (Exception ex)
#pragma warning restore CA1031
        {
            stderr.WriteLine("internal error: " + ex.GetType().Name + ": " + ex.Message);
            if (Environment.GetEnvironmentVariable("LANEBASELINE_DEBUG") == "1")
            {
                stderr.WriteLine(ex.ToString());
            }

            return ExitCodes.InternalError;
        }
    }
}

/// <summary>A usage error found after parsing (conflicting or malformed option values): exit code 2.</summary>
internal sealed class UsageException : Exception
{
    public UsageException(string message)
        : base(message)
    {
    }

    public UsageException()
    {
    }

    public UsageException(string message, Exception innerException)
        : base(message, innerException)
    {
    }
}
