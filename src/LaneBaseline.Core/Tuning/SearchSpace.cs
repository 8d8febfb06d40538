using System.Globalization;
using YamlDotNet.Core;
using YamlDotNet.RepresentationModel;

namespace LaneBaseline.Core.Tuning;

/// <summary>
/// The declared ranges a tuning run searches. YAML:
/// <code>
/// parameters:
///   - key: canny.lowThreshold
///     min: 10
///     max: 120
///     type: int        # int | float (default float)
///     scale: linear    # linear | log (default linear)
/// </code>
/// </summary>
public sealed class SearchSpace
{
    /// <summary>Creates a space from parameters (keys must be distinct).</summary>
    public SearchSpace(IReadOnlyList<TuneParameter> parameters)
    {
        ArgumentNullException.ThrowIfNull(parameters);
        if (parameters.Count == 0)
        {
            throw new ArgumentException("a search space needs at least one parameter", nameof(parameters));
        }

        Parameters = parameters;
    }

    /// <summary>The parameters, in declaration order.</summary>
    public IReadOnlyList<TuneParameter> Parameters { get; }

    /// <summary>Parses a search-space YAML text; errors name the file and line.</summary>
    public static SearchSpace Parse(string yaml, string fileName)
    {
        ArgumentNullException.ThrowIfNull(yaml);
        Options.YamlDepth.Check(yaml, fileName);
        var stream = new YamlStream();
        try
        {
            using var reader = new StringReader(yaml);
            stream.Load(reader);
        }
        catch (YamlException ex)
        {
            throw BadInputException.At(fileName, ex.Start.Line, null, "invalid YAML: " + (ex.InnerException?.Message ?? ex.Message));
        }
        catch (Exception ex) when (ex is InvalidOperationException or ArgumentException)
        {
            // YamlDotNet's scanner and loader throw these on some malformed input (found by fuzzing).
            throw BadInputException.At(fileName, 0, null, "invalid YAML");
        }

        if (stream.Documents.Count == 0 || stream.Documents[0].RootNode is not YamlMappingNode root)
        {
            throw BadInputException.At(fileName, 1, null, "expected a mapping with a 'parameters' list");
        }

        var list = new List<TuneParameter>();
        foreach (KeyValuePair<YamlNode, YamlNode> kv in root.Children)
        {
            string key = ((YamlScalarNode)kv.Key).Value ?? string.Empty;
            if (key != "parameters")
            {
                throw BadInputException.At(fileName, kv.Key.Start.Line, key, "unknown key (expected 'parameters')");
            }

            if (kv.Value is not YamlSequenceNode seq)
            {
                throw BadInputException.At(fileName, kv.Value.Start.Line, "parameters", "expected a list");
            }

            foreach (YamlNode item in seq)
            {
                list.Add(ParseParameter(item, fileName));
            }
        }

        if (list.Count == 0)
        {
            throw BadInputException.At(fileName, 1, "parameters", "no parameters declared");
        }

        var dup = list.GroupBy(p => p.Key, StringComparer.Ordinal).FirstOrDefault(g => g.Count() > 1);
        if (dup is not null)
        {
            throw BadInputException.At(fileName, 1, dup.Key, "declared twice");
        }

        return new SearchSpace(list);
    }

    /// <summary>Loads a search-space file.</summary>
    public static SearchSpace Load(string path)
    {
        if (!File.Exists(path))
        {
            throw BadInputException.At(path, 0, null, "file not found");
        }

        return Parse(File.ReadAllText(path), path);
    }

    private static TuneParameter ParseParameter(YamlNode node, string file)
    {
        long line = node.Start.Line;
        if (node is not YamlMappingNode map)
        {
            throw BadInputException.At(file, line, "parameters", "each parameter is a mapping with key, min, max");
        }

        string? key = null, type = "float", scale = "linear";
        double? min = null, max = null;
        foreach (KeyValuePair<YamlNode, YamlNode> kv in map.Children)
        {
            string name = ((YamlScalarNode)kv.Key).Value ?? string.Empty;
            string value = (kv.Value as YamlScalarNode)?.Value ?? string.Empty;
            long at = kv.Key.Start.Line;
            switch (name)
            {
                case "key": key = value; break;
                case "min": min = Number(file, at, name, value); break;
                case "max": max = Number(file, at, name, value); break;
                case "type": type = value; break;
                case "scale": scale = value; break;
                default: throw BadInputException.At(file, at, name, "unknown key (expected key, min, max, type, scale)");
            }
        }

        if (string.IsNullOrEmpty(key) || min is null || max is null)
        {
            throw BadInputException.At(file, line, key ?? "key", "a parameter needs key, min and max");
        }

        if (type is not ("int" or "float"))
        {
            throw BadInputException.At(file, line, key + ".type", "must be int or float");
        }

        if (scale is not ("linear" or "log"))
        {
            throw BadInputException.At(file, line, key + ".scale", "must be linear or log");
        }

        if (!(min <= max) || (scale == "log" && min <= 0))
        {
            throw BadInputException.At(file, line, key, "needs min <= max (and min > 0 on a log scale)");
        }

        return new TuneParameter(key, min.Value, max.Value, WholeNumbers: type == "int", Log: scale == "log");
    }

    private static double Number(string file, long line, string key, string text) =>
        double.TryParse(text, NumberStyles.Float, CultureInfo.InvariantCulture, out double v) && double.IsFinite(v)
            ? v
            : throw BadInputException.At(file, line, key, $"'{text}' is not a number");
}
