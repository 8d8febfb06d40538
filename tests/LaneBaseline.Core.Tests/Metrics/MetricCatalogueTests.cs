using System.Text.RegularExpressions;
using LaneBaseline.Core.Metrics;
using LaneBaseline.Testing;
using Xunit;

namespace LaneBaseline.Core.Tests.Metrics;

/// <summary>
/// The metric catalogue (DEVELOPERS.md, "Adding a metric"): every unit of <see cref="MetricCatalogue.Units"/> is
/// described in docs/metrics.md section 8 and has its folder under src/LaneBaseline.Core/Metrics, and the table and the
/// folders name no unit the catalogue lacks.
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

    private static string[] CatalogueUnits() => [.. MetricCatalogue.Units.Select(u => u.Name).Order(StringComparer.Ordinal)];

    [Fact]
    public void EveryCatalogueUnit_IsDocumented()
    {
        string[] documented = DocumentedUnits();
        foreach (string unit in CatalogueUnits())
        {
            Assert.True(documented.Contains(unit), $"metric unit {unit} is in MetricCatalogue but not in docs/metrics.md section 8: add a row naming its per-frame, tally, JSON and shard state parts");
        }
    }

    [Fact]
    public void EveryDocumentedUnit_IsInTheCatalogue()
    {
        string[] units = CatalogueUnits();
        string[] documented = DocumentedUnits();
        Assert.NotEmpty(documented);
        foreach (string unit in documented)
        {
            Assert.True(units.Contains(unit), $"docs/metrics.md section 8 names Metrics/{unit}/, which is not in MetricCatalogue.Units");
        }
    }

    [Fact]
    public void EveryUnitFolder_IsInTheCatalogue_AndEveryUnitHasItsFolder()
    {
        // A unit's folder and namespace carry its name (LaneBaseline.Core.Metrics.<Name>).
        string[] folders = UnitFolders();
        foreach (IMetricUnit unit in MetricCatalogue.Units)
        {
            Assert.True(folders.Contains(unit.Name), $"metric unit {unit.Name} has no folder src/LaneBaseline.Core/Metrics/{unit.Name}/");
            Assert.Equal("LaneBaseline.Core.Metrics." + unit.Name, unit.GetType().Namespace);
        }

        string[] units = CatalogueUnits();
        foreach (string folder in folders)
        {
            Assert.True(units.Contains(folder), $"src/LaneBaseline.Core/Metrics/{folder}/ holds no unit of MetricCatalogue.Units");
        }
    }

    [Fact]
    public void JsonKeys_AreDistinct()
    {
        // Two units writing the same key would repeat a name in one object. Source: RFC 8259, Sec. 4 ("The names within an object SHOULD be unique").
        string[] keys = [.. MetricCatalogue.Units.Select(u => u.JsonKey)];
        Assert.Equal(keys.Length, keys.Distinct(StringComparer.Ordinal).Count());
    }

    // A table row starts with the unit's folder in backticks.
    [GeneratedRegex(@"^\| `Metrics/([A-Za-z]+)/` \|", RegexOptions.Multiline)]
    private static partial Regex UnitRow();
}
