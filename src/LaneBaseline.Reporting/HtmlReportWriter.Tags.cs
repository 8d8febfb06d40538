using System.Globalization;
using System.Text;
using LaneBaseline.Reporting.Score;

namespace LaneBaseline.Reporting;

// The page sections per tag: kinds of tags, the by-tag chart and side-by-side table with intervals, the severity sweep.
public static partial class HtmlReportWriter
{
    /// <summary>
    /// The kind of a truth tag, for grouping: road layout (curve, straight, lanes-N, two-way, lane-change), road
    /// surface (asphalt, concrete), markings (markings-*, worn-paint) and condition (every other tag: light, weather,
    /// image effects, traffic). The order of the kinds is the order of this list.
    /// </summary>
    public static readonly IReadOnlyList<string> TagKinds = ["condition", "road layout", "road surface", "markings"];

    /// <summary>The kind of one tag (see <see cref="TagKinds"/>).</summary>
    public static string TagKind(string tag)
    {
        ArgumentNullException.ThrowIfNull(tag);
        if (tag is "curve" or "straight" or "two-way" or "lane-change" || tag.StartsWith("lanes-", StringComparison.Ordinal))
        {
            return "road layout";
        }

        if (tag is "asphalt" or "concrete")
        {
            return "road surface";
        }

        return tag.StartsWith("markings-", StringComparison.Ordinal) || tag == "worn-paint" ? "markings" : "condition";
    }

    private static void WriteTags(StringBuilder h, IReadOnlyList<SystemResult> systems, (int Network, int Baseline)? roles, IReadOnlyList<PairedResult> paired)
    {
        h.Append("<section id=\"tags\">\n<h2>By tag</h2>\n");
        var tags = systems.SelectMany(s => s.ByTag.Select(kv => kv.Key)).Distinct(StringComparer.Ordinal).Order(StringComparer.Ordinal).ToList();
        if (tags.Count == 0)
        {
            h.Append("<p class=\"empty\">The truth file carries no tags, so there is no per-condition breakdown.</p>\n</section>\n");
            return;
        }

        h.Append("<p>Frames are counted under every tag their truth record carries, so the tags overlap and need not add up to the whole.</p>\n");
        h.Append("<figure class=\"chart\" id=\"chart-tags\">").Append(Charts.TagBars(systems, tags, "c3")).Append("<figcaption>F1 at IoU 0.50 per tag and system")
         .Append(tags.Count > Charts.CrowdedLabels ? string.Create(CultureInfo.InvariantCulture, $"; with more than {Charts.CrowdedLabels} tags the labels are slanted and names longer than {Charts.MaxLabelChars} characters shortened (the table has them in full).") : ".")
         .Append("</figcaption></figure>\n");
        IReadOnlyList<(double Severity, string Tag)> levels = Charts.SeverityTags(tags);
        if (levels.Count > 0)
        {
            WriteSeverity(h, systems, levels);
        }

        WriteTagComparison(h, systems, tags, roles, paired);
        h.Append("<details><summary>Per tag and system (frames, truth lanes, mF1)</summary>\n");
        h.Append("<div class=\"scroll\"><table id=\"tag-table\">\n<thead><tr><th>Tag</th><th>System</th><th>Frames</th><th>Truth lanes</th><th>F1@0.50</th><th>mF1</th><th>Point accuracy</th></tr></thead>\n<tbody>\n");
        foreach (string tag in tags)
        {
            foreach (SystemResult r in systems)
            {
                Tally? t = r.ByTag.FirstOrDefault(kv => kv.Key == tag).Value;
                if (t is null)
                {
                    continue;
                }

                h.Append("<tr data-tag=\"").Append(E(tag)).Append("\" data-system=\"").Append(E(r.Name)).Append("\"><th scope=\"row\">").Append(E(tag)).Append("</th><td class=\"t\">").Append(E(r.Name)).Append("</td>")
                 .Append(Td("frames", t.Frames)).Append(Td("truth_lanes", t.TruthLanes))
                 .Append(TdCi("f1@0.50", t.At("0.50")?.F1 ?? double.NaN, TagCi(r, tag, "f1@0.50"))).Append(TdCi("mf1", t.MeanF1, TagCi(r, tag, "mf1"))).Append(TdCi("accuracy", t.Point.Accuracy, TagCi(r, tag, "accuracy")))
                 .Append("</tr>\n");
            }
        }

        h.Append("</tbody>\n</table></div>\n</details>\n</section>\n");
    }

    /// <summary>Tags grouped by kind (stable order), systems side by side, and network − baseline with its sign.</summary>
    private static void WriteTagComparison(StringBuilder h, IReadOnlyList<SystemResult> systems, IReadOnlyList<string> tags, (int Network, int Baseline)? roles, IReadOnlyList<PairedResult> paired)
    {
        h.Append("<p class=\"note\">F1 at IoU 0.50 / point accuracy per tag, tags grouped by kind (")
         .Append(E(string.Join(", ", TagKinds))).Append(") and in ordinal order within a kind.");
        if (roles is (int net, int bas))
        {
            h.Append(" Δ is ").Append(E(systems[net].Name)).Append(" − ").Append(E(systems[bas].Name))
             .Append(" on the same frames.");
        }

        if (systems.Any(r => r.TagIntervals.Count > 0))
        {
            h.Append(" Brackets are 95 % percentile-bootstrap intervals resampling the tag's own frames (or sequences) with the run's seed; a Δ interval is the paired one, from the same resamples.");
        }

        h.Append("</p>\n<div class=\"scroll\"><table id=\"tag-compare-table\">\n<thead><tr><th>Kind</th><th>Tag</th><th>Frames</th>");
        foreach (SystemResult r in systems)
        {
            h.Append("<th>").Append(E(r.Name)).Append(" F1@0.50</th><th>").Append(E(r.Name)).Append(" point acc.</th>");
        }

        if (roles is not null)
        {
            h.Append("<th>Δ F1@0.50</th><th>Δ point acc.</th>");
        }

        h.Append("</tr></thead>\n<tbody>\n");
        foreach (string kind in TagKinds)
        {
            foreach (string tag in tags.Where(t => TagKind(t) == kind))
            {
                Tally?[] row = [.. systems.Select(r => r.ByTag.FirstOrDefault(kv => kv.Key == tag).Value)];
                long frames = row.Where(t => t is not null).Select(t => t!.Frames).DefaultIfEmpty(0).Max();
                h.Append("<tr data-tag=\"").Append(E(tag)).Append("\" data-kind=\"").Append(E(kind)).Append("\"><td class=\"t\">").Append(E(kind)).Append("</td><th scope=\"row\">")
                 .Append(E(tag)).Append("</th>").Append(Td("frames", frames));
                for (int s = 0; s < systems.Count; s++)
                {
                    h.Append(TdCi("f1@0.50", row[s]?.At("0.50")?.F1 ?? double.NaN, TagCi(systems[s], tag, "f1@0.50"))).Append(TdCi("accuracy", row[s]?.Point.Accuracy ?? double.NaN, TagCi(systems[s], tag, "accuracy")));
                }

                if (roles is (int n, int b))
                {
                    double df = (row[n]?.At("0.50")?.F1 ?? double.NaN) - (row[b]?.At("0.50")?.F1 ?? double.NaN);
                    double da = (row[n]?.Point.Accuracy ?? double.NaN) - (row[b]?.Point.Accuracy ?? double.NaN);
                    h.Append(TdDelta("delta_f1@0.50", df, TagDeltaCi(paired, systems[n].Name, systems[b].Name, tag, "f1@0.50"))).Append(TdDelta("delta_accuracy", da, TagDeltaCi(paired, systems[n].Name, systems[b].Name, tag, "accuracy")));
                }

                h.Append("</tr>\n");
            }
        }

        h.Append("</tbody>\n</table></div>\n");
    }

    private static string TdDelta(string key, double value, Ci? ci = null) =>
        "<td data-key=\"" + E(key) + "\" data-value=\"" + R(value) + "\" class=\"" + (value < 0 ? "worse" : value > 0 ? "better" : "same") + "\">"
        + F(value, "+0.000;−0.000;0.000")
        + (ci is Ci c ? " <span class=\"ci\">[" + F(c.Low, "+0.000;−0.000;0.000") + ", " + F(c.High, "+0.000;−0.000;0.000") + "]</span>" : string.Empty)
        + "</td>";

    /// <summary>The per-tag interval of a statistic of a system, or null when the run had none.</summary>
    private static Ci? TagCi(SystemResult r, string tag, string key) =>
        r.TagIntervals.TryGetValue(tag, out IReadOnlyDictionary<string, Ci>? byStat) && byStat.TryGetValue(key, out Ci ci) ? ci : null;

    /// <summary>The paired interval of network − baseline on a tag (the stored pair's sign flipped when it is baseline − network).</summary>
    private static Ci? TagDeltaCi(IReadOnlyList<PairedResult> paired, string network, string baseline, string tag, string key)
    {
        foreach (PairedResult p in paired)
        {
            bool direct = p.A == network && p.B == baseline, flipped = p.A == baseline && p.B == network;
            if ((direct || flipped) && p.ByTag.TryGetValue(tag, out IReadOnlyList<PairedStatistic>? stats))
            {
                PairedStatistic? st = stats.FirstOrDefault(x => x.Key == key);
                if (st?.Ci95 is Ci c)
                {
                    return direct ? c : new Ci(-c.High, -c.Low);
                }
            }
        }

        return null;
    }

    private static void WriteSeverity(StringBuilder h, IReadOnlyList<SystemResult> systems, IReadOnlyList<(double Severity, string Tag)> levels)
    {
        h.Append("<h3 id=\"severity\">Severity sweep</h3>\n<p>Frames rendered at rising severity of one condition (<code>render --sweep</code> tags them <code>severity=X</code>): F1 at IoU 0.50 per level.</p>\n");
        h.Append("<figure class=\"chart\" id=\"chart-severity\">").Append(Charts.SeverityCurves(systems, levels, "c6")).Append("<figcaption>F1 at IoU 0.50 against severity, one curve per system.</figcaption></figure>\n");
        h.Append("<div class=\"scroll\"><table id=\"severity-table\">\n<thead><tr><th>System</th>");
        foreach ((double sev, _) in levels)
        {
            h.Append("<th>").Append(F(sev, "0.00")).Append("</th>");
        }

        h.Append("</tr></thead>\n<tbody>\n");
        foreach (SystemResult r in systems)
        {
            h.Append("<tr data-system=\"").Append(E(r.Name)).Append("\"><th scope=\"row\">").Append(E(r.Name)).Append("</th>");
            foreach ((_, string tag) in levels)
            {
                h.Append(TdCi(tag, r.ByTag.FirstOrDefault(kv => kv.Key == tag).Value?.At("0.50")?.F1 ?? double.NaN, null));
            }

            h.Append("</tr>\n");
        }

        h.Append("</tbody>\n</table></div>\n");
    }
}
