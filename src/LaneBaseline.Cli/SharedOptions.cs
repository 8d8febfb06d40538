using System.CommandLine;
using System.CommandLine.Parsing;

namespace LaneBaseline.Cli;

/// <summary>
/// The option vocabulary every command shares, declared once: <c>-o, --output</c> for the main output,
/// <c>-j, --threads</c> with the number of cores as default, and <c>--frames</c> for frame inputs. Deprecated spellings
/// (<c>--out</c>, detect's positional FRAMES) keep working for one release with a <c>note:</c> on stderr.
/// </summary>
internal static class SharedOptions
{
    /// <summary>The main output: <c>-o, --output</c>; <c>-</c> writes to standard output where the output is one file.</summary>
    public static Option<string> Output(string description) => new("--output", "-o") { Description = description };

    /// <summary>The deprecated <c>--out</c> spelling of <c>--output</c> (hidden from help).</summary>
    public static Option<string> LegacyOut() => new("--out") { Description = "Deprecated spelling of -o/--output.", Hidden = true };

    /// <summary>Worker threads: <c>-j, --threads</c>, default the number of cores.</summary>
    public static Option<int> Threads(string description) =>
        new("--threads", "-j") { Description = description, DefaultValueFactory = _ => Environment.ProcessorCount };

    /// <summary>A frames input: <c>--frames</c>.</summary>
    public static Option<string> Frames(string description) => new("--frames") { Description = description };

    /// <summary>Adds <paramref name="legacy"/> to <paramref name="command"/> and, when <paramref name="required"/>, a check that one of the two is given.</summary>
    public static void AddOutput(Command command, Option<string> output, Option<string> legacy, bool required)
    {
        command.Options.Add(legacy);
        if (required)
        {
            command.Validators.Add(result =>
            {
                if (result.GetResult(output) is null && result.GetResult(legacy) is null)
                {
                    result.AddError("Option '--output' is required.");
                }
            });
        }
    }

    /// <summary>The main output path (from <c>-o/--output</c> or the deprecated <c>--out</c>, with a note), or null.</summary>
    public static string? GetOutput(ParseResult parse, Option<string> output, Option<string> legacy, TextWriter stderr)
    {
        string? modern = parse.GetValue(output);
        if (parse.GetResult(legacy) is null)
        {
            return modern;
        }

        if (modern is not null)
        {
            throw new UsageException("give -o/--output once (--out is its deprecated spelling)");
        }

        stderr.WriteLine(DeprecationLine("--out", "-o/--output"));
        return parse.GetValue(legacy);
    }

    /// <summary>A deprecated spelling of a renamed option, hidden from help; it still works for one release (see <see cref="GetRenamed{T}"/>).</summary>
    public static Option<T> Deprecated<T>(string name, string replacement)
    {
        Option<T> legacy = new(name) { Description = "Deprecated spelling of " + replacement + ".", Hidden = true };
        Replacements.Add(legacy, replacement);
        return legacy;
    }

    /// <summary>The name of the option that replaces a deprecated one made by <see cref="Deprecated{T}"/>, else null.</summary>
    public static string? ReplacementOf(Option option) => Replacements.TryGetValue(option, out string? r) ? r : null;

    private static readonly System.Runtime.CompilerServices.ConditionalWeakTable<Option, string> Replacements = new();

    /// <summary>The line printed on stderr when the deprecated <paramref name="old"/> is used instead of <paramref name="replacement"/>.</summary>
    public static string DeprecationLine(string old, string replacement) =>
        $"note: {old} is deprecated; use {replacement}; it will be removed in the next release";

    /// <summary>
    /// The value of a renamed option: from <paramref name="modern"/>, or from its deprecated spelling
    /// <paramref name="legacy"/> with one <c>note:</c> line on stderr; both given is a usage error.
    /// </summary>
    public static T? GetRenamed<T>(ParseResult parse, Option<T> modern, Option<T> legacy, TextWriter stderr)
    {
        if (parse.GetResult(legacy) is not { Implicit: false })
        {
            return parse.GetValue(modern);
        }

        if (parse.GetResult(modern) is { Implicit: false })
        {
            throw new UsageException($"give {modern.Name} once ({legacy.Name} is its deprecated spelling)");
        }

        string value = typeof(T) == typeof(string) ? " VALUE" : " N"; // every renamed option so far takes a number
        stderr.WriteLine(DeprecationLine(legacy.Name + value, modern.Name + value));
        return parse.GetValue(legacy);
    }

    /// <summary>Checks a thread count from <c>--threads</c>.</summary>
    public static int CheckThreads(int value) =>
        value is >= 1 and <= 256 ? value : throw new UsageException("--threads must be between 1 and 256");

    /// <summary>Names of options whose value <c>-</c> means standard output.</summary>
    public static readonly IReadOnlySet<string> StreamOutputs = new HashSet<string>(StringComparer.Ordinal)
    {
        "--output", "--out", "--json", "--csv", "--report", "--mask-iou-csv", "--partial",
    };

    /// <summary>Names of options and arguments whose value <c>-</c> means standard input.</summary>
    public static readonly IReadOnlySet<string> StreamInputs = new HashSet<string>(StringComparer.Ordinal)
    {
        "--truth", "--pred", "--baseline", "INPUT",
    };

    /// <summary>How many values of the parsed command are <c>-</c> as outputs and as inputs.</summary>
    public static (int Outputs, int Inputs) CountDashes(ParseResult parse)
    {
        int outputs = 0, inputs = 0;
        foreach (SymbolResult child in parse.CommandResult.Children)
        {
            string? name = child switch
            {
                OptionResult o => o.Option.Name,
                ArgumentResult a => a.Argument.Name,
                _ => null,
            };
            if (name is null)
            {
                continue;
            }

            int dashes = child.Tokens.Count(t => t.Type == TokenType.Argument && StandardStreams.IsDash(Value(t.Value)));
            if (StreamOutputs.Contains(name))
            {
                outputs += dashes;
            }
            else if (StreamInputs.Contains(name))
            {
                inputs += dashes;
            }
        }

        return (outputs, inputs);
    }

    // --pred NAME=- names a system read from standard input.
    private static string Value(string token)
    {
        int eq = token.IndexOf('=', StringComparison.Ordinal);
        return eq > 0 && token[..eq].IndexOfAny(['/', '\\']) < 0 ? token[(eq + 1)..] : token;
    }
}
