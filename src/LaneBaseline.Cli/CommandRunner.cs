using System.CommandLine;
using LaneBaseline.Core;

namespace LaneBaseline.Cli;

/// <summary>Runs a command body and maps exceptions to the contract's exit codes with one clear line on stderr.</summary>
internal static class CommandRunner
{
    /// <summary>
    /// Runs <paramref name="body"/> with the writers for results and for notes. When an output option is <c>-</c>,
    /// that output owns standard output and the command's own result lines go to stderr, so pipes stay clean; at
    /// most one output and one input may be <c>-</c>.
    /// </summary>
    public static int Run(ParseResult parseResult, Func<TextWriter, TextWriter, int> body)
    {
        TextWriter stdout = parseResult.InvocationConfiguration.Output;
        TextWriter stderr = parseResult.InvocationConfiguration.Error;
        using RunContext run = RunContext.Begin();
        try
        {
            (int dashOutputs, int dashInputs) = SharedOptions.CountDashes(parseResult);
            if (dashOutputs > 1)
            {
                throw new UsageException("only one output can be '-' (standard output) in a run");
            }

            if (dashInputs > 1)
            {
                throw new UsageException("only one input can be '-' (standard input) in a run");
            }

            return body(dashOutputs == 1 ? stderr : stdout, stderr);
        }
        catch (BadInputException ex)
        {
            stderr.WriteLine("error: " + run.Clean(ex.Message));
            return ExitCodes.InputError;
        }
        catch (UsageException ex)
        {
            stderr.WriteLine("usage error: " + run.Clean(ex.Message));
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
