using System.Globalization;
using System.Net;
using System.Text;
using LaneBaseline.Core;
using LaneBaseline.Reporting.Audit;
using LaneBaseline.Reporting.Score;

namespace LaneBaseline.Reporting;

/// <summary>
/// Writes the report as one self-contained HTML page: inline CSS, charts as inline SVG (ScottPlot 5), thumbnails as
/// JPEG data URIs; no script and no external resource. The output depends only on <see cref="ReportInput"/>: numbers
/// use the invariant culture at fixed precision, keys keep their file (or ordinal) order, and the time printed is the
/// injected <see cref="ReportInput.GeneratedAt"/>.
/// </summary>
public static partial class HtmlReportWriter
{
    /// <summary>Section ids of a page with score results, in page order (every one is always present; empty ones say why).</summary>
    public static readonly IReadOnlyList<string> SectionIds =
        ["headline", "iou-curve", "confidence", "tags", "paired", "regressions", "gallery", "tag-gallery", "audit", "configuration", "caution"];

    /// <summary>Section ids of a page made from audit findings alone.</summary>
    public static readonly IReadOnlyList<string> AuditOnlySectionIds = ["audit", "configuration", "caution"];

    /// <summary>The version of the charting library, for the versions table.</summary>
    public static string ChartLibraryVersion =>
        typeof(ScottPlot.Plot).Assembly.GetName().Version?.ToString(3) ?? "unknown";

    /// <summary>Renders the page to a string (the caller writes it atomically).</summary>
    public static string Render(ReportInput input)
    {
        ArgumentNullException.ThrowIfNull(input);
        ScoreDocument? doc = input.Score;
        if (doc is null && input.Audit is null)
        {
            throw new ArgumentException("a report needs score results, audit findings or both", nameof(input));
        }

        var h = new StringBuilder(1 << 16);
        IReadOnlyList<SystemResult> systems = doc?.Systems ?? [];
        string title = doc is null ? "Lane audit report" : "Lane scoring report";
        string subject = doc is null ? input.Audit!.Source : string.Join(", ", systems.Select(s => s.Name));

        h.Append("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n")
         .Append("<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n")
         .Append("<title>").Append(title).Append(": ").Append(E(subject)).Append("</title>\n")
         .Append("<style>\n").Append(Palette.CssVariables).Append(Css).Append("</style>\n</head>\n<body>\n");

        h.Append("<header>\n<h1>").Append(title).Append("</h1>\n<p class=\"meta\">");
        if (doc is not null)
        {
            h.Append(Count(systems.Count, "system")).Append(" · ").Append(Count(systems[0].Overall.Frames, "frame"))
             .Append(" · source <code>").Append(E(input.ScoreSource ?? string.Empty)).Append("</code>");
        }

        if (input.Audit is AuditSummary a)
        {
            h.Append(doc is null ? string.Empty : " · ").Append(Count(a.Findings, "audit finding")).Append(" from <code>").Append(E(a.Source)).Append("</code>");
        }

        h.Append(" · generated <time datetime=\"")
         .Append(Time(input.GeneratedAt)).Append("\">").Append(Time(input.GeneratedAt)).Append("</time></p>\n")
         .Append("<p class=\"caution-banner\">").Append(E(SafetyNotice.Text)).Append("</p>\n");
        if (doc is not null)
        {
            h.Append("<p id=\"verdict\" class=\"verdict\">").Append(E(Verdict(doc, input.Gallery?.Regressions))).Append("</p>\n");
        }

        h.Append("</header>\n");

        h.Append("<nav>");
        if (doc is not null)
        {
            h.Append("<a href=\"#headline\">Headline</a>").Append(HasGround(systems) ? "<a href=\"#ground\">Road plane</a>" : string.Empty)
             .Append("<a href=\"#iou-curve\">F1 vs IoU</a><a href=\"#confidence\">Confidence</a>")
             .Append("<a href=\"#tags\">Tags</a>").Append(Charts.SeverityTags(systems.SelectMany(s => s.ByTag.Select(kv => kv.Key)).Distinct(StringComparer.Ordinal)).Count > 0 ? "<a href=\"#severity\">Severity</a>" : string.Empty)
             .Append("<a href=\"#paired\">Paired</a><a href=\"#regressions\">Regressions</a><a href=\"#gallery\">Worst frames</a><a href=\"#tag-gallery\">Worst by tag</a>");
        }

        h.Append("<a href=\"#audit\">Audit</a>").Append(input.Bench is null ? string.Empty : "<a href=\"#bench\">Cost</a>").Append("<a href=\"#configuration\">Configuration</a><a href=\"#caution\">Caution</a></nav>\n<main>\n");

        if (doc is not null)
        {
            WriteHeadline(h, systems);
            if (HasGround(systems))
            {
                WriteGround(h, systems);
            }

            WriteIouCurve(h, systems);
            WriteConfidence(h, systems);
            WriteTags(h, systems, Roles(doc, input.Gallery?.Regressions), doc.Paired);
            WritePaired(h, doc);
            var base64 = new Dictionary<(string System, string Frame), string>();
            WriteRegressions(h, systems.Count, input.Gallery);
            WriteGallery(h, input.Gallery, base64);
            WriteTagGallery(h, input.Gallery, base64);
        }

        WriteAudit(h, input.Audit);
        if (input.Bench is { } bench)
        {
            WriteBench(h, bench);
        }

        WriteConfiguration(h, input);

        h.Append("<section id=\"caution\">\n<h2>Safety caution</h2>\n<p>").Append(E(SafetyNotice.Text)).Append("</p>\n</section>\n");
        h.Append("</main>\n<footer>LaneBaseline report · ").Append(Time(input.GeneratedAt)).Append("</footer>\n</body>\n</html>\n");
        return h.ToString();
    }

    /// <summary>
    /// The page's one-line answer: which system is better on F1@0.50 and on point accuracy, by how much, and whether
    /// the 95 % paired interval of the difference excludes 0. Compares the regression gallery's network with its
    /// baseline when there is one, else the first paired comparison of the file.
    /// </summary>
    public static string Verdict(ScoreDocument doc, RegressionGallery? regressions = null)
    {
        ArgumentNullException.ThrowIfNull(doc);
        if (doc.Paired.Count == 0)
        {
            SystemResult only = doc.Systems[0];
            Ci? ci = only.Intervals?.Get("f1@0.50");
            return "Verdict: one system (" + only.Name + "): F1@0.50 " + F(only.Overall.At("0.50")?.F1 ?? double.NaN, "0.000")
                + (ci is Ci c ? " [" + F(c.Low, "0.000") + ", " + F(c.High, "0.000") + "]" : string.Empty)
                + ", point accuracy " + F(only.Overall.Point.Accuracy, "0.000") + ". Score a second system on the same truth to compare.";
        }

        PairedResult pair = doc.Paired[0];
        bool flip = false;
        if (Roles(doc, regressions) is (int net, int bas))
        {
            string nn = doc.Systems[net].Name, bn = doc.Systems[bas].Name;
            PairedResult? match = doc.Paired.FirstOrDefault(p => (p.A == nn && p.B == bn) || (p.A == bn && p.B == nn));
            if (match is not null)
            {
                pair = match;
                flip = match.A == bn;
            }
        }

        string a = flip ? pair.B : pair.A, b = flip ? pair.A : pair.B;
        string Part(string key, string label)
        {
            PairedStatistic? st = pair.Statistics.FirstOrDefault(x => x.Key == key);
            if (st is null || !double.IsFinite(st.Diff))
            {
                return label + ": not computed";
            }

            double d = flip ? -st.Diff : st.Diff;
            Ci? ci = st.Ci95 is Ci c0 ? (flip ? new Ci(-c0.High, -c0.Low) : c0) : null;
            string who = d > 0 ? a + " is better" : d < 0 ? a + " is worse" : a + " and " + b + " are equal";
            string text = label + ": " + who + (d == 0 ? string.Empty : " by " + F(Math.Abs(d), "0.000"));
            if (ci is Ci c)
            {
                bool excludes = c.Low > 0 || c.High < 0;
                text += " (95 % paired interval of " + a + " − " + b + " [" + F(c.Low, "0.000") + ", " + F(c.High, "0.000") + "] "
                    + (excludes ? "excludes 0" : "includes 0: not a clear difference") + ")";
            }
            else
            {
                text += " (no interval: bootstrap off)";
            }

            return text;
        }

        return "Verdict, " + a + " against " + b + ": " + Part("f1@0.50", "F1@0.50") + "; " + Part("accuracy", "point accuracy") + ".";
    }
}
