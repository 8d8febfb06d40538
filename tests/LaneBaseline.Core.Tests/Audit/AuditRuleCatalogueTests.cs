using System.Reflection;
using LaneBaseline.Core.Audit;
using LaneBaseline.Testing;
using Xunit;

namespace LaneBaseline.Core.Tests.Audit;

/// <summary>
/// The rule catalogue: every rule id constant is in <see cref="AuditRules.All"/> once, with a limit and a source, and
/// is documented in docs/audit.md (DEVELOPERS.md, "Adding an audit rule").
/// </summary>
public sealed class AuditRuleCatalogueTests
{
    private static readonly string[] Ids = [.. typeof(AuditRules).GetFields(BindingFlags.Public | BindingFlags.Static)
        .Where(f => f.IsLiteral && f.FieldType == typeof(string)).Select(f => (string)f.GetRawConstantValue()!)];

    [Fact]
    public void EveryRuleId_IsInTheCatalogueOnce_WithLimitAndSource()
    {
        Assert.NotEmpty(Ids);
        Assert.Equal(Ids.Order(StringComparer.Ordinal), AuditRules.All.Select(r => r.Id).Order(StringComparer.Ordinal));
        Assert.All(AuditRules.All, r =>
        {
            Assert.False(string.IsNullOrWhiteSpace(r.Limit), r.Id + " has no limit");
            Assert.False(string.IsNullOrWhiteSpace(r.Source), r.Id + " has no source");
        });
    }

    [Fact]
    public void EveryRule_IsDocumentedInAuditMd()
    {
        string doc = File.ReadAllText(RepoPaths.Combine("docs", "audit.md"));
        Assert.All(AuditRules.All, r => Assert.True(doc.Contains(r.Id, StringComparison.Ordinal), $"rule {r.Id} ({r.Name}) is missing from docs/audit.md"));
    }
}
