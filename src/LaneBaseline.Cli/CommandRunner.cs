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
        using var spool = Core.IO.InputSpool.Begin();
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
            foreach (string problem in ex.Problems)
            {
                stderr.WriteLine("error: " + OneLine(spool.Clean(problem))); // one line each: a line break inside one is escaped
            }

            return ExitCodes.InputError;
        }
        catch (UsageException ex)
        {
            stderr.WriteLine("usage error: " + OneLine(spool.Clean(ex.Message)));
            return ExitCodes.UsageError;
        }
        catch (IOException ex) when (IsDiskFull(ex))
        {
            stderr.WriteLine("error: no space left on the device while writing (" + OneLine(spool.Clean(ex.Message)) + "); no output was committed");
            return ExitCodes.InputError;
        }
        catch (OpenCvSharp.OpenCVException ex)
        {
            stderr.WriteLine("error: " + OneLine(TranslateOpenCv(ex)));
            return ExitCodes.InputError;
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
            stderr.WriteLine("internal error: " + ex.GetType().Name + ": " + OneLine(ex.Message));
            if (Environment.GetEnvironmentVariable("LANEBASELINE_DEBUG") == "1")
            {
                stderr.WriteLine(ex.ToString());
            }

            return ExitCodes.InternalError;
        }
    }

    /// <summary>
    /// One printable line: control characters (C0, DEL, C1; a hostile frame key may carry terminal escapes or line
    /// breaks) and lone surrogates are shown as <c>\uXXXX</c>, so the message stays one line and cannot drive the terminal.
    /// </summary>
    internal static string OneLine(string message)
    {
        var text = new System.Text.StringBuilder(message.Length);
        for (int i = 0; i < message.Length; i++)
        {
            char c = message[i];
            bool pair = char.IsHighSurrogate(c) && i + 1 < message.Length && char.IsLowSurrogate(message[i + 1]);
            if (pair)
            {
                text.Append(c).Append(message[++i]);
            }
            else if (char.IsControl(c) || char.IsSurrogate(c))
            {
                text.Append("\\u").Append(((int)c).ToString("X4", System.Globalization.CultureInfo.InvariantCulture));
            }
            else
            {
                text.Append(c);
            }
        }

        return text.ToString();
    }

    /// <summary>Whether an I/O failure is a full disk or quota (ENOSPC 28, EDQUOT 122 on Linux; Windows 0x70, 0x27).</summary>
    internal static bool IsDiskFull(IOException ex) =>
        (ex.HResult & 0xFFFF) is 28 or 122 or 0x70 or 0x27 || ex.Message.Contains("No space left", StringComparison.OrdinalIgnoreCase);

    /// <summary>OpenCV's own error text (function, file, line of its source) in plain words.</summary>
    internal static string TranslateOpenCv(OpenCvSharp.OpenCVException ex)
    {
        string what = ex.Status switch
        {
            OpenCvSharp.ErrorCode.StsNoMem => "the image library ran out of memory",
            OpenCvSharp.ErrorCode.StsOutOfRange or OpenCvSharp.ErrorCode.StsBadSize or OpenCvSharp.ErrorCode.StsBadArg => "an image or drawing size is outside what the image library accepts",
            _ => "the image library refused the input",
        };
        string reason = string.IsNullOrWhiteSpace(ex.ErrMsg) ? ex.Message : ex.ErrMsg;
        return what + " (" + reason.Trim() + (string.IsNullOrEmpty(ex.FuncName) ? string.Empty : " in " + ex.FuncName) + ")";
    }
}
