using System.CommandLine;
using System.CommandLine.Invocation;
using System.Reflection;

namespace LaneBaseline.Cli;

/// <summary>
/// <c>lanebaseline --version</c>: the package version and the commit it was built from. The SDK's Source Link appends
/// the commit of the build's git checkout to the informational version (<c>0.9.0+SHA</c>); a build outside git has none.
/// </summary>
internal sealed class VersionText : SynchronousCommandLineAction
{
    public override bool ClearsParseErrors => true;

    /// <summary>"lanebaseline VERSION (commit SHA)", or "(commit unknown)" for a build outside git.</summary>
    public static string Text
    {
        get
        {
            string info = typeof(VersionText).Assembly.GetCustomAttribute<AssemblyInformationalVersionAttribute>()?.InformationalVersion ?? "0.0.0";
            int plus = info.IndexOf('+', StringComparison.Ordinal);
            string version = plus < 0 ? info : info[..plus];
            string commit = plus < 0 ? "unknown" : info[(plus + 1)..];
            return "lanebaseline " + version + " (commit " + commit + ")";
        }
    }

    /// <summary>Makes the root's <c>--version</c> print <see cref="Text"/>.</summary>
    public static void Install(RootCommand root)
    {
        foreach (Option option in root.Options)
        {
            if (option is VersionOption version)
            {
                version.Action = new VersionText();
            }
        }
    }

    public override int Invoke(ParseResult parseResult)
    {
        parseResult.InvocationConfiguration.Output.WriteLine(Text);
        return 0;
    }
}
