using System.Reflection;
using System.Text.RegularExpressions;
using LaneBaseline.Core.Audit;
using LaneBaseline.Testing;
using Xunit;

namespace LaneBaseline.Core.Tests.Audit;

/// <summary>
/// The rule catalogue (DEVELOPERS.md, "Adding an audit rule"): every rule class is in
/// <see cref="AuditRuleCatalogue.Rules"/> once, every id constant of <see cref="AuditRules"/> belongs to exactly one
/// rule, every rule has a limit and a source and its family matches its id, and the rules table of docs/audit.md lists
/// exactly the catalogue's ids — a rule in the catalogue but not in the docs fails, and so does a documented rule that
/// does not run.
/// </summary>
public sealed partial class AuditRuleCatalogueTests
{
    private static readonly string[] Ids = [.. typeof(AuditRules).GetFields(BindingFlags.Public | BindingFlags.Static)
        .Where(f => f.IsLiteral && f.FieldType == typeof(string)).Select(f => (string)f.GetRawConstantValue()!)];

    [Fact]
    public void EveryRuleId_IsInTheCatalogueOnce_WithLimitAndSource()
    {
        Assert.NotEmpty(Ids);
        Assert.Equal(Ids.Order(StringComparer.Ordinal), AuditRuleCatalogue.Rules.Select(r => r.Info.Id).Order(StringComparer.Ordinal));
        Assert.Equal(AuditRuleCatalogue.Rules.Select(r => r.Info), AuditRules.All);
        Assert.All(AuditRules.All, r =>
        {
            Assert.False(string.IsNullOrWhiteSpace(r.Limit), r.Id + " has no limit");
            Assert.False(string.IsNullOrWhiteSpace(r.Source), r.Id + " has no source");
            Assert.Matches("^[a-z]+(-[a-z]+)*$", r.Name);
        });
    }

    [Fact]
    public void EveryRuleClass_IsInTheCatalogue_OnceAndInItsFamily()
    {
        Type[] classes = [.. typeof(IAuditRule).Assembly.GetTypes().Where(t => typeof(IAuditRule).IsAssignableFrom(t) && !t.IsInterface && !t.IsAbstract)];
        Assert.Equal(classes.Select(t => t.FullName).Order(StringComparer.Ordinal), AuditRuleCatalogue.Rules.Select(r => r.GetType().FullName).Order(StringComparer.Ordinal));
        Assert.All(AuditRuleCatalogue.Rules, r => Assert.Equal(
            r.Info.Id[4] switch { 'I' => AuditRuleFamily.Image, 'G' => AuditRuleFamily.Ground, 'T' => AuditRuleFamily.Temporal, _ => AuditRuleFamily.Baseline },
            r.Family));
    }

    [Fact]
    public void TheRulesTableOfAuditMd_ListsExactlyTheCatalogue()
    {
        string doc = File.ReadAllText(RepoPaths.Combine("docs", "audit.md"));
        string[] documented = [.. TableRow().Matches(doc).Select(m => m.Groups[1].Value)];
        Assert.Equal(documented.Distinct(), documented); // each rule documented once
        foreach (IAuditRule rule in AuditRuleCatalogue.Rules)
        {
            Assert.True(documented.Contains(rule.Info.Id), $"rule {rule.Info.Id} ({rule.Info.Name}, {rule.GetType().Name}) is missing from the rules table of docs/audit.md");
        }

        foreach (string id in documented)
        {
            Assert.True(AuditRuleCatalogue.Rules.Any(r => r.Info.Id == id), $"docs/audit.md documents {id}, which is not in AuditRuleCatalogue.Rules");
        }
    }

    // A row of the rules table: "| LBA-I01 | lanes-cross | error | ...".
    [GeneratedRegex(@"^\| (LBA-[A-Z]\d\d) \|", RegexOptions.Multiline)]
    private static partial Regex TableRow();
}
