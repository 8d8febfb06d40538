using System.Globalization;
using System.Text;
using LaneBaseline.Reporting.Audit;

namespace LaneBaseline.Reporting;

// The page sections of other inputs: bench summary, audit findings, configuration and versions.
public static partial class HtmlReportWriter
{
    private static void WriteBench(StringBuilder h, Bench.BenchSummary bench)
    {
        h.Append("<section id=\"bench\">\n<h2>Cost per stage</h2>\n<p>From <code>").Append(E(bench.Source)).Append("</code> (")
         .Append(E(bench.Machine)).Append("). Medians after warm-up; the floor is the bare OpenCV primitives the pipeline needs, measured on the same frames in alternation; decode time is excluded.</p>\n");
        h.Append("<figure class=\"chart\" id=\"chart-bench\">").Append(Charts.StageBars(bench.Runs, "c6")).Append("<figcaption>Median milliseconds per stage, one bar per measured configuration.</figcaption></figure>\n");
        h.Append("<div class=\"scroll\"><table id=\"bench-table\">\n<thead><tr><th>Configuration</th><th>Frame median ms</th><th>Frame p95 ms</th><th>Floor median ms</th><th>Pipeline/floor</th><th>Frames/s</th><th>Managed bytes/frame</th></tr></thead>\n<tbody>\n");
        foreach (Bench.BenchRun r in bench.Runs)
        {
            h.Append("<tr><th scope=\"row\">").Append(E(r.Label)).Append("</th>")
             .Append(string.Create(CultureInfo.InvariantCulture, $"<td>{r.FrameMedianMs:0.00}</td><td>{r.FrameP95Ms:0.00}</td><td>{r.FloorMedianMs:0.00}</td><td>{r.Ratio:0.00}</td><td>{r.FramesPerSecond:0.0}</td><td>{r.BytesPerFrame:0}</td></tr>\n"));
        }

        h.Append("</tbody>\n</table></div>\n</section>\n");
    }

    private static void WriteAudit(StringBuilder h, AuditSummary? audit)
    {
        h.Append("<section id=\"audit\">\n<h2>Audit findings</h2>\n");
        if (audit is null)
        {
            h.Append("<p class=\"empty\">Not requested: pass <code>--audit FINDINGS.jsonl</code> (the output of <code>audit</code>) to show findings by rule.</p>\n</section>\n");
            return;
        }

        h.Append("<p>").Append(Count(audit.Findings, "finding")).Append(" on ").Append(Count(audit.FlaggedFrames, "frame"))
         .Append(" from <code>").Append(E(audit.Source)).Append("</code>. The audit checks predicted lanes without truth (docs/audit.md lists each rule and where its limit comes from).</p>\n");
        h.Append("<figure class=\"chart\" id=\"chart-audit\">").Append(Charts.AuditRuleBars(audit.Rules, "c5")).Append("<figcaption>Findings per rule, coloured by severity.</figcaption></figure>\n");
        h.Append("<div class=\"scroll\"><table id=\"audit-rules-table\">\n<thead><tr><th>Rule</th><th>Name</th><th>Severity</th><th>Findings</th><th>Frames</th></tr></thead>\n<tbody>\n");
        foreach (AuditRuleCount r in audit.Rules)
        {
            h.Append("<tr data-rule=\"").Append(E(r.Id)).Append("\"><th scope=\"row\">").Append(E(r.Id)).Append("</th><td class=\"t\">").Append(E(r.Name))
             .Append("</td><td class=\"t\"><span class=\"swatch\" style=\"background:").Append(Charts.SeverityColor(r.Severity)).Append("\"></span>").Append(E(r.Severity)).Append("</td>")
             .Append(Td("findings", r.Findings)).Append(Td("frames", r.Frames)).Append("</tr>\n");
        }

        h.Append("</tbody>\n</table></div>\n");
        if (audit.Top.Count == 0)
        {
            h.Append("<p class=\"empty\">No findings: every audited frame passed every rule that ran.</p>\n</section>\n");
            return;
        }

        if (audit.Thumbnails.Count > 0)
        {
            h.Append("<h3>Worst frames drawn</h3>\n<p>The overlays <code>audit --overlay-count</code> wrote, worst frame first: the audited lanes with their findings drawn (docs/audit.md, <code>--overlay-count</code>). Click a picture for the full-size file.</p>\n<div class=\"gallery\" id=\"audit-thumbs\">\n");
            foreach (AuditThumbnail t in audit.Thumbnails)
            {
                string img = "<img alt=\"" + E(t.Frame) + " with its audit findings drawn\" width=\"" + I(t.Width) + "\" height=\"" + I(t.Height)
                    + "\" src=\"data:image/jpeg;base64," + Convert.ToBase64String(t.Jpeg.Span) + "\">";
                int n = audit.Top.Count(f => f.Frame == t.Frame);
                h.Append("<figure class=\"thumb\" data-frame=\"").Append(E(t.Frame)).Append("\">")
                 .Append(t.Href is null ? img : "<a href=\"" + E(t.Href) + "\">" + img + "</a>")
                 .Append("<figcaption>").Append(I(t.Rank)).Append(". <code>").Append(E(t.Frame)).Append("</code>: ").Append(Count(n, "finding")).Append("</figcaption></figure>\n");
            }

            h.Append("</div>\n");
        }

        // Every finding (up to the reader's bound), grouped by frame in rank order (worst frames first); the first
        // frames are open, the rest fold away so a long audit stays readable.
        var groups = new List<(string Frame, List<AuditTopFinding> Items)>();
        var index = new Dictionary<string, int>(StringComparer.Ordinal);
        foreach (AuditTopFinding f in audit.Top)
        {
            if (!index.TryGetValue(f.Frame, out int g))
            {
                g = groups.Count;
                index[f.Frame] = g;
                groups.Add((f.Frame, []));
            }

            groups[g].Items.Add(f);
        }

        h.Append("<h3>Findings by frame (worst frames first)</h3>\n<p>")
         .Append(audit.Top.Count < audit.Findings
            ? "The first " + Count(audit.Top.Count, "finding") + " of " + Count(audit.Findings, "finding") + ", on " + Count(groups.Count, "frame") + "; the findings file holds the rest."
            : "All " + Count(audit.Findings, "finding") + ", on " + Count(groups.Count, "frame") + ".")
         .Append(" The first ").Append(I(Math.Min(AuditOpenFrames, groups.Count))).Append(" frames are open; click a frame to open or close it.</p>\n<div id=\"audit-frames\">\n");
        for (int g = 0; g < groups.Count; g++)
        {
            (string frame, List<AuditTopFinding> items) = groups[g];
            int errors = items.Count(f => f.Severity == "error");
            h.Append("<details class=\"audit-frame\" data-frame=\"").Append(E(frame)).Append('"').Append(g < AuditOpenFrames ? " open" : string.Empty).Append("><summary><code>")
             .Append(E(frame)).Append("</code>: ").Append(Count(items.Count, "finding")).Append(errors > 0 ? ", " + Count(errors, "error") : string.Empty).Append("</summary>\n");
            h.Append("<div class=\"scroll\"><table class=\"audit-frame-table\">\n<thead><tr><th>Rank</th><th>Rule</th><th>Severity</th><th>Lane</th><th>Value</th><th>Limit</th><th>Unit</th><th>Message</th></tr></thead>\n<tbody>\n");
            foreach (AuditTopFinding f in items)
            {
                h.Append("<tr data-rule=\"").Append(E(f.Rule)).Append("\" data-frame=\"").Append(E(f.Frame)).Append("\"><th scope=\"row\">").Append(I(f.Rank)).Append("</th>")
                 .Append("<td class=\"t\">").Append(E(f.Rule)).Append("</td><td class=\"t\">").Append(E(f.Severity)).Append("</td>")
                 .Append("<td>").Append(f.Lane is int lane ? I(lane) : "–").Append("</td>")
                 .Append("<td data-key=\"value\" data-value=\"").Append(R(f.Value)).Append("\">").Append(F(f.Value, "0.###")).Append("</td>")
                 .Append("<td data-key=\"limit\" data-value=\"").Append(R(f.Limit)).Append("\">").Append(F(f.Limit, "0.###")).Append("</td>")
                 .Append("<td class=\"t\">").Append(E(f.Unit)).Append("</td><td class=\"t msg\">").Append(E(f.Message)).Append("</td></tr>\n");
            }

            h.Append("</tbody>\n</table></div>\n</details>\n");
        }

        h.Append("</div>\n</section>\n");
    }

    /// <summary>How many frames of the audit's findings the page shows open.</summary>
    private const int AuditOpenFrames = 10;

    private static void WriteConfiguration(StringBuilder h, ReportInput input)
    {
        h.Append("<section id=\"configuration\">\n<h2>Configuration and versions</h2>\n");
        h.Append("<p>The effective settings of the score run (from its results, when given) and of this report, so the page can be reproduced from its inputs. <code>null</code> means the per-frame default of docs/metrics.md.</p>\n");
        h.Append("<div class=\"scroll\"><table id=\"settings-table\">\n<thead><tr><th>Setting</th><th>Value</th></tr></thead>\n<tbody>\n");
        foreach (KeyValuePair<string, string> kv in (input.Score?.Settings ?? []).Select(kv => new KeyValuePair<string, string>("score." + kv.Key, kv.Value)).Concat(input.ReportSettings))
        {
            h.Append("<tr><th scope=\"row\"><code>").Append(E(kv.Key)).Append("</code></th><td>").Append(E(kv.Value)).Append("</td></tr>\n");
        }

        h.Append("</tbody>\n</table></div>\n");
        h.Append("<div class=\"scroll\"><table id=\"versions-table\">\n<thead><tr><th>Component</th><th>Version</th></tr></thead>\n<tbody>\n");
        foreach (KeyValuePair<string, string> kv in input.Versions.Append(new("ScottPlot (charts)", ChartLibraryVersion)))
        {
            h.Append("<tr><th scope=\"row\">").Append(E(kv.Key)).Append("</th><td>").Append(E(kv.Value)).Append("</td></tr>\n");
        }

        h.Append("</tbody>\n</table></div>\n</section>\n");
    }
}
