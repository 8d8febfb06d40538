using System.Globalization;
using LaneBaseline.Core.Metrics;
using LaneBaseline.Core.Metrics.Calibration;
using LaneBaseline.Core.Metrics.ConfidenceSweep;
using LaneBaseline.Core.Metrics.Ground;

namespace LaneBaseline.Reporting.Score;

/// <summary>
/// Builds the page model straight from a finished score run in memory (<c>score --report</c>): the same values
/// <see cref="ScoreJsonWriter"/> writes and <see cref="ScoreDocumentReader"/> reads back, without the JSON in between,
/// so nothing the reader does not know (camera errors, extra thresholds) can be lost on the way. A value the JSON
/// writes as null (not finite) is NaN here, exactly as the reader gives it.
/// </summary>
public static class ScoreDocumentBuilder
{
    /// <summary>The document of a score run.</summary>
    /// <param name="systems">Per-system results in command-line order.</param>
    /// <param name="settings">The run's scoring settings.</param>
    /// <param name="bootstrap">The bootstrap result, or null without intervals.</param>
    /// <param name="truthPath">The truth path as it should be displayed.</param>
    /// <param name="displayPath">Maps a prediction path to the way it is displayed (standard input as <c>-</c>).</param>
    public static ScoreDocument Build(IReadOnlyList<SystemScore> systems, ScoreSettings settings, BootstrapResult? bootstrap, string truthPath, Func<string, string>? displayPath = null)
    {
        ArgumentNullException.ThrowIfNull(systems);
        ArgumentNullException.ThrowIfNull(settings);
        ArgumentNullException.ThrowIfNull(truthPath);
        if (systems.Count == 0)
        {
            throw new ArgumentException("a score document needs at least one system", nameof(systems));
        }

        Func<string, string> show = displayPath ?? (p => p);
        var results = new List<SystemResult>(systems.Count);
        for (int s = 0; s < systems.Count; s++)
        {
            results.Add(System(systems[s], s, settings, bootstrap));
        }

        var paired = new List<PairedResult>();
        if (systems.Count > 1)
        {
            for (int a = 0; a < systems.Count; a++)
            {
                for (int b = a + 1; b < systems.Count; b++)
                {
                    var stats = new List<PairedStatistic>();
                    foreach (BootstrapStatistic stat in Enum.GetValues<BootstrapStatistic>())
                    {
                        double diff = ScoreJsonWriter.Statistic(systems[a].Overall, stat) - ScoreJsonWriter.Statistic(systems[b].Overall, stat);
                        Ci? ci = bootstrap is { Resamples: > 0 } ? Interval(ScoreJsonWriter.PairedInterval(bootstrap, a, b, stat)) : null;
                        stats.Add(new PairedStatistic(ScoreJsonWriter.StatisticKey(stat), Finite(diff), ci));
                    }

                    var byTag = new Dictionary<string, IReadOnlyList<PairedStatistic>>(StringComparer.Ordinal);
                    if (bootstrap is { Resamples: > 0 })
                    {
                        foreach (KeyValuePair<string, TagBootstrap> kv in bootstrap.ByTag)
                        {
                            var tagStats = new List<PairedStatistic>();
                            for (int stat = 0; stat < Bootstrap.StatisticsWithMeanF1; stat++)
                            {
                                double diff = TagBootstrap.Value(systems[a].ByTag[kv.Key], stat) - TagBootstrap.Value(systems[b].ByTag[kv.Key], stat);
                                tagStats.Add(new PairedStatistic(TagBootstrap.Key(stat), Finite(diff), Interval(kv.Value.Paired(a, b, stat, bootstrap.Level))));
                            }

                            byTag[kv.Key] = tagStats;
                        }
                    }

                    paired.Add(new PairedResult(ScoreJsonWriter.PairKey(systems[a], systems[b]), systems[a].System.Name, systems[b].System.Name, stats) { ByTag = byTag });
                }
            }
        }

        return new ScoreDocument(results, paired, Settings(systems, settings, bootstrap, truthPath, show));
    }

    private static SystemResult System(SystemScore system, int index, ScoreSettings settings, BootstrapResult? bootstrap)
    {
        IntervalSet? intervals = null;
        if (bootstrap is { Resamples: > 0 })
        {
            var byStat = new SortedDictionary<string, Ci>(StringComparer.Ordinal);
            foreach (BootstrapStatistic stat in Enum.GetValues<BootstrapStatistic>())
            {
                byStat[ScoreJsonWriter.StatisticKey(stat)] = Interval(bootstrap.Intervals[index][(int)stat]);
            }

            intervals = new IntervalSet(
                bootstrap.Unit == BootstrapUnit.Sequence ? "percentile bootstrap over sequences (cluster bootstrap)" : "percentile bootstrap over frames",
                Finite(bootstrap.Level),
                bootstrap.Resamples,
                bootstrap.Seed,
                byStat);
        }

        var sweep = new List<SweepPoint>();
        ScoreTally overall = system.Overall;
        if (overall.Sweep.AnyConfidence)
        {
            for (int k = 0; k < FrameConfidenceSweep.Cutoffs; k++)
            {
                sweep.Add(new SweepPoint((double)FrameConfidenceSweep.Cutoff(k), Counts(overall.Sweep.At(k))));
            }
        }

        var byTag = new List<KeyValuePair<string, Tally>>(system.ByTag.Count);
        foreach (KeyValuePair<string, ScoreTally> kv in system.ByTag)
        {
            byTag.Add(new(kv.Key, Tally(kv.Value, settings)));
        }

        byTag.Sort((a, b) => string.CompareOrdinal(a.Key, b.Key));
        var tagIntervals = new Dictionary<string, IReadOnlyDictionary<string, Ci>>(StringComparer.Ordinal);
        if (bootstrap is { Resamples: > 0 })
        {
            foreach (KeyValuePair<string, TagBootstrap> kv in bootstrap.ByTag)
            {
                var byStat = new Dictionary<string, Ci>(StringComparer.Ordinal);
                for (int stat = 0; stat < Bootstrap.StatisticsWithMeanF1; stat++)
                {
                    byStat[TagBootstrap.Key(stat)] = Interval(kv.Value.Intervals[index][stat]);
                }

                tagIntervals[kv.Key] = byStat;
            }
        }

        return new SystemResult(system.System.Name, Tally(overall, settings), intervals, sweep, byTag) { Calibration = Calibration(overall.Reliability), Coverage = system.Coverage, TagIntervals = tagIntervals };
    }

    private static CalibrationSummary? Calibration(ReliabilityTally r)
    {
        if (r.Lanes == 0)
        {
            return null;
        }

        ReliabilityTally.CurvePoint? best = r.Best();
        return new CalibrationSummary(
            r.Lanes,
            Finite(r.ExpectedCalibrationError()),
            [.. r.Table().Select(b => new ReliabilityBin(Finite(b.Low), Finite(b.High), b.Lanes, Finite(b.MeanScore), Finite(b.Precision)))],
            best is { } bt ? Finite(bt.MinScore) : double.NaN,
            best is { } bf ? Finite(bf.F1) : double.NaN);
    }

    private static Tally Tally(ScoreTally tally, ScoreSettings settings)
    {
        int? width = settings.LaneWidthPx ?? (tally.CommonWidth is int w ? settings.LaneWidthFor(w) : null);
        double? tolerance = settings.TolerancePx ?? (tally.CommonWidth is int tw ? settings.ToleranceFor(tw) : null);
        var rows = new List<ThresholdRow>(tally.IouF1.Thresholds.Count);
        for (int k = 0; k < tally.IouF1.Thresholds.Count; k++)
        {
            string key = tally.IouF1.Thresholds[k].Key;
            rows.Add(new ThresholdRow(key, double.Parse(key, NumberStyles.Float, CultureInfo.InvariantCulture), Counts(tally.IouF1.At(k))));
        }

        rows.Sort((a, b) => a.Value.CompareTo(b.Value));
        var point = new PointSummary(
            tolerance is double t && double.IsFinite(t) ? t : null,
            Finite(tally.Points.Accuracy),
            Finite(tally.Points.FpRate),
            Finite(tally.Points.FnRate),
            tally.Points.Matched);
        return new Tally(tally.Frames, tally.TruthLanes, tally.PredLanes, width, rows, Finite(tally.IouF1.MeanF1), point)
        {
            Ground = tally.Ground is { } g ? Ground(g) : null,
        };
    }

    private static GroundSummary Ground(GroundTally g)
    {
        var lateral = new List<GroundLateral>(g.LateralCount.Length);
        for (int k = 0; k < g.LateralCount.Length; k++)
        {
            double d = GroundErrors.DefaultLookAheadM[k];
            string key = d.ToString("0.##", CultureInfo.InvariantCulture);
            // The JSON key is the distance rounded to two decimals; the reader parses that key, so do the same.
            lateral.Add(new GroundLateral(key, double.Parse(key, NumberStyles.Float, CultureInfo.InvariantCulture), g.LateralCount[k], Mean(g.LateralAbsSumM[k], g.LateralCount[k])));
        }

        lateral.Sort((a, b) => a.DistanceM.CompareTo(b.DistanceM));
        return new GroundSummary(lateral, g.EgoWidthFrames, Mean(g.EgoWidthAbsSumM, g.EgoWidthFrames), g.CurvatureCount, Mean(g.CurvatureAbsSum, g.CurvatureCount));
    }

    private static double Mean(double sum, long count) => count == 0 ? double.NaN : Finite(sum / count);

    private static DetectionSummary Counts(DetectionCounts c) =>
        new(c.TruePositives, c.FalsePositives, c.FalseNegatives, Finite(c.Precision), Finite(c.Recall), Finite(c.F1));

    private static Ci Interval(Core.Metrics.Interval ci) => new(Finite(ci.Low), Finite(ci.High));

    private static double Finite(double v) => double.IsFinite(v) ? v : double.NaN;

    /// <summary>The <c>settings</c> object flattened to dotted keys, as <see cref="ScoreDocumentReader"/> flattens it.</summary>
    private static List<KeyValuePair<string, string>> Settings(IReadOnlyList<SystemScore> systems, ScoreSettings settings, BootstrapResult? bootstrap, string truthPath, Func<string, string> show)
    {
        var list = new List<KeyValuePair<string, string>> { new("truth", truthPath) };
        foreach (SystemScore s in systems)
        {
            list.Add(new("predictions." + s.System.Name, show(s.System.Path)));
        }

        list.Add(new("lane_width_px", settings.LaneWidthPx is int lw ? lw.ToString(CultureInfo.InvariantCulture) : "null"));
        list.Add(new("tolerance_px", settings.TolerancePx is double t && double.IsFinite(t) ? ScoreJsonWriter.FormatFloat(t) : "null"));
        list.Add(new("iou_thresholds", string.Join(", ", settings.Thresholds.Select(th => th.Key))));
        if (settings.Camera is not null)
        {
            list.Add(new("lookahead_m", string.Join(", ", GroundErrors.DefaultLookAheadM.Select(ScoreJsonWriter.FormatFloat))));
        }

        list.Add(new("bootstrap_resamples", (bootstrap?.Resamples ?? 0).ToString(CultureInfo.InvariantCulture)));
        list.Add(new("seed", (bootstrap?.Seed ?? 0).ToString(CultureInfo.InvariantCulture)));
        if (bootstrap is { Resamples: > 0 })
        {
            list.Add(new("bootstrap_unit", bootstrap.UnitName));
            list.Add(new("bootstrap_clusters", bootstrap.Clusters.ToString(CultureInfo.InvariantCulture)));
        }

        return list;
    }
}
