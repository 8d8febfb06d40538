using System.Text;
using LaneBaseline.Core.LaneFiles;
using Xunit;

namespace LaneBaseline.Core.Tests.LaneFiles;

public sealed class LaneFileRoundTripTests
{
    // Source: docs/lane-file.md (lane file v1), example record; unknown keys are kept on rewrite.
    [Fact]
    public void Read_ThenWrite_KeepsKnownAndUnknownKeys()
    {
        const string line = "{\"frame\":\"dusk/000012.png\",\"width\":1280,\"height\":720,\"tags\":[\"dusk\",\"curve\"],"
            + "\"lanes\":[{\"points\":[[412,719],[455.5,600],[498,480]],\"slot\":-1,\"score\":0.93,\"kind\":\"solid\",\"colour\":\"white\"}],"
            + "\"source\":{\"cam\":2}}";
        using var reader = LaneFileReader.FromStream(new MemoryStream(Encoding.UTF8.GetBytes(line + "\n\n")), "t.lanes.jsonl", sizeRequired: true);
        Assert.True(reader.TryRead(out LaneRecord record));
        Assert.False(reader.TryRead(out _));
        Assert.Equal("dusk/000012.png", record.Frame);
        Assert.Equal(455.5, record.Lanes[0].Points[1].X);
        Assert.Equal(line, LaneFileWriter.ToJsonLine(record));
    }
}
