using System.Globalization;
using System.Text;
using LaneBaseline.Reporting.Score;

namespace LaneBaseline.Reporting;

// The page sections of the overall results: headline, coverage, road-plane errors, F1 against IoU, confidence, paired differences.
public static partial class HtmlReportWriter
{
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
}
