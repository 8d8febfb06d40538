using LaneBaseline.Core.Audit;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Metrics;
using LaneBaseline.Testing;

namespace LaneBaseline.Core.Tests.Audit;

internal static class AuditHelpers
{
    public static AuditResult Run(IEnumerable<LaneRecord> records, AuditSettings? settings = null, int threads = 1)
    {
        using var dir = new TempDir();
        string path = dir.File("p.lanes.jsonl");
        Lanes.WriteFile(path, records);
        return new AuditRun(settings ?? new AuditSettings()) { Threads = threads }.Execute(path, null, () => throw new InvalidOperationException("no baseline"));
    }

    public static List<AuditFinding> Check(LaneRecord record, AuditSettings? settings = null)
    {
        var sink = new List<AuditFinding>();
        AuditRuleCatalogue.Check(new AuditFrame(record, 0, record.Width!.Value, record.Height!.Value, settings ?? new AuditSettings()), AuditRuleFamily.Image, sink);
        return sink;
    }

    public static LaneRecord With(LaneRecord r, IReadOnlyList<Lane> lanes) =>
        new() { Frame = r.Frame, Width = r.Width, Height = r.Height, Tags = r.Tags, Lanes = lanes };

    public static int IndexOfSlot(LaneRecord r, int slot) => r.Lanes.ToList().FindIndex(l => l.Slot == slot);
}
