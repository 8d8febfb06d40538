using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Vision.Tests.Pipeline;
using OpenCvSharp;
using Xunit;

namespace LaneBaseline.Cli.Tests.Detect;

public sealed class DetectCommandTests : IDisposable
{
    private readonly string dir = Path.Combine(Path.GetTempPath(), "lb-detect-" + Guid.NewGuid().ToString("N"));

    public DetectCommandTests()
    {
        Directory.CreateDirectory(dir);
    }

    public void Dispose() => Directory.Delete(dir, recursive: true);

    private static (int Code, string Out, string Err) Run(params string[] args)
    {
        using var o = new StringWriter();
        using var e = new StringWriter();
        int code = Program.Invoke(args, o, e);
        return (code, o.ToString(), e.ToString());
    }

    /// <summary>Writes small synthetic road frames (320x180 keeps each run fast) into dir/frames[/sub].</summary>
    private string WriteFrames(int count)
    {
        string frames = Path.Combine(dir, "frames");
        Directory.CreateDirectory(Path.Combine(frames, "b"));
        for (int i = 0; i < count; i++)
        {
            var road = new SyntheticRoad { Width = 320, Height = 180, Seed = (ulong)(i + 1), Curvature = (i % 3 - 1) * 0.0015, Shadows = i % 2 == 1 };
            using Mat m = road.Render();
            string sub = i % 2 == 0 ? "a" + i.ToString("D2") + ".png" : Path.Combine("b", "c" + i.ToString("D2") + ".png");
            Cv2.ImWrite(Path.Combine(frames, sub), m);
        }

        return frames;
    }

    private static List<LaneRecord> Read(string path)
    {
        using var reader = LaneFileReader.Open(path, sizeRequired: true);
        return reader.ReadAll().ToList();
    }

    [Fact]
    public void Detect_Folder_WritesOneValidRecordPerFrame_InSortedKeyOrder_WithTheConfigRecorded()
    {
        string frames = WriteFrames(4);
        string output = Path.Combine(dir, "run.lanes.jsonl");
        var (code, stdout, _) = Run("detect", frames, "-o", output);
        Assert.Equal(0, code);
        Assert.Contains("4 frames written", stdout, StringComparison.Ordinal);

        List<LaneRecord> records = Read(output);
        // Keys: relative paths with '/', sorted ordinally (docs/lane-file.md, docs/cli.md "recursive, sorted").
        Assert.Equal(["a00.png", "a02.png", "b/c01.png", "b/c03.png"], records.Select(r => r.Frame));
        string configPath = Path.Combine(dir, "run.config.yaml");
        Assert.True(File.Exists(configPath));
        string configText = File.ReadAllText(configPath);
        foreach (LaneRecord r in records)
        {
            Assert.Equal(320, r.Width);
            Assert.Equal(180, r.Height);
            string hash = r.ExtraJson.Single(kv => kv.Key == "config").Value.Trim('"');
            Assert.Contains(hash, configText, StringComparison.Ordinal);
            Assert.Contains(r.Lanes, l => l.Slot == -1);
            Assert.Contains(r.Lanes, l => l.Slot == 1);
        }
    }

    [Fact]
    public void Detect_ThreadCount_DoesNotChangeTheOutputBytes()
    {
        string frames = WriteFrames(6);
        string one = Path.Combine(dir, "one.lanes.jsonl"), three = Path.Combine(dir, "three.lanes.jsonl");
        Assert.Equal(0, Run("detect", frames, "-o", one, "--threads", "1").Code);
        Assert.Equal(0, Run("detect", frames, "-o", three, "--threads", "3").Code);
        Assert.Equal(File.ReadAllBytes(one), File.ReadAllBytes(three));
    }

    [Fact]
    public void Detect_ResumeAfterPartialRun_EqualsOneFullRun()
    {
        string frames = WriteFrames(3);
        string full = Path.Combine(dir, "full.lanes.jsonl"), part = Path.Combine(dir, "part.lanes.jsonl");
        Assert.Equal(0, Run("detect", frames, "-o", full).Code);
        Assert.Equal(0, Run("detect", frames, "-o", part, "--max-frames", "1").Code);
        File.AppendAllText(part, "{\"frame\":\"trunc");   // an interrupted write leaves an unterminated line
        var (code, stdout, _) = Run("detect", frames, "-o", part, "--resume");
        Assert.Equal(0, code);
        Assert.Contains("1 kept", stdout, StringComparison.Ordinal);
        Assert.Equal(File.ReadAllBytes(full), File.ReadAllBytes(part));
    }

    // Issue requirement: shards 0..N-1 of detect, joined by merge, equal the unsharded lane file byte for byte
    // (N = 1, 2, 7); the partition is by a stable hash of the sequence (SequenceKey), as for score and audit.
    [Fact]
    public void Detect_Shards_MergedEqualUnsharded()
    {
        string frames = WriteFrames(9);
        string full = Path.Combine(dir, "full.lanes.jsonl");
        Assert.Equal(0, Run("detect", frames, "-o", full).Code);
        foreach (int n in new[] { 1, 2, 7 })
        {
            var parts = new List<string>();
            for (int k = 0; k < n; k++)
            {
                string o = Path.Combine(dir, $"n{n}-s{k}.lanes.jsonl");
                Assert.Equal(0, Run("detect", frames, "-o", o, "--shard", $"{k}/{n}").Code);
                parts.Add(o);
            }

            string merged = Path.Combine(dir, $"n{n}.lanes.jsonl");
            Assert.Equal(0, Run(["merge", .. parts, "-o", merged]).Code);
            Assert.Equal(File.ReadAllBytes(full), File.ReadAllBytes(merged));
        }

        Assert.Equal(2, Run("detect", frames, "-o", Path.Combine(dir, "x.jsonl"), "--shard", "2/2").Code);
    }

    // Issue 17 item 3: the lane files of detect --shard name their shard ("shard":"K/N" on every record, an extra
    // key the lane-file format permits), so merge refuses a missing shard, a shard given twice and shards of two
    // presets (exit 3, nothing written), and a spec-following reader still reads every shard. Before, merge of
    // shards 0 and 2 of 3 wrote a lane file silently missing a third of the frames.
    [Fact]
    public void Detect_ShardLaneFiles_MergeRefusesMissingDuplicatedAndMixedShards()
    {
        string frames = Path.Combine(dir, "drives");
        for (int s = 0; s < 8; s++)
        {
            Directory.CreateDirectory(Path.Combine(frames, "drive" + s));
            using Mat m = new SyntheticRoad { Width = 320, Height = 180, Seed = (ulong)(s + 1) }.Render();
            Cv2.ImWrite(Path.Combine(frames, "drive" + s, "000000.png"), m);
        }

        string[] parts = [.. Enumerable.Range(0, 3).Select(k => Path.Combine(dir, $"m-s{k}.lanes.jsonl"))];
        for (int k = 0; k < 3; k++)
        {
            Assert.Equal(0, Run("detect", frames, "-o", parts[k], "--shard", $"{k}/3").Code);
            foreach (LaneRecord r in LaneFileReader.ReadTruth(parts[k]))
            {
                Assert.Contains(r.ExtraJson, kv => kv.Key == "shard" && kv.Value == $"\"{k}/3\"");
            }
        }

        Assert.All(parts, p => Assert.True(new FileInfo(p).Length > 0, "each of the 3 shards holds frames"));
        string merged = Path.Combine(dir, "m.lanes.jsonl");
        (int code, _, string err) = Run("merge", parts[0], parts[2], "-o", merged);
        Assert.Equal(3, code);
        Assert.Contains("shards 1 of 3 are missing", err, StringComparison.Ordinal);
        (code, _, err) = Run("merge", parts[0], parts[1], parts[1], parts[2], "-o", merged);
        Assert.Equal(3, code);
        Assert.Contains("shard 1/3 is given twice", err, StringComparison.Ordinal);
        Assert.False(File.Exists(merged));

        string other = Path.Combine(dir, "m-s1-low.lanes.jsonl");
        Assert.Equal(0, Run("detect", frames, "-o", other, "--config", "low-light", "--shard", "1/3").Code);
        (code, _, err) = Run("merge", parts[0], other, parts[2], "-o", merged);
        Assert.Equal(3, code);
        Assert.Contains("one preset", err, StringComparison.Ordinal);
        Assert.False(File.Exists(merged));
        Assert.DoesNotContain("   at ", err, StringComparison.Ordinal);
    }

    // Issue requirement: detect shards must not split tracked sequences. With tracking on, every frame depends on the
    // frames before it in its sequence, so merged shards equal the unsharded run only when each shard holds whole
    // sequences (with the former frame-key hash, the 2- and 3-shard merges differed from the unsharded file).
    [Fact]
    public void Detect_TrackedSequences_ShardsMergedEqualUnsharded()
    {
        string frames = Path.Combine(dir, "seqframes");
        for (int s = 0; s < 4; s++)
        {
            Directory.CreateDirectory(Path.Combine(frames, "drive" + s));
            for (int i = 0; i < 4; i++)
            {
                var road = new SyntheticRoad { Width = 320, Height = 180, Seed = (ulong)((s * 10) + 1), Curvature = ((s % 3) - 1) * 0.0015, Shadows = i % 2 == 1 };
                using Mat m = road.Render();
                Cv2.ImWrite(Path.Combine(frames, "drive" + s, i.ToString("D6") + ".png"), m);
            }
        }

        string preset = Path.Combine(dir, "tracked.yaml");
        File.WriteAllText(preset, "tracking:\n  enabled: true\n");
        string full = Path.Combine(dir, "tracked-full.lanes.jsonl");
        Assert.Equal(0, Run("detect", frames, "-o", full, "--config", preset).Code);
        foreach (int n in new[] { 2, 3 })
        {
            var parts = new List<string>();
            for (int k = 0; k < n; k++)
            {
                string o = Path.Combine(dir, $"t{n}-s{k}.lanes.jsonl");
                Assert.Equal(0, Run("detect", frames, "-o", o, "--config", preset, "--shard", $"{k}/{n}").Code);
                parts.Add(o);
            }

            string merged = Path.Combine(dir, $"t{n}.lanes.jsonl");
            Assert.Equal(0, Run(["merge", .. parts, "-o", merged]).Code);
            Assert.Equal(File.ReadAllBytes(full), File.ReadAllBytes(merged));
        }
    }

    [Fact]
    public void Detect_OverlaysAndStages_WriteOnePngPerFrame()
    {
        string frames = WriteFrames(2);
        string ov = Path.Combine(dir, "ov"), st = Path.Combine(dir, "st");
        Assert.Equal(0, Run("detect", frames, "-o", Path.Combine(dir, "o.lanes.jsonl"), "--overlays", ov, "--stages", st).Code);
        using Mat overlay = Cv2.ImRead(Path.Combine(ov, "a00.png"));
        Assert.Equal(new Size(320, 180), overlay.Size());
        Assert.True(File.Exists(Path.Combine(ov, "b", "c01.png")));
        Assert.True(File.Exists(Path.Combine(st, "a00.stages.png")));
        Assert.Empty(Directory.GetFiles(ov, "*.tmp.png", SearchOption.AllDirectories));
    }

    [Fact]
    public void Detect_SingleImage_AndListFile()
    {
        string frames = WriteFrames(2);
        string single = Path.Combine(dir, "single.lanes.jsonl");
        Assert.Equal(0, Run("detect", Path.Combine(frames, "a00.png"), "-o", single).Code);
        Assert.Equal("a00.png", Read(single).Single().Frame);

        string list = Path.Combine(frames, "list.txt");
        File.WriteAllText(list, "# two frames\nb/c01.png\n\na00.png\n");
        string listed = Path.Combine(dir, "listed.lanes.jsonl");
        Assert.Equal(0, Run("detect", list, "-o", listed).Code);
        Assert.Equal(["b/c01.png", "a00.png"], Read(listed).Select(r => r.Frame));
    }

    [Fact]
    public void Detect_Video_KeysFramesByIndex()
    {
        string video = Path.Combine(dir, "clip.avi");
        using (var writer = new VideoWriter(video, FourCC.MJPG, 10, new Size(320, 180)))
        {
            Assert.True(writer.IsOpened());
            for (int i = 0; i < 3; i++)
            {
                using Mat m = new SyntheticRoad { Width = 320, Height = 180, Seed = (ulong)i + 5 }.Render();
                writer.Write(m);
            }
        }

        string output = Path.Combine(dir, "v.lanes.jsonl");
        Assert.Equal(0, Run("detect", video, "-o", output).Code);
        // docs/cli.md: video frames are keyed VIDEO#NNNNNN (zero-based, six digits).
        Assert.Equal(["VIDEO#000000", "VIDEO#000001", "VIDEO#000002"], Read(output).Select(r => r.Frame));
    }

    [Theory]
    [InlineData("missing-folder")]
    [InlineData("garbage-png")]
    [InlineData("zero-byte")]
    [InlineData("greyscale")]
    [InlineData("16-bit")]
    [InlineData("1x1")]
    [InlineData("over-limit")]
    [InlineData("corrupt-video")]
    [InlineData("bad-preset")]
    public void Detect_BadInput_ExitsThree_NamingTheFile(string kind)
    {
        string frames = Path.Combine(dir, "bad");
        Directory.CreateDirectory(frames);
        string named;
        string input = frames;
        var extra = new List<string>();
        switch (kind)
        {
            case "missing-folder":
                input = named = Path.Combine(dir, "nope");
                break;
            case "garbage-png":
                named = Path.Combine(frames, "x.png");
                File.WriteAllText(named, "not an image");
                break;
            case "zero-byte":
                named = Path.Combine(frames, "x.png");
                File.WriteAllBytes(named, []);
                break;
            case "greyscale":
                named = Path.Combine(frames, "x.png");
                using (var g = new Mat(180, 320, MatType.CV_8UC1, Scalar.All(90)))
                {
                    Cv2.ImWrite(named, g);
                }

                break;
            case "16-bit":
                named = Path.Combine(frames, "x.png");
                using (var g = new Mat(180, 320, MatType.CV_16UC3, Scalar.All(9000)))
                {
                    Cv2.ImWrite(named, g);
                }

                break;
            case "1x1":
                named = Path.Combine(frames, "x.png");
                using (var g = new Mat(1, 1, MatType.CV_8UC3, Scalar.All(90)))
                {
                    Cv2.ImWrite(named, g);
                }

                break;
            case "over-limit":
                // A preset lowering the documented limit stands in for a huge image (same check, fast test).
                named = Path.Combine(frames, "x.png");
                using (Mat m = new SyntheticRoad { Width = 320, Height = 180 }.Render())
                {
                    Cv2.ImWrite(named, m);
                }

                string preset = Path.Combine(dir, "small.yaml");
                File.WriteAllText(preset, "limits:\n  maxWidthPx: 200\n");
                extra.AddRange(["--config", preset]);
                break;
            case "corrupt-video":
                input = named = Path.Combine(dir, "clip.mp4");
                File.WriteAllText(named, "garbage bytes, not a video");
                break;
            default:
                named = Path.Combine(dir, "typo.yaml");
                File.WriteAllText(named, "color:\n  whiteMinContrast: 20\n  yelowMinChroma: 3\n");
                extra.AddRange(["--config", named]);
                named += ":3";
                using (Mat m = new SyntheticRoad { Width = 320, Height = 180 }.Render())
                {
                    Cv2.ImWrite(Path.Combine(frames, "ok.png"), m);
                }

                break;
        }

        var (code, _, err) = Run(["detect", input, "-o", Path.Combine(dir, "bad.lanes.jsonl"), .. extra]);
        Assert.Equal(3, code);
        Assert.Contains(named, err, StringComparison.Ordinal);
        Assert.DoesNotContain("   at ", err, StringComparison.Ordinal);
    }

    [Fact]
    public void Detect_KeepGoing_SkipsAndListsTheBadFrame()
    {
        string frames = WriteFrames(2);
        File.WriteAllText(Path.Combine(frames, "a01-broken.png"), "not an image");
        string output = Path.Combine(dir, "k.lanes.jsonl");
        Assert.Equal(3, Run("detect", frames, "-o", output).Code);
        var (code, _, err) = Run("detect", frames, "-o", output, "--keep-going");
        Assert.Equal(0, code);
        Assert.Contains("a01-broken.png", err, StringComparison.Ordinal);
        Assert.Equal(["a00.png", "b/c01.png"], Read(output).Select(r => r.Frame));
    }

    [Fact]
    public void Detect_Timings_ListEveryStageAndThePrimitives()
    {
        string frames = WriteFrames(2);
        var (code, _, err) = Run("detect", frames, "-o", Path.Combine(dir, "t.lanes.jsonl"), "--timings");
        Assert.Equal(0, code);
        foreach (string stage in new[] { "gradient", "hough", "region", "color", "warp", "search", "pipeline total", "primitive: warp full frame" })
        {
            Assert.Contains(stage, err, StringComparison.Ordinal);
        }
    }

    [Fact]
    public void Detect_WithTracking_RunsFoldersAsSequences_AndMatchesAcrossThreadCounts()
    {
        string frames = WriteFrames(4);
        string preset = Path.Combine(dir, "track.yaml");
        File.WriteAllText(preset, "tracking:\n  enabled: true\n");
        string one = Path.Combine(dir, "one.lanes.jsonl"), two = Path.Combine(dir, "two.lanes.jsonl");
        Assert.Equal(0, Run("detect", frames, "-o", one, "--config", preset).Code);
        var (code, _, err) = Run("detect", frames, "-o", two, "--config", preset, "--threads", "2");
        Assert.Equal(0, code);
        Assert.Contains("one sequence", err, StringComparison.Ordinal);
        Assert.Equal(File.ReadAllBytes(one), File.ReadAllBytes(two));
    }

    [Fact]
    public void Detect_BadThreads_IsAUsageError()
    {
        string frames = WriteFrames(1);
        Assert.Equal(2, Run("detect", frames, "-o", Path.Combine(dir, "t.jsonl"), "--threads", "0").Code);
    }
}
