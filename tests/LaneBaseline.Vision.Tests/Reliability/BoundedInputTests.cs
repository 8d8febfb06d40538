using System.Buffers.Binary;
using CsCheck;
using LaneBaseline.Core;
using LaneBaseline.Core.IO;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Options;
using LaneBaseline.Testing;
using LaneBaseline.Vision.IO;
using LaneBaseline.Vision.Masks;
using LaneBaseline.Vision.Metrics;
using OpenCvSharp;
using Xunit;

namespace LaneBaseline.Vision.Tests.Reliability;

// Regression tests of issue 17 items 8, 10 and 11 (bounded memory and time on hostile input); the limits are
// docs/reliability.md's.
public sealed class BoundedInputTests
{
    // Item 8. Oracle: OpenCV itself, used the way the metric definition (docs/metrics.md, step 2) states it: every
    // lane drawn with polylines (LINE_8, thickness w) on its own zero canvas of the frame's size, areas by
    // CountNonZero and intersections by BitwiseAnd. The run-length rasteriser on one reused canvas must give exactly
    // these counts, including lanes that leave the frame (clipping), horizontal runs, thickness 1 and 2, and many
    // lanes per frame.
    [Fact]
    public void RunLengthCounts_EqualFrameSizedMasksPerLane()
    {
        using var rasterizer = new OpenCvLaneRasterizer();
        Gen<(int W, int H)> size = Gen.Int[0, 2].Select(k => k == 0 ? (320, 180) : k == 1 ? (64, 48) : (333, 211));
        Gen.Select(size, Gen.Int[1, 40], Gen.Int[0, 9], Gen.Int[0, 9], Gen.Int[0, int.MaxValue]).Sample(
            (s, thickness, nt, np, seed) =>
            {
                var rng = new Core.Random.SplitMix64((ulong)seed);
                Lane[] truth = [.. Enumerable.Range(0, nt).Select(_ => RandomLane(rng, s.W, s.H))];
                Lane[] pred = [.. Enumerable.Range(0, np).Select(_ => RandomLane(rng, s.W, s.H))];
                var inter = new long[nt * np];
                var at = new long[nt];
                var ap = new long[np];
                if (nt == 0 || np == 0)
                {
                    return;
                }

                rasterizer.Measure(s.W, s.H, thickness, truth, pred, inter, at, ap);
                Mat[] masks = [.. truth.Concat(pred).Select(l => Mask(l, s.W, s.H, thickness))];
                try
                {
                    for (int i = 0; i < nt; i++)
                    {
                        Assert.Equal(Cv2.CountNonZero(masks[i]), at[i]);
                        for (int j = 0; j < np; j++)
                        {
                            using var both = new Mat();
                            Cv2.BitwiseAnd(masks[i], masks[nt + j], both);
                            Assert.Equal(Cv2.CountNonZero(both), inter[(i * np) + j]);
                        }
                    }

                    for (int j = 0; j < np; j++)
                    {
                        Assert.Equal(Cv2.CountNonZero(masks[nt + j]), ap[j]);
                    }
                }
                finally
                {
                    foreach (Mat m in masks)
                    {
                        m.Dispose();
                    }
                }
            },
            iter: 300,
            threads: 1);
    }

    // Item 8: memory no longer grows with lanes. 500 + 500 lanes (the limit) across a 1920x1080 frame needed 1,000
    // frame-sized canvases before (2.07 GB of native memory); now one canvas and the runs. Source of the byte count:
    // 1000 x 1920 x 1080 x 1 byte (CV_8UC1, common practice).
    [Fact]
    public void LanesAtTheLimit_ScoreWithOneCanvas()
    {
        using var rasterizer = new OpenCvLaneRasterizer();
        Lane[] lanes = [.. Enumerable.Range(0, InputLimits.MaxLanesPerFrame).Select(i => Lanes.Of((i * 3.8, 1079), (960 + (i * 0.1), 300)))];
        var inter = new long[lanes.Length * lanes.Length];
        var at = new long[lanes.Length];
        var ap = new long[lanes.Length];
        long before = GC.GetTotalMemory(forceFullCollection: true);
        using var process = System.Diagnostics.Process.GetCurrentProcess();
        long rssBefore = process.WorkingSet64;
        rasterizer.Measure(1920, 1080, 30, lanes, lanes, inter, at, ap);
        process.Refresh();
        Assert.True(process.WorkingSet64 - rssBefore < 1L << 30, $"working set grew by {(process.WorkingSet64 - rssBefore) >> 20} MiB");
        Assert.True(GC.GetTotalMemory(false) - before < 200L << 20);
        for (int i = 0; i < lanes.Length; i++)
        {
            Assert.Equal(at[i], inter[(i * lanes.Length) + i]); // a lane meets itself in its whole area
        }
    }

    // Item 8 (masks). Before: a 16-bit mask with 65,535 ids built a 65,535 x 65,535 IoU matrix (34 GB).
    [Fact]
    public void MaskWithTooManyIds_IsBadInput()
    {
        using var truth = new Mat(64, 1100, MatType.CV_16UC1, Scalar.All(0));
        for (int id = 1; id <= 1000; id++)
        {
            Cv2.Line(truth, new Point(id, 0), new Point(id, 63), Scalar.All(id), 1);
        }

        BadInputException ex = Assert.Throws<BadInputException>(() => MaskIou.Compare("m.png", truth, null));
        Assert.Equal("m.png: the truth mask holds 1000 lane ids; at most 500 per frame are accepted (the documented limit)", ex.Message);
        var extractor = new MaskLaneExtractor();
        ex = Assert.Throws<BadInputException>(() => extractor.Extract(truth, 1100, 64, [], "dir/m.png"));
        Assert.StartsWith("dir/m.png: the mask holds more than 500 lane ids", ex.Message, StringComparison.Ordinal);

        // the extractor is usable again afterwards (its per-id buffers were released)
        using var small = new Mat(64, 100, MatType.CV_16UC1, Scalar.All(0));
        Cv2.Line(small, new Point(50, 63), new Point(50, 0), Scalar.All(7), 1);
        Assert.Single(extractor.Extract(small, 100, 64, []));
    }

    // Item 11. Oracle: OpenCV's encoders (the reference library). The header reader gives the size OpenCV wrote.
    [Theory]
    [InlineData(".png")]
    [InlineData(".jpg")]
    [InlineData(".bmp")]
    [InlineData(".webp")]
    [InlineData(".tiff")]
    public void HeaderSize_EqualsTheEncodedSize(string ext)
    {
        foreach ((int w, int h) in new[] { (1, 1), (640, 360), (333, 211), (17, 1000) })
        {
            using var image = new Mat(h, w, MatType.CV_8UC3, Scalar.All(90));
            Cv2.ImEncode(ext, image, out byte[] bytes);
            Assert.Equal((w, h), ImageHeader.TryRead(bytes));
        }

        using var wide = new Mat(40, 70, MatType.CV_16UC1, Scalar.All(300));
        if (ext is ".png" or ".tiff")
        {
            Cv2.ImEncode(ext, wide, out byte[] mask);
            Assert.Equal((70, 40), ImageHeader.TryRead(mask));
        }
    }

    // Item 11: a JPEG whose frame header comes after 60 KB of comment segments (read past the first 4 KiB).
    // Source: ITU-T T.81 B.2.4.5 (COM segment: FF FE, length, bytes). Oracle: OpenCV decodes the same file.
    [Fact]
    public void JpegWithLargeSegmentsBeforeItsFrameHeader_SizeFromFile()
    {
        using var dir = new TempDir();
        using var image = new Mat(123, 77, MatType.CV_8UC3, Scalar.All(60));
        Cv2.ImEncode(".jpg", image, out byte[] jpg);
        var bytes = new List<byte>(jpg[..2]);
        for (int k = 0; k < 4; k++)
        {
            bytes.AddRange([0xFF, 0xFE, 0x3A, 0x98]); // length 15000 (including the two length bytes)
            bytes.AddRange(Enumerable.Repeat((byte)'c', 14998));
        }

        bytes.AddRange(jpg[2..]);
        string path = dir.File("c.jpg");
        File.WriteAllBytes(path, [.. bytes]);
        Assert.Equal((77, 123), ImageHeader.TryRead(path));
        using Mat decoded = Cv2.ImRead(path);
        Assert.Equal((decoded.Cols, decoded.Rows), ImageHeader.TryRead(path));
    }

    // Item 11. Before: a small PNG declaring 30000x30000 was decoded (2.6 GB) before its size was checked. Source of
    // the layout: PNG specification (ISO/IEC 15948:2003) sec. 5.2, 5.3, 11.2.2.
    [Fact]
    public void OversizedImage_RefusedFromItsHeader()
    {
        using var dir = new TempDir();
        string path = dir.File("huge.png");
        File.WriteAllBytes(path, PngHeader(30000, 30000));
        BadInputException ex = Assert.Throws<BadInputException>(() => FrameLoader.Load(path, new LimitsOptions()));
        Assert.Equal(path + ": the image header declares 30000x30000 pixels, more than the accepted 8192x8192 (limits.* in the preset) and at most 268435456 pixels; refused before decoding", ex.Message);
        ex = Assert.Throws<BadInputException>(() => MaskFiles.Read(path));
        Assert.Contains("declares 30000x30000", ex.Message, StringComparison.Ordinal);
    }

    // Item 10. Before: the folder scan followed the link to the parent and listed the frame again on every level
    // until the path grew too long.
    [Fact]
    public void LinkToParent_NotFollowedByDefault_AndEnteredOnceWhenAsked()
    {
        using var dir = new TempDir();
        Directory.CreateDirectory(dir.File("a"));
        using (var frame = new Mat(48, 64, MatType.CV_8UC3, Scalar.All(0)))
        {
            Cv2.ImWrite(dir.File("a/f.png"), frame);
        }

        Directory.CreateSymbolicLink(dir.File("a/up"), dir.Path);
        Directory.CreateSymbolicLink(dir.File("a/self"), dir.File("a"));
        Directory.CreateSymbolicLink(dir.File("b"), dir.File("a"));
        File.CreateSymbolicLink(dir.File("g.png"), dir.File("a/f.png"));

        Assert.Equal(["a/f.png", "g.png"], FrameListing.ListImages(dir.Path).Select(i => i.Key));
        Assert.Equal(["a/f.png", "g.png"], FrameListing.ListImages(dir.Path, followLinks: true).Select(i => i.Key));
    }

    // Item 10: with --follow-links a linked folder elsewhere is entered (once).
    [Fact]
    public void LinkToOtherFolder_FollowedOnlyWhenAsked()
    {
        using var dir = new TempDir();
        using var other = new TempDir();
        using (var frame = new Mat(48, 64, MatType.CV_8UC3, Scalar.All(0)))
        {
            Cv2.ImWrite(other.File("x.png"), frame);
            Cv2.ImWrite(dir.File("y.png"), frame);
        }

        Directory.CreateSymbolicLink(dir.File("l1"), other.Path);
        Directory.CreateSymbolicLink(dir.File("l2"), other.Path);
        Assert.Equal(["y.png"], FrameListing.ListImages(dir.Path).Select(i => i.Key));
        Assert.Equal(["l1/x.png", "y.png"], FrameListing.ListImages(dir.Path, followLinks: true).Select(i => i.Key));
    }

    // Fuzz (item 11): the header reader, fed mutated headers of every format it knows, never throws.
    [Fact]
    public void HeaderReader_MutatedHeaders_NeverThrow()
    {
        foreach (string ext in new[] { ".png", ".jpg", ".bmp", ".webp", ".tiff" })
        {
            using var image = new Mat(20, 30, MatType.CV_8UC3, Scalar.All(7));
            Cv2.ImEncode(ext, image, out byte[] bytes);
            Mutations.Of(bytes[..Math.Min(bytes.Length, 400)]).Sample(
                m =>
                {
                    if (ImageHeader.TryRead(m) is (int w, int h))
                    {
                        Assert.True(w >= 0 && h >= 0);
                    }
                },
                iter: 300);
        }
    }

    private static byte[] PngHeader(int width, int height)
    {
        byte[] b = new byte[8 + 25 + 12];
        new byte[] { 0x89, 0x50, 0x4E, 0x47, 0x0D, 0x0A, 0x1A, 0x0A }.CopyTo(b, 0);
        BinaryPrimitives.WriteInt32BigEndian(b.AsSpan(8), 13);
        "IHDR"u8.CopyTo(b.AsSpan(12));
        BinaryPrimitives.WriteInt32BigEndian(b.AsSpan(16), width);
        BinaryPrimitives.WriteInt32BigEndian(b.AsSpan(20), height);
        b[24] = 8; // bit depth
        b[25] = 2; // colour type: truecolour
        return b;
    }

    private static Lane RandomLane(Core.Random.SplitMix64 rng, int w, int h)
    {
        int n = 2 + (int)(rng.NextDouble(0, 1) * 8);
        bool flat = rng.NextDouble(0, 1) < 0.2;
        double y0 = rng.NextDouble(-h, 2 * h);
        return new Lane
        {
            Points = [.. Enumerable.Range(0, n).Select(_ => new LanePoint(rng.NextDouble(-w, 2 * w), flat ? y0 : rng.NextDouble(-h, 2 * h)))],
        };
    }

    private static Mat Mask(Lane lane, int w, int h, int thickness)
    {
        var mask = new Mat(h, w, MatType.CV_8UC1, Scalar.All(0));
        Point[] pts = [.. lane.Points.Select(p => new Point((int)Math.Round(p.X, MidpointRounding.ToEven), (int)Math.Round(p.Y, MidpointRounding.ToEven)))];
        Cv2.Polylines(mask, [pts], false, Scalar.All(1), thickness, LineTypes.Link8);
        return mask;
    }
}
