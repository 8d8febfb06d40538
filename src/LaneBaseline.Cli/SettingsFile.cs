using System.CommandLine;
using System.CommandLine.Parsing;
using LaneBaseline.Core;
using YamlDotNet.Core;
using YamlDotNet.RepresentationModel;

namespace LaneBaseline.Cli;

/// <summary>
/// <c>score --config FILE.yaml</c> and <c>audit --config FILE.yaml</c>: settings from a YAML mapping whose keys are the
/// command's long option names without the dashes (<c>bootstrap: 200</c>, <c>iou: [0.4, 0.6]</c>, <c>fail-on: error</c>;
/// <c>_</c> may stand for <c>-</c>). Options given on the command line win. Inputs and outputs are not settings. Every
/// problem of the file (unknown key, wrong value) is listed at once, one <c>FILE:LINE: key: problem</c> line each.
/// </summary>
internal static class SettingsFile
{
    /// <summary>The commands that read settings files.</summary>
    public static readonly IReadOnlySet<string> Commands = new HashSet<string>(StringComparer.Ordinal) { "score", "audit" };

    private static readonly HashSet<string> NotSettings = new(StringComparer.Ordinal)
    {
        "--config", "--truth", "--pred", "--baseline", "--json", "--csv", "--output", "--out", "--report", "--partial",
        "--mask-iou-csv", "--frames", "--shard", "--generated-at", "--help", "--camera",
    };

    /// <summary>The option that names the settings file.</summary>
    public static Option<string> Option() => new("--config")
    {
        Description = "YAML file of settings: keys are this command's long option names without the dashes (e.g. bootstrap: 200); options on the command line win.",
    };

    /// <summary>
    /// <paramref name="args"/> with the settings of the <c>--config</c> file added as options (when the command reads
    /// one and it is given), or <paramref name="args"/> unchanged.
    /// </summary>
    /// <exception cref="BadInputException">The file is missing, not YAML, or has unknown keys or bad values (all listed).</exception>
    public static string[] Expand(RootCommand root, string[] args)
    {
        ParseResult first = root.Parse(args);
        Command command = first.CommandResult.Command;
        if (!Commands.Contains(command.Name) || command.Options.FirstOrDefault(o => o.Name == "--config") is not Option config
            || first.GetResult(config) is not { Tokens.Count: > 0 } given)
        {
            return args;
        }

        string path = given.Tokens[0].Value;
        YamlMappingNode map = Load(path);
        var errors = new List<string>();
        var added = new List<string>();
        var seen = new HashSet<string>(StringComparer.Ordinal);
        foreach ((YamlNode keyNode, YamlNode valueNode) in map.Children)
        {
            string key = (keyNode as YamlScalarNode)?.Value ?? string.Empty;
            long line = keyNode.Start.Line;
            string name = "--" + key.Replace('_', '-');
            // A deprecated spelling (hidden) still works for one release, with its deprecation line.
            Option? option = command.Options.FirstOrDefault(o => o.Name == name && (!o.Hidden || SharedOptions.ReplacementOf(o) is not null));
            if (option is null || NotSettings.Contains(name))
            {
                string known = string.Join(", ", command.Options.Where(o => !o.Hidden && !NotSettings.Contains(o.Name)).Select(o => o.Name[2..]));
                errors.Add(BadInputException.At(path, line, key, option is null ? $"unknown setting (known: {known})" : "an input or output, not a setting; give it on the command line").Message);
                continue;
            }

            if (!seen.Add(name))
            {
                errors.Add(BadInputException.At(path, line, key, "given twice").Message);
                continue;
            }

            // (an old and a new spelling of one setting count as one option here)
            if (command.Options.Any(o => (o == option || SharedOptions.ReplacementOf(o) == option.Name || SharedOptions.ReplacementOf(option) == o.Name) && first.GetResult(o) is { Implicit: false }))
            {
                continue; // the command line wins
            }

            List<string> tokens = Tokens(option, valueNode, path, key, errors);
            if (tokens.Count == 0)
            {
                continue;
            }

            // Each setting is checked by the command's own parser, so types and choices follow the options exactly.
            ParseResult alone = root.Parse([.. args, .. tokens]);
            string[] problems = [.. alone.Errors.Select(e => e.Message).Except(first.Errors.Select(e => e.Message))];
            if (problems.Length > 0)
            {
                errors.AddRange(problems.Select(p => BadInputException.At(path, valueNode.Start.Line, key, p).Message));
                continue;
            }

            added.AddRange(tokens);
        }

        if (errors.Count > 0)
        {
            throw BadInputException.Several(errors);
        }

        return [.. args, .. added];
    }

    private static List<string> Tokens(Option option, YamlNode value, string path, string key, List<string> errors)
    {
        var tokens = new List<string>();
        if (option.ValueType == typeof(bool))
        {
            string text = (value as YamlScalarNode)?.Value ?? string.Empty;
            if (text is "true" or "false")
            {
                if (text == "true")
                {
                    tokens.Add(option.Name);
                }
            }
            else
            {
                errors.Add(BadInputException.At(path, value.Start.Line, key, $"'{text}' is not true or false").Message);
            }

            return tokens;
        }

        IEnumerable<YamlNode> items = value is YamlSequenceNode list ? list.Children : [value];
        if (value is YamlSequenceNode && !option.ValueType.IsArray)
        {
            errors.Add(BadInputException.At(path, value.Start.Line, key, "takes one value, not a list").Message);
            return tokens;
        }

        foreach (YamlNode item in items)
        {
            if (item is not YamlScalarNode { Value: string text } || text.Length == 0)
            {
                errors.Add(BadInputException.At(path, item.Start.Line, key, "expected a value").Message);
                return [];
            }

            tokens.Add(option.Name);
            tokens.Add(text);
        }

        return tokens;
    }

    private static YamlMappingNode Load(string path)
    {
        string text;
        try
        {
            text = File.ReadAllText(path);
        }
        catch (Exception ex) when (ex is IOException or UnauthorizedAccessException)
        {
            throw BadInputException.At(path, 0, null, "cannot read the settings: " + ex.Message);
        }

        LaneBaseline.Core.Options.YamlDepth.Check(text, path); // the loader below recurses once per level
        var stream = new YamlStream();
        try
        {
            using var reader = new StringReader(text);
            stream.Load(reader);
        }
        catch (YamlException ex)
        {
            throw BadInputException.At(path, ex.Start.Line, null, ex.InnerException?.Message ?? ex.Message);
        }
        catch (Exception ex) when (ex is InvalidOperationException or ArgumentException)
        {
            throw BadInputException.At(path, 0, null, "invalid YAML");
        }

        YamlNode? root = stream.Documents.Count == 0 ? null : stream.Documents[0].RootNode;
        return root switch
        {
            YamlMappingNode map => map,
            null => new YamlMappingNode(),
            YamlScalarNode { Value: null or "" or "~" or "null" } => new YamlMappingNode(),
            _ => throw BadInputException.At(path, root.Start.Line, null, "expected a mapping of setting names to values"),
        };
    }
}
