using System.Globalization;
using System.Text;
using CsCheck;
using LaneBaseline.Core.Audit;
using LaneBaseline.Core.IO;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Options;
using LaneBaseline.Core.Tests.Audit;
using LaneBaseline.Testing;
using Xunit;

namespace LaneBaseline.Core.Tests.Reliability;

// Regression tests of issue 17 items 8, 9, 12 and 13 (hostile input costs and clear errors); the limits are
// docs/reliability.md's. Each test failed before its fix (noted per test) and passes now.
public sealed class InputLimitTests
{
    private static string Line(int lanes, int width = 1280, int height = 720)
    {
        var text = new StringBuilder().Append(CultureInfo.InvariantCulture, $"{{\"frame\":\"f.png\",\"width\":{width},\"height\":{height},\"lanes\":[");
        for (int i = 0; i < lanes; i++)
        {
            text.Append(i == 0 ? string.Empty : ",").Append(CultureInfo.InvariantCulture, $"{{\"points\":[[{i % width},719],[{i % width},100]]}}");
        }

        return text.Append("]}\n").ToString();
    }

    private static BadInputException ReadError(string content, string name = "t.lanes.jsonl")
    {
        using var reader = LaneFileReader.FromStream(new MemoryStream(Encoding.UTF8.GetBytes(content)), name, sizeRequired: true);
        return Assert.Throws<BadInputException>(() => reader.ReadAll().ToList());
    }

    // Item 8. Before: 100,000 lanes were read and scored on one frame-sized canvas each (~90 GB).
    [Fact]
    public void LanesPerFrame_AboveLimit_IsBadInputNamingFileLineAndKey()
    {
        BadInputException ex = ReadError(Line(InputLimits.MaxLanesPerFrame + 1));
        Assert.StartsWith("t.lanes.jsonl:1: lanes: more than 500 lanes in one frame", ex.Message, StringComparison.Ordinal);

        using var ok = LaneFileReader.FromStream(new MemoryStream(Encoding.UTF8.GetBytes(Line(InputLimits.MaxLanesPerFrame))), "t", sizeRequired: true);
        Assert.Equal(InputLimits.MaxLanesPerFrame, Assert.Single(ok.ReadAll()).Lanes.Count);
    }

    // Item 8 (pixels per frame). Before: a 1048576x1048576 frame was accepted and scored on a 1 TB canvas.
    [Fact]
    public void FramePixels_AboveLimit_IsBadInput()
    {
        BadInputException ex = ReadError(Line(1, 16385, 16384));
        Assert.Contains("t.lanes.jsonl:1: width, height: a 16385x16384 frame", ex.Message, StringComparison.Ordinal);

        using var ok = LaneFileReader.FromStream(new MemoryStream(Encoding.UTF8.GetBytes(Line(1, 16384, 16384))), "t", sizeRequired: true);
        Assert.Single(ok.ReadAll());
    }

    // Item 12. Before: no maximum (a 2 GiB line overflowed the buffer size, an int).
    [Fact]
    public void LineLongerThanMaximum_IsBadInputWithItsLineNumber()
    {
        byte[] bytes = Encoding.UTF8.GetBytes("{\"frame\":\"a\",\"width\":10,\"height\":10,\"lanes\":[]}\n" + new string(' ', 5000) + "x\n");
        using var lines = new ByteLineReader(new MemoryStream(bytes), "big.jsonl", initialCapacity: 16, maxLineBytes: 4096);
        Assert.True(lines.TryReadLine(out _));
        BadInputException ex = Assert.Throws<BadInputException>(() => lines.TryReadLine(out _));
        Assert.Equal("big.jsonl:2: the line is longer than 4096 bytes, the documented maximum line length", ex.Message);
    }

    // Item 12: a line of exactly the maximum (also with CRLF) is accepted; one byte more is not.
    [Theory]
    [InlineData(4096, "\n", true)]
    [InlineData(4096, "\r\n", true)]
    [InlineData(4096, "", true)]
    [InlineData(4097, "\r\n", false)]
    [InlineData(4097, "", false)]
    public void LineAtMaximum_Boundary(int length, string ending, bool accepted)
    {
        byte[] bytes = Encoding.ASCII.GetBytes(new string('a', length) + ending);
        using var lines = new ByteLineReader(new TrickleStream(bytes, 7), "f", initialCapacity: 16, maxLineBytes: 4096);
        if (accepted)
        {
            Assert.True(lines.TryReadLine(out ReadOnlySpan<byte> line));
            Assert.Equal(length, line.Length);
        }
        else
        {
            Assert.Throws<BadInputException>(() => lines.TryReadLine(out _));
        }
    }

    // Item 12: from a pipe (reads of a few bytes) each byte is searched for the line end once. Before: the whole
    // partial line was searched again after every read (quadratic: ~300 M byte comparisons for this 1 MiB line).
    [Fact]
    public void LongLineFromSmallReads_EachByteSearchedOnce()
    {
        const int Length = 1 << 20;
        byte[] bytes = new byte[Length + 1];
        bytes.AsSpan(0, Length).Fill((byte)'a');
        bytes[Length] = (byte)'\n';
        var trickle = new TrickleStream(bytes, 512);
        using var lines = new ByteLineReader(trickle, "pipe", initialCapacity: 16);
        Assert.True(lines.TryReadLine(out ReadOnlySpan<byte> line));
        Assert.Equal(Length, line.Length);
        Assert.InRange(lines.BytesSearched, Length, Length + 1);
    }

    // Item 13. Before: Utf8JsonReader.GetString threw InvalidOperationException (exit 1, a stack trace with
    // LANEBASELINE_DEBUG). Source: RFC 8259 sec. 8.2 (an unpaired surrogate escape is not a Unicode character).
    [Theory]
    [InlineData("{\"frame\":\"a\\ud800\",\"width\":10,\"height\":10,\"lanes\":[]}", "frame")]
    [InlineData("{\"frame\":\"a\",\"width\":10,\"height\":10,\"tags\":[\"\\udc00x\"],\"lanes\":[]}", "tags[0]")]
    [InlineData("{\"frame\":\"a\",\"width\":10,\"height\":10,\"\\ud83d\":1,\"lanes\":[]}", "key")]
    [InlineData("{\"frame\":\"a\",\"width\":10,\"height\":10,\"lanes\":[{\"points\":[[1,1],[2,2]],\"\\udfff\":1}]}", "lanes[0]")]
    public void LoneSurrogateEscape_IsBadInputNamingTheKey(string line, string key)
    {
        BadInputException ex = ReadError(line + "\n");
        Assert.StartsWith("t.lanes.jsonl:1: " + key + ": the string holds a lone UTF-16 surrogate escape", ex.Message, StringComparison.Ordinal);
    }

    // Item 13: a valid pair of escapes is text (the check is not over-eager). Source: RFC 8259 sec. 7 (the
    // surrogate pair \ud83d\ude00 escapes U+1F600).
    [Fact]
    public void SurrogatePairEscape_IsAccepted()
    {
        using var reader = LaneFileReader.FromStream(new MemoryStream("{\"frame\":\"\\ud83d\\ude00\",\"width\":10,\"height\":10,\"lanes\":[]}\n"u8.ToArray()), "t", sizeRequired: true);
        Assert.Equal("\U0001F600", Assert.Single(reader.ReadAll()).Frame);
    }

    // Item 13. Before: YamlStream.Load recursed once per level and 20,000 levels overflowed the stack, which ends
    // the process (this test would have taken the test host down).
    [Theory]
    [InlineData(true)]
    [InlineData(false)]
    public void DeeplyNestedYaml_IsBadInput(bool flow)
    {
        const int Levels = 20_000;
        string yaml = flow
            ? "color:\n  x: " + new string('[', Levels) + new string(']', Levels) + "\n"
            : string.Concat(Enumerable.Repeat("- ", Levels)) + "1\n";
        BadInputException ex = Assert.Throws<BadInputException>(() => PresetLoader.Parse(yaml, "deep.yaml"));
        Assert.StartsWith("deep.yaml:", ex.Message, StringComparison.Ordinal);
        Assert.Contains("nests more than 64 levels", ex.Message, StringComparison.Ordinal);
        Assert.Throws<BadInputException>(() => LaneBaseline.Core.Tuning.SearchSpace.Parse(yaml, "deep.yaml"));
    }

    // Item 13. Before: an output path naming a folder failed in the rename with an IOException (exit 1).
    [Fact]
    public void OutputPathThatIsAFolder_IsBadInput()
    {
        using var dir = new TempDir();
        BadInputException ex = Assert.Throws<BadInputException>(() => AtomicFile.WriteAllText(dir.Path, "x"));
        Assert.Equal(dir.Path + ": the output path is a folder; give a file name", ex.Message);
    }

    // Item 9. Before: 30 copies of one lane gave 435 near-duplicate findings; now at most 20 per frame and rule are listed, then one finding counts the other 415.
    [Fact]
    public void ManyDuplicates_FindingsCappedPerRuleWithCountOfTheRest()
    {
        Lane[] lanes = [.. Enumerable.Range(0, 30).Select(_ => Lanes.Of((400, 719), (600, 300)))];
        List<AuditFinding> found = AuditHelpers.Check(Lanes.Truth("f", 1280, 720, lanes));
        var dup = found.Where(f => f.Rule == AuditRules.NearDuplicate).ToList();
        Assert.Equal(21, dup.Count);
        AuditFinding rest = dup[^1];
        Assert.Null(rest.Lane);
        Assert.Equal(415, rest.Value); // C(30, 2) = 435 pairs, 20 listed
        Assert.Equal("415 more findings of LBA-I05 in this frame (at most 20 per frame and rule are listed)", rest.Message);
        Assert.True(dup.Take(20).All(f => f.Lane is not null));
    }

    // Item 9: the x-order sweep drops only pairs that cannot be near duplicates. Property: for random lanes,
    // every pair left out has every point of one lane at least gap px from every point of the other in x.
    [Fact]
    public void PairSweep_LeavesOutOnlyPairsFartherThanTheGap()
    {
        Gen<Lane> lane = Gen.Select(Gen.Double[-100, 1400], Gen.Double[-100, 1400], Gen.Double[0, 719], Gen.Double[0, 719])
            .Select((a, b, y0, y1) => Lanes.Of((a, y0), (b, y1)));
        Gen.Select(lane.Array[0, 40], Gen.Double[1, 60]).Sample((lanes, gap) =>
        {
            var kept = Core.Audit.Rules.NearDuplicateRule.PairsWithinX(lanes, gap).ToHashSet();
            for (int i = 0; i < lanes.Length; i++)
            {
                for (int j = i + 1; j < lanes.Length; j++)
                {
                    if (kept.Contains((i, j)))
                    {
                        continue;
                    }

                    double gapBetween = Math.Max(
                        lanes[j].Points.Min(p => p.X) - lanes[i].Points.Max(p => p.X),
                        lanes[i].Points.Min(p => p.X) - lanes[j].Points.Max(p => p.X));
                    Assert.True(gapBetween >= gap, $"pair ({i}, {j}) left out at x-gap {gapBetween} < {gap}");
                }
            }

            Assert.Equal(kept.OrderBy(p => p).ToList(), Core.Audit.Rules.NearDuplicateRule.PairsWithinX(lanes, gap));
        });
    }

    /// <summary>A stream that returns at most <c>chunk</c> bytes per read, as a pipe does.</summary>
    private sealed class TrickleStream(byte[] data, int chunk) : MemoryStream(data)
    {
        public override int Read(byte[] buffer, int offset, int count) => base.Read(buffer, offset, Math.Min(count, chunk));

        public override int Read(Span<byte> buffer) => base.Read(buffer[..Math.Min(buffer.Length, chunk)]);
    }
}
