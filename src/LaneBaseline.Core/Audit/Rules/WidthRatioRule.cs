using LaneBaseline.Core.LaneFiles;
using static LaneBaseline.Core.Audit.Rules.RuleText;

namespace LaneBaseline.Core.Audit.Rules;

/// <summary>
/// <c>LBA-I07</c> width ratio: the two lanes either side of a boundary differ in width at one image row by more than
/// published lane widths allow. Checked at the nearest row (every 10 rows from the bottom) with three lanes and the
/// row with the most lanes; widths under 10 px (near the vanishing point) are not measured.
/// </summary>
public sealed class WidthRatioRule : IAuditRule
{
    /// <inheritdoc/>
    public AuditRuleInfo Info { get; } = new(
        AuditRules.WidthRatio, "width-ratio", AuditSeverity.Warning, "ratio of neighbouring lane widths at the same row above 3.75/2.7 x 1.05 = 1.458",
        "docs/checks.md lane widths: plausible band 2.7-3.75 m (AASHTO / FHWA, DMRB TD 27/96); image widths at one row scale with ground widths on a flat road (pinhole projection); 5 % label allowance: common practice");

    /// <inheritdoc/>
    public AuditRuleFamily Family => AuditRuleFamily.Image;

    /// <inheritdoc/>
    public void Check(AuditFrame frame, List<AuditFinding> sink)
    {
        ArgumentNullException.ThrowIfNull(frame);
        ArgumentNullException.ThrowIfNull(sink);
        IReadOnlyList<Lane> lanes = frame.Lanes;
        if (lanes.Count < 3)
        {
            return;
        }

        double? first = null, fullest = null;
        int most = 2;
        for (double y = frame.Height - 1; y >= 0; y -= 10)
        {
            int n = lanes.Count(l => LaneSampling.XAt(l, y, out _));
            if (n >= 3 && first is null)
            {
                first = y;
            }

            if (n > most)
            {
                most = n;
                fullest = y;
            }
        }

        var rows = new List<double>();
        if (first is double f)
        {
            rows.Add(f);
        }

        if (fullest is double g && g != first)
        {
            rows.Add(g);
        }

        double maxRatio = frame.Settings.MaxWidthRatio;
        var reported = new HashSet<int>();
        foreach (double row in rows)
        {
            var present = new List<(double X, int Lane)>();
            for (int i = 0; i < lanes.Count; i++)
            {
                if (LaneSampling.XAt(lanes[i], row, out double x))
                {
                    present.Add((x, i));
                }
            }

            present.Sort();
            for (int k = 1; k + 1 < present.Count; k++)
            {
                double w1 = present[k].X - present[k - 1].X, w2 = present[k + 1].X - present[k].X;
                if (Math.Min(w1, w2) < 10 || reported.Contains(present[k].Lane))
                {
                    continue; // too close to the vanishing point to measure, or a crossing/duplicate (other rules)
                }

                double ratio = Math.Max(w1, w2) / Math.Min(w1, w2);
                if (ratio > maxRatio)
                {
                    reported.Add(present[k].Lane);
                    int lane = present[k].Lane;
                    sink.Add(frame.Finding(this, lane, null, ratio, maxRatio, "ratio",
                        Inv($"the lanes either side of lane {lane} are {w1:0.#} px and {w2:0.#} px wide at row {row:0} (ratio {ratio:0.##})")));
                }
            }
        }
    }
}
