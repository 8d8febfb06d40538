using System.Reflection;
using System.Xml.Linq;
using LaneBaseline.Core.Options;
using LaneBaseline.Vision.Pipeline;
using Xunit;

namespace LaneBaseline.Vision.Tests.Pipeline;

/// <summary>Convention tests (DEVELOPERS.md, conventions): stage and options shapes the design relies on.</summary>
public sealed class ConventionTests
{
    [Fact]
    public void EveryStage_IsSealed_AndDisposable()
    {
        Type[] stages = typeof(IFrameStage).Assembly.GetTypes().Where(t => typeof(IFrameStage).IsAssignableFrom(t) && !t.IsInterface).ToArray();
        Assert.True(stages.Length >= 7);
        Assert.All(stages, t => Assert.True(t.IsSealed && typeof(IDisposable).IsAssignableFrom(t), t.Name));
    }

    [Fact]
    public void EveryOptionsProperty_DocumentsItsRangeAndDefault()
    {
        // Units in names and docs: each leaf option's XML summary states a valid range "(a–b)" or a boolean, and
        // its default, so configs/README.md and the presets can be checked against it.
        string xmlPath = Path.Combine(AppContext.BaseDirectory, "LaneBaseline.Core.xml");
        Assert.True(File.Exists(xmlPath), "the Core XML documentation file is not next to the tests");
        XDocument doc = XDocument.Load(xmlPath);
        var summaries = doc.Descendants("member").ToDictionary(m => (string)m.Attribute("name")!, m => m.Element("summary")?.Value ?? string.Empty);
        foreach (PropertyInfo section in typeof(PipelineOptions).GetProperties())
        {
            foreach (PropertyInfo p in section.PropertyType.GetProperties())
            {
                string key = "P:" + section.PropertyType.FullName + "." + p.Name;
                Assert.True(summaries.TryGetValue(key, out string? text), key + " has no summary");
                Assert.Contains("Default", text, StringComparison.Ordinal);
                if (p.PropertyType != typeof(bool))
                {
                    Assert.Matches(@"\([^)]*[0-9.]+–[0-9.]+", text);
                }
            }
        }
    }
}
