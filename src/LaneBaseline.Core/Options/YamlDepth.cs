using System.Globalization;
using YamlDotNet.Core;
using YamlDotNet.Core.Events;

namespace LaneBaseline.Core.Options;

/// <summary>
/// Refuses YAML nested deeper than <see cref="InputLimits.MaxYamlDepth"/> before it is loaded: the node loader recurses
/// once per level, and 20,000 levels overflowed the stack (which ends the process, beyond any error handling).
/// </summary>
public static class YamlDepth
{
    /// <summary>Streams the parser's events (no recursion) and throws at the first collection nested too deep.</summary>
    /// <exception cref="BadInputException">The text nests collections more than <see cref="InputLimits.MaxYamlDepth"/> deep.</exception>
    public static void Check(string yaml, string file)
    {
        ArgumentNullException.ThrowIfNull(yaml);
        using var reader = new StringReader(yaml);
        var parser = new Parser(reader);
        int depth = 0;
        try
        {
            while (parser.MoveNext())
            {
                switch (parser.Current)
                {
                    case MappingStart or SequenceStart:
                        if (++depth > InputLimits.MaxYamlDepth)
                        {
                            throw BadInputException.At(file, parser.Current.Start.Line, null, string.Create(
                                CultureInfo.InvariantCulture,
                                $"the YAML nests more than {InputLimits.MaxYamlDepth} levels deep (the documented limit)"));
                        }

                        break;
                    case MappingEnd or SequenceEnd:
                        depth--;
                        break;
                }
            }
        }
        catch (YamlException)
        {
            // malformed YAML: the loader that runs next reports it with its line
        }
        catch (Exception ex) when (ex is InvalidOperationException or ArgumentException)
        {
            // the same, for the exceptions YamlDotNet's scanner throws on some malformed input
        }
    }
}
