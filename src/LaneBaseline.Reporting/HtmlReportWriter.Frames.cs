using System.Text;
using LaneBaseline.Reporting.Score;

namespace LaneBaseline.Reporting;

// The page sections that show frames: which system is the network, largest regressions, worst frames, worst frames by tag.
public static partial class HtmlReportWriter
{
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
}
