using System.Text.RegularExpressions;
using LaneBaseline.Testing;
using Xunit;

namespace LaneBaseline.Core.Tests.Metrics;

/// <summary>
/// The metric catalogue (DEVELOPERS.md, "Adding a metric"): every metric unit folder under
/// src/LaneBaseline.Core/Metrics is described in docs/metrics.md section 8, and the table names no folder that is gone.
/// </summary>
public sealed partial class MetricCatalogueTests
{
    private static string[] UnitFolders() =>
        [.. Directory.GetDirectories(RepoPaths.Combine("src", "LaneBaseline.Core", "Metrics"))
            .Select(Path.GetFileName)
            .Where(n => n is not (null or "bin" or "obj"))
            .Select(n => n!)
            .Order(StringComparer.Ordinal)];

    private static string[] DocumentedUnits()
    {
        string doc = File.ReadAllText(RepoPaths.Combine("docs", "metrics.md"));
        int at = doc.IndexOf("## 8. Where each metric lives in the code", StringComparison.Ordinal);
        Assert.True(at >= 0, "docs/metrics.md lost its section 8 (the metric catalogue)");
        return [.. UnitRow().Matches(doc[at..]).Select(m => m.Groups[1].Value).Order(StringComparer.Ordinal)];
    }

    [Fact]
    public void EveryUnitFolder_IsDocumented()
    {
        string[] documented = DocumentedUnits();
        foreach (string folder in UnitFolders())
        {
            Assert.True(documented.Contains(folder), $"src/LaneBaseline.Core/Metrics/{folder}/ is not in docs/metrics.md section 8: add a row naming its per-frame, tally, JSON and shard state parts");
        }
    }

    [Fact]
    public void EveryDocumentedUnit_Exists()
    {
        string[] folders = UnitFolders();
        string[] documented = DocumentedUnits();
        Assert.NotEmpty(documented);
        foreach (string unit in documented)
        {
            Assert.True(folders.Contains(unit), $"docs/metrics.md names Metrics/{unit}/, which does not exist");
        }
    }

    // A table row starts with the unit's folder in backticks.
    [GeneratedRegex(@"^\| `Metrics/([A-Za-z]+)/` \|", RegexOptions.Multiline)]
    private static partial Regex UnitRow();
}
