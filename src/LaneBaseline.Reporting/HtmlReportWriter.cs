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
public static class HtmlReportWriter
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

    private static void WriteRegressions(StringBuilder h, int systemCount, Gallery? gallery)
    {
        h.Append("<section id=\"regressions\">\n<h2>Largest regressions</h2>\n");
        RegressionGallery? r = gallery?.Regressions;
        if (r is null)
        {
            h.Append("<p class=\"empty\">").Append(systemCount < 2
                ? "Needs two systems on the same truth (a network and the baseline)."
                : "Not requested: pass <code>--frames DIR</code> to draw the frames where the network does worse than the baseline.").Append("</p>\n</section>\n");
            return;
        }

        h.Append("<p>").Append(E(r.Selection)).Append(" <strong>").Append(E(r.Network)).Append("</strong> is worse than <strong>").Append(E(r.Baseline))
         .Append("</strong> on ").Append(Count(r.Worse, "frame")).Append(", better on ").Append(Count(r.Better, "frame")).Append(", of ").Append(Count(r.Total, "frame")).Append(".</p>\n");
        h.Append("<p class=\"legend\" id=\"regression-legend\"><span class=\"key\"><span class=\"line truth\"></span>truth lane found (broad green band)</span>")
         .Append("<span class=\"key\"><span class=\"line miss\"></span>truth lane missed (broad brick-red band, ticks across)</span>")
         .Append("<span class=\"key\"><span class=\"line pred\"></span>").Append(E(r.Network)).Append(" lane that matches (magenta, dots)</span>")
         .Append("<span class=\"key\"><span class=\"line fp\"></span>").Append(E(r.Network)).Append(" lane matching nothing (ochre, dashed)</span>")
         .Append("<br>Matches at IoU 0.50, as the score counts them. Click a thumbnail for the full-size overlay.</p>\n");
        if (r.Frames.Count == 0)
        {
            h.Append("<p class=\"empty\">No frame where ").Append(E(r.Network)).Append(" scores a lower frame F1 than ").Append(E(r.Baseline)).Append(".</p>\n</section>\n");
            return;
        }

        h.Append("<div class=\"gallery\">\n");
        foreach (RegressionFrame f in r.Frames)
        {
            GalleryFrame t = f.Thumb;
            string img = "<img alt=\"" + E(t.Frame) + " drawn with true positives, false positives and misses\" width=\"" + I(t.Width) + "\" height=\"" + I(t.Height)
                + "\" src=\"data:image/jpeg;base64," + Convert.ToBase64String(t.Jpeg.Span) + "\">";
            h.Append("<figure class=\"thumb\" data-frame=\"").Append(E(t.Frame)).Append("\" data-delta=\"").Append(R(f.Delta)).Append("\">")
             .Append(f.FullSizeHref is null ? img : "<a href=\"" + E(f.FullSizeHref) + "\">" + img + "</a>")
             .Append("<figcaption><code>").Append(E(t.Frame)).Append("</code><br>Δ F1@0.50 <strong>").Append(F(f.Delta, "+0.000;−0.000;0.000")).Append("</strong>: ")
             .Append(E(r.Network)).Append(' ').Append(F(t.F1, "0.000")).Append(" (TP ").Append(I(t.Tp)).Append(", FP ").Append(I(t.Fp)).Append(", FN ").Append(I(t.Fn)).Append("), ")
             .Append(E(r.Baseline)).Append(' ').Append(F(f.BaselineF1, "0.000"));
            if (t.Tags.Count > 0)
            {
                h.Append("<br>tags: ").Append(E(string.Join(", ", t.Tags)));
            }

            h.Append("</figcaption></figure>\n");
        }

        h.Append("</div>\n</section>\n");
    }

    private static void WriteHeadline(StringBuilder h, IReadOnlyList<SystemResult> systems)
    {
        h.Append("<section id=\"headline\">\n<h2>Headline</h2>\n");
        h.Append("<p>F1 at IoU 0.50 on rasterised lanes, mF1 (mean F1 over IoU 0.50–0.95) and row-sampled point accuracy. ")
         .Append("Brackets hold the 95 % bootstrap interval over frames where the score run computed one.</p>\n");
        h.Append("<div class=\"scroll\"><table id=\"headline-table\">\n<thead><tr><th>System</th><th>Frames</th><th>Truth lanes</th><th>Predicted lanes</th>")
         .Append("<th>F1@0.50</th><th>Precision @0.50</th><th>Recall @0.50</th><th>mF1</th><th>Point accuracy</th><th>Point FP rate</th><th>Point FN rate</th></tr></thead>\n<tbody>\n");
        for (int s = 0; s < systems.Count; s++)
        {
            SystemResult r = systems[s];
            DetectionSummary? half = r.Overall.At("0.50");
            h.Append("<tr data-system=\"").Append(E(r.Name)).Append("\"><th scope=\"row\">").Append(Swatch(s)).Append(E(r.Name)).Append("</th>")
             .Append(Td("frames", r.Overall.Frames)).Append(Td("truth_lanes", r.Overall.TruthLanes)).Append(Td("pred_lanes", r.Overall.PredLanes))
             .Append(TdCi("f1@0.50", half?.F1 ?? double.NaN, r.Intervals?.Get("f1@0.50")))
             .Append(TdCi("precision@0.50", half?.Precision ?? double.NaN, r.Intervals?.Get("precision@0.50")))
             .Append(TdCi("recall@0.50", half?.Recall ?? double.NaN, r.Intervals?.Get("recall@0.50")))
             .Append(TdCi("mf1", r.Overall.MeanF1, null))
             .Append(TdCi("accuracy", r.Overall.Point.Accuracy, r.Intervals?.Get("accuracy")))
             .Append(TdCi("fp_rate", r.Overall.Point.FpRate, null))
             .Append(TdCi("fn_rate", r.Overall.Point.FnRate, null))
             .Append("</tr>\n");
        }

        h.Append("</tbody>\n</table></div>\n");
        WriteCoverage(h, systems);
        IntervalSet? iv = systems.Select(s => s.Intervals).FirstOrDefault(i => i is not null);
        h.Append("<p class=\"note\">").Append(iv is null
            ? "No intervals: the score run had bootstrap resampling switched off."
            : string.Create(CultureInfo.InvariantCulture, $"Intervals: {iv.Method}, {iv.Resamples} resamples, seed {iv.Seed}, level {F(iv.Level, "0.##")}."))
         .Append("</p>\n</section>\n");
    }

    /// <summary>One warning line per system whose prediction file missed truth frames or held frames the truth lacks.</summary>
    private static void WriteCoverage(StringBuilder h, IReadOnlyList<SystemResult> systems)
    {
        SystemResult[] gaps = [.. systems.Where(s => s.Coverage is { } c && (c.Missing > 0 || c.Extra > 0))];
        if (gaps.Length == 0)
        {
            return;
        }

        h.Append("<div id=\"coverage\" class=\"coverage\">\n");
        foreach (SystemResult r in gaps)
        {
            var c = r.Coverage!;
            h.Append("<p class=\"warn\" data-system=\"").Append(E(r.Name)).Append("\"><strong>").Append(E(r.Name)).Append("</strong>: ");
            if (c.Missing > 0)
            {
                h.Append(I(c.Missing)).Append(" of ").Append(I(c.TruthFrames)).Append(" truth frames have no prediction record (")
                 .Append(E(FrameCoverageList(c.FirstMissing, c.Missing))).Append("); they are scored as predicting no lanes, so a run that stopped early looks like a worse model");
            }

            if (c.Extra > 0)
            {
                h.Append(c.Missing > 0 ? "; " : string.Empty).Append(I(c.Extra)).Append(" record(s) of frames the truth lacks (")
                 .Append(E(FrameCoverageList(c.FirstExtra, c.Extra))).Append(") are left out of every score");
            }

            h.Append(".</p>\n");
        }

        h.Append("</div>\n");
    }

    private static string FrameCoverageList(IReadOnlyList<string> keys, int total) => LaneBaseline.Core.Metrics.Coverage.FrameCoverage.List(keys, total);

    private static bool HasGround(IReadOnlyList<SystemResult> systems) => systems.Any(s => s.Overall.Ground is not null);

    /// <summary>Road-plane errors of a score run with <c>--camera</c>: metres at each look-ahead distance, ego width, curvature.</summary>
    private static void WriteGround(StringBuilder h, IReadOnlyList<SystemResult> systems)
    {
        h.Append("<section id=\"ground\">\n<h2>Errors on the road plane</h2>\n");
        h.Append("<p>The score run had a camera (<code>--camera</code>): every pair of lanes matched at IoU 0.50 is projected onto the road, and the table gives the mean absolute lateral distance between truth and prediction at each distance ahead (metres), the mean absolute error of the ego lane's width and of the curvature at the camera. Smaller is better; counts are the pairs (frames for the width) that reach the distance.</p>\n");
        var keys = systems.Where(s => s.Overall.Ground is not null).SelectMany(s => s.Overall.Ground!.Lateral).GroupBy(l => l.Key).Select(g => g.First()).OrderBy(l => l.DistanceM).ToList();
        h.Append("<figure class=\"chart\" id=\"chart-ground\">").Append(Charts.GroundLateral(systems, "c8")).Append("<figcaption>Mean absolute lateral error (m) against the distance ahead, one curve per system.</figcaption></figure>\n");
        h.Append("<div class=\"scroll\"><table id=\"ground-table\">\n<thead><tr><th>System</th>");
        foreach (GroundLateral k in keys)
        {
            h.Append("<th>Lateral at ").Append(E(k.Key)).Append(" m</th>");
        }

        h.Append("<th>Ego width</th><th>Curvature (1/m)</th></tr></thead>\n<tbody>\n");
        for (int s = 0; s < systems.Count; s++)
        {
            SystemResult r = systems[s];
            if (r.Overall.Ground is not { } g)
            {
                continue;
            }

            h.Append("<tr data-system=\"").Append(E(r.Name)).Append("\"><th scope=\"row\">").Append(Swatch(s)).Append(E(r.Name)).Append("</th>");
            foreach (GroundLateral k in keys)
            {
                GroundLateral? l = g.Lateral.FirstOrDefault(x => x.Key == k.Key);
                h.Append(Metres("lateral@" + k.Key, l?.MeanM ?? double.NaN, l?.Pairs ?? 0, "pairs", "0.000 m"));
            }

            h.Append(Metres("ego_width", g.EgoWidthMeanM, g.EgoWidthFrames, "frames", "0.000 m"))
             .Append(Metres("curvature", g.CurvatureMeanPerM, g.CurvaturePairs, "pairs", "0.00000"))
             .Append("</tr>\n");
        }

        h.Append("</tbody>\n</table></div>\n<p class=\"note\">An empty cell: no pair reaches that distance (or no frame has both ego lines).</p>\n</section>\n");
    }

    private static string Metres(string key, double value, long count, string noun, string format) =>
        "<td data-key=\"" + E(key) + "\">" + (double.IsNaN(value) ? "–" : E(value.ToString(format, CultureInfo.InvariantCulture))
            + " <span class=\"n\">(" + I(count) + " " + noun + ")</span>") + "</td>";

    private static void WriteIouCurve(StringBuilder h, IReadOnlyList<SystemResult> systems)
    {
        h.Append("<section id=\"iou-curve\">\n<h2>F1 against IoU threshold</h2>\n");
        h.Append("<p>How F1 falls as the overlap a prediction needs to count rises; a curve that drops early means lanes are found but placed loosely.</p>\n");
        h.Append("<figure class=\"chart\" id=\"chart-iou\">").Append(Charts.F1VersusIou(systems, "c1")).Append("<figcaption>F1 against the IoU threshold, one curve per system.</figcaption></figure>\n");
        var keys = systems.SelectMany(s => s.Overall.Thresholds).GroupBy(t => t.Key).Select(g => g.First()).OrderBy(t => t.Value).Select(t => t.Key).ToList();
        h.Append("<div class=\"scroll\"><table id=\"iou-table\">\n<thead><tr><th>System</th>");
        foreach (string k in keys)
        {
            h.Append("<th>").Append(E(k)).Append("</th>");
        }

        h.Append("</tr></thead>\n<tbody>\n");
        foreach (SystemResult r in systems)
        {
            h.Append("<tr data-system=\"").Append(E(r.Name)).Append("\"><th scope=\"row\">").Append(E(r.Name)).Append("</th>");
            foreach (string k in keys)
            {
                h.Append(TdCi(k, r.Overall.At(k)?.F1 ?? double.NaN, null));
            }

            h.Append("</tr>\n");
        }

        h.Append("</tbody>\n</table></div>\n</section>\n");
    }

    private static void WriteConfidence(StringBuilder h, IReadOnlyList<SystemResult> systems)
    {
        h.Append("<section id=\"confidence\">\n<h2>Precision and recall over lane confidence</h2>\n");
        SystemResult[] with = [.. systems.Where(s => s.ConfidenceSweep.Count > 0)];
        if (with.Length == 0)
        {
            h.Append("<p class=\"empty\">No predicted lane carries a confidence (<code>score</code>), so there is no sweep to show.</p>\n</section>\n");
            return;
        }

        h.Append("<p>Each point keeps only lanes whose confidence reaches a cutoff (0.00, 0.05, … 0.95); lanes without a confidence are always kept. IoU threshold 0.50.</p>\n");
        h.Append("<figure class=\"chart\" id=\"chart-confidence\">").Append(Charts.PrecisionRecall(systems, "c2")).Append("<figcaption>Precision against recall as the confidence cutoff rises.</figcaption></figure>\n");
        SystemResult[] calibrated = [.. systems.Where(s => s.Calibration is not null)];
        if (calibrated.Length > 0)
        {
            h.Append("<h3 id=\"reliability\">Reliability of the lane scores</h3>\n<p>Lanes grouped into ten equal score bins; a well-calibrated system's points lie on the diagonal. ECE = Σ (lanes in bin / all) · |precision − mean score| (Naeini, Cooper &amp; Hauskrecht 2015).</p>\n");
            h.Append("<figure class=\"chart\" id=\"chart-reliability\">").Append(Charts.Reliability(systems, "c7")).Append("<figcaption>Precision at IoU 0.50 against the mean score per bin, one curve per system.</figcaption></figure>\n");
            h.Append("<div class=\"scroll\"><table id=\"calibration-table\">\n<thead><tr><th>System</th><th>Scored lanes</th><th>ECE</th><th>Best-F1 score threshold</th><th>Best F1</th></tr></thead>\n<tbody>\n");
            foreach (SystemResult r in calibrated)
            {
                CalibrationSummary c = r.Calibration!;
                h.Append("<tr data-system=\"").Append(E(r.Name)).Append("\"><th scope=\"row\">").Append(E(r.Name)).Append("</th>").Append(Td("scored_lanes", c.ScoredLanes))
                 .Append(TdCi("ece", c.Ece, null)).Append(TdCi("best_threshold", c.BestThreshold, null)).Append(TdCi("best_f1", c.BestF1, null)).Append("</tr>\n");
            }

            h.Append("</tbody>\n</table></div>\n");
        }

        h.Append("<details><summary>Sweep table (one row per system and cutoff)</summary>\n<div class=\"scroll\"><table id=\"confidence-table\">\n<thead><tr><th>System</th><th>Min confidence</th><th>TP</th><th>FP</th><th>FN</th><th>Precision</th><th>Recall</th><th>F1</th></tr></thead>\n<tbody>\n");
        foreach (SystemResult r in with)
        {
            foreach (SweepPoint p in r.ConfidenceSweep)
            {
                h.Append("<tr data-system=\"").Append(E(r.Name)).Append("\"><th scope=\"row\">").Append(E(r.Name)).Append("</th>")
                 .Append("<td>").Append(F(p.MinScore, "0.00")).Append("</td>")
                 .Append(Td("tp", p.Counts.Tp)).Append(Td("fp", p.Counts.Fp)).Append(Td("fn", p.Counts.Fn))
                 .Append(TdCi("precision", p.Counts.Precision, null)).Append(TdCi("recall", p.Counts.Recall, null)).Append(TdCi("f1", p.Counts.F1, null))
                 .Append("</tr>\n");
            }
        }

        h.Append("</tbody>\n</table></div>\n</details>\n</section>\n");
    }

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

    /// <summary>
    /// The network and the baseline the page compares (indices into the systems): the regression gallery's when there
    /// is one, else the system named <c>baseline</c> (or <c>base</c>, else the first) and the first other system.
    /// Null with one system.
    /// </summary>
    public static (int Network, int Baseline)? Roles(ScoreDocument doc, RegressionGallery? regressions)
    {
        ArgumentNullException.ThrowIfNull(doc);
        IReadOnlyList<SystemResult> systems = doc.Systems;
        if (systems.Count < 2)
        {
            return null;
        }

        int Index(string name)
        {
            for (int i = 0; i < systems.Count; i++)
            {
                if (systems[i].Name == name)
                {
                    return i;
                }
            }

            return -1;
        }

        if (regressions is not null && Index(regressions.Network) is int n && n >= 0 && Index(regressions.Baseline) is int b0 && b0 >= 0)
        {
            return (n, b0);
        }

        int b = Index("baseline") is int i1 && i1 >= 0 ? i1 : Index("base") is int i2 && i2 >= 0 ? i2 : 0;
        return (b == 0 ? 1 : 0, b);
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

    private static void WritePaired(StringBuilder h, ScoreDocument doc)
    {
        h.Append("<section id=\"paired\">\n<h2>Paired differences</h2>\n");
        if (doc.Paired.Count == 0)
        {
            h.Append("<p class=\"empty\">").Append(doc.Systems.Count < 2
                ? "One system only: score several predictions on the same frames (<code>--pred NAME=FILE</code> repeated) to compare them."
                : "The score file holds no paired comparison.").Append("</p>\n</section>\n");
            return;
        }

        h.Append("<p>Difference A − B on the same frames; the interval resamples frames jointly for both systems, so an interval that excludes 0 is a difference the frame sample supports.</p>\n");
        h.Append("<figure class=\"chart\" id=\"chart-paired\">").Append(Charts.PairedDifferences(doc.Paired, "c4")).Append("<figcaption>Dots: full-sample difference; shaded bars: 95 % interval.</figcaption></figure>\n");
        h.Append("<div class=\"scroll\"><table id=\"paired-table\">\n<thead><tr><th>A − B</th><th>Statistic</th><th>Difference</th><th>95 % interval</th><th>Reading</th></tr></thead>\n<tbody>\n");
        foreach (PairedResult p in doc.Paired)
        {
            foreach (PairedStatistic st in p.Statistics)
            {
                string reading = st.Ci95 is Ci ci && double.IsFinite(ci.Low) && double.IsFinite(ci.High)
                    ? ci.Low > 0 ? E(p.A) + " higher" : ci.High < 0 ? E(p.B) + " higher" : "no clear difference"
                    : "no interval";
                h.Append("<tr data-pair=\"").Append(E(p.Key)).Append("\" data-stat=\"").Append(E(st.Key)).Append("\"><th scope=\"row\">").Append(E(p.Key)).Append("</th><td class=\"t\">").Append(E(st.Key)).Append("</td>")
                 .Append("<td data-value=\"").Append(R(st.Diff)).Append("\">").Append(F(st.Diff, "+0.000;-0.000;0.000")).Append("</td>")
                 .Append("<td>").Append(st.Ci95 is Ci c ? "[" + F(c.Low, "+0.000;-0.000;0.000") + ", " + F(c.High, "+0.000;-0.000;0.000") + "]" : "–").Append("</td>")
                 .Append("<td class=\"t\">").Append(reading).Append("</td></tr>\n");
            }
        }

        h.Append("</tbody>\n</table></div>\n</section>\n");
    }

    private static void WriteGallery(StringBuilder h, Gallery? gallery, Dictionary<(string System, string Frame), string> base64)
    {
        h.Append("<section id=\"gallery\">\n<h2>Worst frames</h2>\n");
        if (gallery is null)
        {
            h.Append("<p class=\"empty\">Not requested: pass <code>--frames DIR --truth FILE --pred FILE</code> to <code>report</code> to draw the worst frames.</p>\n</section>\n");
            return;
        }

        h.Append("<p>").Append(E(gallery.Selection)).Append("</p>\n");
        h.Append("<p class=\"legend\"><span class=\"key\"><span class=\"line truth\"></span>ground truth</span><span class=\"key\"><span class=\"line pred\"></span>prediction (dots at its points)</span></p>\n");
        if (gallery.Frames.Count == 0)
        {
            h.Append("<p class=\"empty\">Every frame scores perfectly: there is no failure to show.</p>\n</section>\n");
            return;
        }

        foreach (IGrouping<string, GalleryFrame> group in gallery.Frames.GroupBy(f => f.System))
        {
            h.Append("<h3>").Append(E(group.Key)).Append("</h3>\n<div class=\"gallery\">\n");
            foreach (GalleryFrame f in group)
            {
                WriteThumb(h, f, null, base64);
            }

            h.Append("</div>\n");
        }

        h.Append("</section>\n");
    }

    /// <summary>The worst frames of the first system per truth tag; thumbnails shared with the gallery are converted once.</summary>
    private static void WriteTagGallery(StringBuilder h, Gallery? gallery, Dictionary<(string System, string Frame), string> base64)
    {
        h.Append("<section id=\"tag-gallery\">\n<h2>Worst frames by tag</h2>\n");
        if (gallery?.ByTag is not ConditionGallery byTag)
        {
            h.Append("<p class=\"empty\">Not requested: pass <code>--frames DIR --truth FILE --pred FILE</code> to <code>report</code> to draw the worst frames of each tagged condition.</p>\n</section>\n");
            return;
        }

        h.Append("<p>").Append(E(byTag.Selection)).Append("</p>\n");
        if (byTag.Groups.Count == 0)
        {
            h.Append("<p class=\"empty\">The truth file carries no tags, so there are no conditions to show.</p>\n</section>\n");
            return;
        }

        h.Append("<p class=\"legend\"><span class=\"key\"><span class=\"line truth\"></span>ground truth</span><span class=\"key\"><span class=\"line pred\"></span>prediction of ")
         .Append(E(byTag.System)).Append(" (dots at its points)</span></p>\n");
        foreach (ConditionGroup g in byTag.Groups)
        {
            h.Append("<h3 data-tag=\"").Append(E(g.Tag)).Append("\">").Append(E(g.Tag)).Append(" <span class=\"note\">· ").Append(Count(g.Frames, "frame")).Append("</span></h3>\n");
            if (g.Worst.Count == 0)
            {
                h.Append("<p class=\"empty\" data-tag=\"").Append(E(g.Tag)).Append("\">No failures: every frame tagged <code>").Append(E(g.Tag)).Append("</code> scores perfectly.</p>\n");
                continue;
            }

            h.Append("<div class=\"gallery\">\n");
            foreach (GalleryFrame f in g.Worst)
            {
                WriteThumb(h, f, g.Tag, base64);
            }

            h.Append("</div>\n");
        }

        if (byTag.TagsLeftOut.Count > 0)
        {
            h.Append("<p class=\"note\" id=\"tag-gallery-left-out\">").Append(Count(byTag.TagsLeftOut.Count, "more tag")).Append(byTag.TagsLeftOut.Count == 1 ? " is" : " are")
             .Append(" not shown here: ").Append(E(string.Join(", ", byTag.TagsLeftOut))).Append(" (at most ").Append(I(byTag.Groups.Count)).Append(" tags, in the order of the By tag section, which lists them all).</p>\n");
        }

        h.Append("</section>\n");
    }

    /// <summary>One thumbnail with its scores; <paramref name="tag"/> marks a thumbnail of the per-tag gallery.</summary>
    private static void WriteThumb(StringBuilder h, GalleryFrame f, string? tag, Dictionary<(string System, string Frame), string> base64)
    {
        if (!base64.TryGetValue((f.System, f.Frame), out string? data))
        {
            data = Convert.ToBase64String(f.Jpeg.Span);
            base64.Add((f.System, f.Frame), data);
        }

        h.Append("<figure class=\"thumb\"");
        if (tag is not null)
        {
            h.Append(" data-tag=\"").Append(E(tag)).Append('"');
        }

        h.Append(" data-frame=\"").Append(E(f.Frame)).Append("\" data-system=\"").Append(E(f.System)).Append("\">")
         .Append("<img alt=\"").Append(E(f.Frame)).Append(" with truth and prediction drawn\" width=\"").Append(I(f.Width)).Append("\" height=\"").Append(I(f.Height))
         .Append("\" src=\"data:image/jpeg;base64,").Append(data).Append("\">")
         .Append("<figcaption><code>").Append(E(f.Frame)).Append("</code><br>F1@0.50 ").Append(F(f.F1, "0.000"))
         .Append(" (TP ").Append(I(f.Tp)).Append(", FP ").Append(I(f.Fp)).Append(", FN ").Append(I(f.Fn)).Append(") · point acc. ").Append(F(f.PointAccuracy, "0.000"));
        if (f.Tags.Count > 0)
        {
            h.Append("<br>tags: ").Append(E(string.Join(", ", f.Tags)));
        }

        h.Append("</figcaption></figure>\n");
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

    private static string Swatch(int system) =>
        "<span class=\"swatch\" style=\"background:" + Charts.SystemColor(system) + "\"></span>";

    private static string Td(string key, long value) =>
        "<td data-key=\"" + E(key) + "\">" + I(value) + "</td>";

    private static string TdCi(string key, double value, Ci? ci)
    {
        var sb = new StringBuilder("<td data-key=\"").Append(E(key)).Append("\" data-value=\"").Append(R(value)).Append("\">").Append(F(value, "0.000"));
        if (ci is Ci c)
        {
            sb.Append(" <span class=\"ci\">[").Append(F(c.Low, "0.000")).Append(", ").Append(F(c.High, "0.000")).Append("]</span>");
        }

        return sb.Append("</td>").ToString();
    }

    /// <summary>Fixed-precision invariant text; "–" for a missing (NaN) value; no minus sign on a value that rounds to zero ("-0.000").</summary>
    internal static string F(double value, string format)
    {
        if (!double.IsFinite(value))
        {
            return "–";
        }

        string s = value.ToString(format, CultureInfo.InvariantCulture);
        return s.Length > 1 && s[0] == '-' && s.AsSpan(1).IndexOfAnyExcept("0.") < 0 ? s[1..] : s;
    }

    /// <summary>Round-trip invariant text for data attributes; empty for NaN.</summary>
    internal static string R(double value) =>
        double.IsFinite(value) ? value.ToString("R", CultureInfo.InvariantCulture) : string.Empty;

    private static string I(long value) => value.ToString(CultureInfo.InvariantCulture);

    private static string Count(long n, string noun) => I(n) + " " + noun + (n == 1 ? string.Empty : "s");

    private static string Time(DateTimeOffset t) => t.UtcDateTime.ToString("yyyy-MM-dd'T'HH:mm:ss'Z'", CultureInfo.InvariantCulture);

    private static string E(string text) => WebUtility.HtmlEncode(text);

    private const string Css = """
        * { box-sizing:border-box; }
        body { margin:0 auto; max-width:1200px; padding:16px 24px 40px; color:var(--ink); background:#fff;
               font:15px/1.5 "DejaVu Sans", "Segoe UI", Helvetica, Arial, sans-serif; }
        h1 { font-size:1.8em; margin:0.2em 0; } h2 { font-size:1.3em; margin:0 0 0.4em; border-bottom:2px solid var(--rule); padding-bottom:0.2em; }
        h3 { font-size:1.05em; margin:1em 0 0.4em; }
        .meta { color:var(--muted); margin:0 0 0.6em; }
        .caution-banner { background:var(--caution-bg); border-left:5px solid var(--caution-edge); padding:8px 12px; margin:0.6em 0; }
        nav { position:sticky; top:0; background:#fff; border-bottom:1px solid var(--rule); padding:6px 0; z-index:1;
              display:flex; flex-wrap:wrap; gap:4px 14px; }
        nav a { color:var(--accent); text-decoration:none; font-size:0.92em; }
        section { margin:28px 0; }
        .scroll { overflow-x:auto; }
        table { border-collapse:collapse; margin:8px 0; font-variant-numeric:tabular-nums; }
        th, td { border-bottom:1px solid var(--rule); padding:5px 10px; text-align:right; white-space:nowrap; vertical-align:top; }
        th:first-child, thead th { text-align:left; } thead th { background:var(--band); white-space:normal; vertical-align:bottom; }
        #headline-table thead th { max-width:7.5em; }
        #settings-table td, #versions-table td { text-align:left; white-space:normal; word-break:break-all; }
        #tag-compare-table th { text-align:left; }
        td.t { text-align:left; } td.worse { color:var(--miss); font-weight:600; } td.better { color:var(--truth); } td.msg { white-space:normal; min-width:16em; }
        .ci { display:block; color:var(--muted); font-size:0.82em; }
        .swatch { display:inline-block; width:0.8em; height:0.8em; border-radius:2px; margin-right:6px; vertical-align:baseline; }
        figure { margin:8px 0; }
        figure.chart svg { display:block; width:100%; max-width:900px; height:auto; }
        figcaption { color:var(--muted); font-size:0.88em; }
        .note, .empty { color:var(--muted); }
        .legend .key { margin-right:18px; white-space:nowrap; }
        .legend .line { display:inline-block; width:28px; vertical-align:middle; margin-right:6px; border-top-style:solid; }
        .legend .truth { border-top-width:5px; border-top-color:var(--truth); }
        .legend .pred { border-top-width:2px; border-top-color:var(--pred); }
        .legend .miss { border-top-width:5px; border-top-color:var(--miss); }
        .legend .fp { border-top-width:2px; border-top-style:dashed; border-top-color:var(--fp); }
        .coverage p.warn { border-left:5px solid var(--fp); padding:4px 12px; background:var(--caution-bg); margin:0.4em 0; }
        .verdict { font-size:1.05em; font-weight:600; border-left:5px solid var(--accent); padding:6px 12px; background:var(--band); }
        .gallery { display:grid; grid-template-columns:repeat(auto-fill, minmax(260px, 1fr)); gap:12px; }
        .thumb { margin:0; border:1px solid var(--rule); padding:6px; background:var(--band); }
        .thumb img { display:block; width:100%; height:auto; }
        .thumb figcaption { margin-top:4px; word-break:break-all; }
        details > summary { cursor:pointer; color:var(--accent); margin:6px 0; }
        footer { color:var(--muted); font-size:0.85em; border-top:1px solid var(--rule); padding-top:8px; }
        @media (max-width:700px) { body { padding:8px 10px 24px; font-size:14px; } th, td { padding:4px 6px; } h1 { font-size:1.4em; } }
        @media print {
          body { max-width:none; padding:0; font-size:11pt; } nav { display:none; }
          section, figure, table, .thumb { break-inside:avoid; } h2 { break-after:avoid; }
          .scroll { overflow:visible; } .gallery { grid-template-columns:repeat(3, 1fr); }
          .caution-banner { border:1px solid var(--caution-edge); } details > summary { display:none; }
        }

        """;
}
