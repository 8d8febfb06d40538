using System.Globalization;
using System.Text.Json;
using LaneBaseline.Core;

namespace LaneBaseline.Reporting.Bench;

/// <summary>What the report shows of a bench run.</summary>
/// <param name="Source">The JSON file as the user named it.</param>
/// <param name="Machine">One line describing the machine and the OpenCV build.</param>
/// <param name="Runs">The measured configurations, in file order.</param>
public sealed record BenchSummary(string Source, string Machine, IReadOnlyList<BenchRun> Runs);
