using System.CommandLine;
using System.CommandLine.Help;
using System.CommandLine.Invocation;

namespace LaneBaseline.Cli;

/// <summary>
/// Real examples printed at the end of each command's <c>--help</c> (1-3 per command; the help test runs each of them
/// through the parser, so an example cannot drift from the options).
/// </summary>
internal static class HelpExamples
{
    /// <summary>Examples by command name (the root command is "lanebaseline").</summary>
    public static readonly IReadOnlyDictionary<string, string[]> ByCommand = new Dictionary<string, string[]>(StringComparer.Ordinal)
    {
        ["lanebaseline"] =
        [
            "lanebaseline render -o scenes --count 20",
            "lanebaseline detect --frames scenes -o baseline.lanes.jsonl",
            "lanebaseline score --truth scenes/truth.lanes.jsonl --pred baseline.lanes.jsonl",
        ],
        ["detect"] =
        [
            "lanebaseline detect --frames sample-frames -o baseline.lanes.jsonl",
            "lanebaseline detect --frames drive.mp4 -o drive.lanes.jsonl --config low-light --overlays overlays",
            "lanebaseline detect --frames sample-frames -o - | lanebaseline score --truth sample-frames/truth.lanes.jsonl --pred -",
        ],
        ["score"] =
        [
            "lanebaseline score --truth truth.lanes.jsonl --pred baseline.lanes.jsonl",
            "lanebaseline score --truth truth.lanes.jsonl --pred baseline=baseline.lanes.jsonl --pred net=net.lanes.jsonl --json score.json --min-f1 0.6",
            "lanebaseline score --truth truth.lanes.jsonl --pred net.lanes.jsonl --json - | jq .iou_f1.mf1",
        ],
        ["audit"] =
        [
            "lanebaseline audit --pred net.lanes.jsonl -o findings.jsonl",
            "lanebaseline audit --pred net.lanes.jsonl --baseline baseline.lanes.jsonl -o findings.jsonl --mine 50 --fail-on error",
        ],
        ["tune"] =
        [
            "lanebaseline tune --frames scenes --truth scenes/truth.lanes.jsonl -o tuned.yaml",
            "lanebaseline tune --calibrate --frames scenes --truth scenes/truth.lanes.jsonl -o calibrated.yaml",
        ],
        ["convert"] =
        [
            "lanebaseline convert truth.lanes.jsonl -o masks/",
            "lanebaseline convert masks/ -o truth.json --to openlabel --reference truth.lanes.jsonl",
        ],
        ["render"] =
        [
            "lanebaseline render -o scenes --count 20 --seed 7",
            "lanebaseline render -o night-sweep --sweep night --count 4",
        ],
        ["report"] =
        [
            "lanebaseline report --score score.json -o report.html",
            "lanebaseline report --score score.json --audit findings.jsonl -o report.html --frames scenes --truth scenes/truth.lanes.jsonl --pred baseline.lanes.jsonl",
        ],
        ["merge"] =
        [
            "lanebaseline merge part0.lanes.jsonl part1.lanes.jsonl -o all.lanes.jsonl",
            "lanebaseline merge score0.state score1.state -o score.json --csv frames.csv",
        ],
        ["bench"] =
        [
            "lanebaseline bench --size 1280x720 -j 1",
            "lanebaseline bench --frames sample-frames --size 1280x720,640x360 --json bench.json",
        ],
    };

    /// <summary>Makes the help option of <paramref name="root"/> (shared by every command) end with the examples.</summary>
    public static void Install(RootCommand root)
    {
        foreach (Option option in root.Options)
        {
            if (option is HelpOption help && help.Action is HelpAction inner)
            {
                help.Action = new WithExamples(inner);
            }
        }
    }

    private sealed class WithExamples(HelpAction inner) : SynchronousCommandLineAction
    {
        public override bool ClearsParseErrors => true;

        public override int Invoke(ParseResult parseResult)
        {
            int exit = inner.Invoke(parseResult);
            Command command = parseResult.CommandResult.Command;
            string key = command is RootCommand ? "lanebaseline" : command.Name;
            if (ByCommand.TryGetValue(key, out string[]? examples))
            {
                TextWriter o = parseResult.InvocationConfiguration.Output;
                o.WriteLine("Examples:");
                foreach (string e in examples)
                {
                    o.WriteLine("  " + e);
                }

                o.WriteLine();
            }

            return exit;
        }
    }
}
