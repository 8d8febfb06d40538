using System.Text;
using CsCheck;
using LaneBaseline.Core.LaneFiles;
using Xunit;

namespace LaneBaseline.Core.Tests.LaneFiles;

public sealed class LaneFileFuzzTests
{
    private const string Valid =
        "{\"frame\":\"a/b.png\",\"width\":640,\"height\":360,\"tags\":[\"x\"],\"lanes\":[{\"points\":[[10.5,359],[200,100]],\"slot\":-1,\"score\":0.5,\"kind\":\"dashed\",\"u\":{\"k\":[1,2]}}]}";

    // Property: on any bytes the reader either yields records or throws BadInputException whose message starts with
    // the file name — never another exception type.
    [Fact]
    public void Read_RandomBytes_OnlyBadInputErrors() =>
        Gen.Byte.Array[0, 300].Sample(bytes => AssertOnlyBadInput(bytes), iter: 3000);

    // Property: the same for a valid record with random single-byte mutations, insertions and deletions.
    [Fact]
    public void Read_MutatedValidRecord_OnlyBadInputErrors()
    {
        byte[] valid = Encoding.UTF8.GetBytes(Valid + "\n");
        Gen.Select(Gen.Int[0, valid.Length - 1], Gen.Byte, Gen.Int[0, 2]).Array[1, 6].Sample(edits =>
        {
            var bytes = new List<byte>(valid);
            foreach ((int pos, byte b, int op) in edits)
            {
                int p = Math.Min(pos, bytes.Count - 1);
                if (p < 0)
                {
                    break;
                }

                switch (op)
                {
                    case 0: bytes[p] = b; break;
                    case 1: bytes.Insert(p, b); break;
                    default: bytes.RemoveAt(p); break;
                }
            }

            AssertOnlyBadInput([.. bytes]);
        }, iter: 5000);
    }

    // Property: records that parse survive a write/read round trip unchanged (unknown keys included).
    [Fact]
    public void Write_ThenRead_RoundTrips()
    {
        Gen.Select(Gen.Double[-100, 1000].Array[4, 20], Gen.Int[-3, 3], Gen.Double[0, 1]).Sample((coords, slot, score) =>
        {
            var points = new List<LanePoint>();
            for (int i = 0; i + 1 < coords.Length; i += 2)
            {
                points.Add(new LanePoint(coords[i], Math.Abs(coords[i + 1]) % 360));
            }

            var rec = new LaneRecord { Frame = "f.png", Width = 640, Height = 360, Lanes = [new Lane { Points = points, Slot = slot, Score = score }] };
            string line = LaneFileWriter.ToJsonLine(rec);
            using var reader = LaneFileReader.FromStream(new MemoryStream(Encoding.UTF8.GetBytes(line)), "r.jsonl", true);
            Assert.True(reader.TryRead(out LaneRecord back));
            Assert.Equal(points, back.Lanes[0].Points);
            Assert.Equal(line, LaneFileWriter.ToJsonLine(back));
        }, iter: 500);
    }

    private static void AssertOnlyBadInput(byte[] bytes)
    {
        try
        {
            using var reader = LaneFileReader.FromStream(new MemoryStream(bytes), "fuzz.jsonl", sizeRequired: true);
            while (reader.TryRead(out _))
            {
            }
        }
        catch (BadInputException ex)
        {
            Assert.StartsWith("fuzz.jsonl", ex.Message, StringComparison.Ordinal);
        }
    }
}
