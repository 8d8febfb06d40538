using System.Globalization;
using LaneBaseline.Core.Metrics;
using LaneBaseline.Core.Metrics.Ground;

namespace LaneBaseline.Cli;

/// <summary>The human-readable score table printed on stdout.</summary>
internal static class ScoreTableWriter
{
    public static void Write(TextWriter o, string truthPath, IReadOnlyList<SystemScore> results, ScoreSettings settings, BootstrapResult? boot)
    {
        ScoreTally first = results[0].Overall;
        string width = settings.LaneWidthPx is int lw ? F($"{lw} px") : first.CommonWidth is int w ? F($"{settings.LaneWidthFor(w)} px") : "per frame";
        string tol = settings.TolerancePx is double tp ? F($"{tp:0.###} px") : first.CommonWidth is int tw ? F($"{settings.ToleranceFor(tw):0.###} px") : "per frame";
        o.WriteLine(F($"Truth {truthPath}: {first.Frames} frames, {first.TruthLanes} lanes. IoU lane width {width}; point tolerance {tol}."));
        o.WriteLine();

        int nameWidth = Math.Max(8, results.Max(r => r.System.Name.Length));
        string ci = boot is null ? string.Empty : "  95 % interval   ";
        o.WriteLine(F($"{"system".PadRight(nameWidth)}  lanes   F1@.50{ci}  prec.   recall  mF1     F1@.10  F1@.30  F1@.75  | accuracy{ci}  FP rate FN rate"));
        for (int s = 0; s < results.Count; s++)
        {
            ScoreTally t = results[s].Overall;
            DetectionCounts half = t.IouF1.At(IouThreshold.Half);
            o.Write(results[s].System.Name.PadRight(nameWidth));
            o.Write(F($"  {t.PredLanes,5}   {half.F1:0.0000}"));
            if (boot is not null)
            {
                o.Write(Ci(boot.Intervals[s][(int)BootstrapStatistic.F1]));
            }

            o.Write(F($"  {half.Precision:0.0000}  {half.Recall:0.0000}  {t.IouF1.MeanF1:0.0000}  {t.IouF1.At(IouThreshold.Parse("0.10")).F1:0.0000}  {t.IouF1.At(IouThreshold.Parse("0.30")).F1:0.0000}  {t.IouF1.At(IouThreshold.Parse("0.75")).F1:0.0000}  | {t.Points.Accuracy:0.0000}  "));
            if (boot is not null)
            {
                o.Write(Ci(boot.Intervals[s][(int)BootstrapStatistic.Accuracy]));
            }

            o.WriteLine(F($"  {t.Points.FpRate:0.0000}  {t.Points.FnRate:0.0000}"));
        }

        if (settings.Camera is not null)
        {
            o.WriteLine();
            o.WriteLine("On the road plane (true positives at IoU 0.50; mean absolute errors):");
            o.WriteLine("  " + "system".PadRight(nameWidth) + "  " + string.Join("  ", GroundErrors.DefaultLookAheadM.Select(d => F($"|dY|@{d:0}m").PadLeft(9))) + "  ego width  curvature");
            foreach (SystemScore r in results)
            {
                GroundTally? g = r.Overall.Ground;
                o.Write("  " + r.System.Name.PadRight(nameWidth));
                for (int k = 0; k < GroundErrors.DefaultLookAheadM.Count; k++)
                {
                    o.Write("  " + (g is null || g.LateralCount[k] == 0 ? "-" : F($"{g.LateralAbsSumM[k] / g.LateralCount[k]:0.000} m")).PadLeft(9));
                }

                o.Write("  " + (g is null || g.EgoWidthFrames == 0 ? "-" : F($"{g.EgoWidthAbsSumM / g.EgoWidthFrames:0.000} m")).PadLeft(9));
                o.WriteLine("  " + (g is null || g.CurvatureCount == 0 ? "-" : F($"{g.CurvatureAbsSum / g.CurvatureCount:0.00000}/m")).PadLeft(9));
            }
        }

        foreach (SystemScore r in results.Where(r => r.Overall.Reliability.Lanes > 0))
        {
            o.WriteLine();
            o.WriteLine("Calibration of score (" + r.System.Name + "): " + r.Overall.Reliability.Summary());
        }

        foreach (IouThreshold extra in settings.ExtraThresholds.Distinct().Order())
        {
            o.WriteLine();
            o.Write(F($"F1@{extra.Key}:"));
            foreach (SystemScore r in results)
            {
                o.Write(F($"  {r.System.Name} {r.Overall.IouF1.At(extra).F1:0.0000}"));
            }

            o.WriteLine();
        }

        var tags = results.SelectMany(r => r.ByTag.Keys).Distinct().Order(StringComparer.Ordinal).ToList();
        if (tags.Count > 0)
        {
            o.WriteLine();
            o.WriteLine("By tag (F1@.50 / point accuracy):");
            int tagWidth = Math.Max(6, tags.Max(t => t.Length));
            o.Write("  " + "tag".PadRight(tagWidth) + "  frames");
            foreach (SystemScore r in results)
            {
                o.Write("  " + r.System.Name.PadLeft(15));
            }

            o.WriteLine();
            foreach (string tag in tags)
            {
                long frames = results.Select(r => r.ByTag.TryGetValue(tag, out ScoreTally? x) ? x.Frames : 0).Max();
                o.Write(F($"  {tag.PadRight(tagWidth)}  {frames,6}"));
                foreach (SystemScore r in results)
                {
                    string cell = r.ByTag.TryGetValue(tag, out ScoreTally? x) ? F($"{x.IouF1.At(IouThreshold.Half).F1:0.000} / {x.Points.Accuracy:0.000}") : "-";
                    o.Write("  " + cell.PadLeft(15));
                }

                o.WriteLine();
            }
        }

        if (results.Count > 1)
        {
            o.WriteLine();
            o.WriteLine("Paired differences (A - B on the same frames" + (boot is null ? ")" : boot.Unit == BootstrapUnit.Sequence
                ? string.Create(CultureInfo.InvariantCulture, $"; 95 % interval from joint resampling of {boot.Units} sequences)")
                : "; 95 % interval from joint resampling of frames)") + ":");
            for (int a = 0; a < results.Count; a++)
            {
                for (int b = a + 1; b < results.Count; b++)
                {
                    o.Write("  " + ScoreJsonWriter.PairKey(results[a], results[b]) + ":");
                    foreach (BootstrapStatistic stat in new[] { BootstrapStatistic.F1, BootstrapStatistic.Accuracy })
                    {
                        double diff = ScoreJsonWriter.Statistic(results[a].Overall, stat) - ScoreJsonWriter.Statistic(results[b].Overall, stat);
                        o.Write(F($"  {ScoreJsonWriter.StatisticKey(stat)} {diff:+0.0000;-0.0000;0.0000}"));
                        if (boot is not null)
                        {
                            Interval ci2 = ScoreJsonWriter.PairedInterval(boot, a, b, stat);
                            o.Write(F($" [{ci2.Low:+0.0000;-0.0000;0.0000}, {ci2.High:+0.0000;-0.0000;0.0000}]"));
                        }
                    }

                    o.WriteLine();
                }
            }
        }
    }

    private static string Ci(Interval i) => F($"  [{i.Low:0.0000}, {i.High:0.0000}]");

    private static string F(FormattableString s) => s.ToString(CultureInfo.InvariantCulture);
}
