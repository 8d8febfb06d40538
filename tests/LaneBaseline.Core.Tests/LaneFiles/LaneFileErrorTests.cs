using System.Text;
using LaneBaseline.Core.LaneFiles;
using Xunit;

namespace LaneBaseline.Core.Tests.LaneFiles;

public sealed class LaneFileErrorTests
{
    private const string Good = "{\"frame\":\"a.png\",\"width\":100,\"height\":50,\"lanes\":[{\"points\":[[1,49],[2,0]]}]}";

    // Source: docs/lane-file.md, "Rules": each violation names file, line and key as FILE:LINE: key: problem.
    [Theory]
    [InlineData("{\"frame\":\"a.png\",\"width\":100,\"height\":50,\"lanes\":[{\"points\":[[1,49],[2,", "t.jsonl:2: lanes[0].points[1]")]
    [InlineData("{\"frame\":\"a.png\",\"width\":100,\"height\":50,\"lanes\":[{\"points\":[[1,49],[NaN,0]]}]}", "t.jsonl:2: lanes[0].points[1]")]
    [InlineData("{\"frame\":\"a.png\",\"width\":100,\"height\":50,\"lanes\":[{\"points\":[[1,1e999],[2,0]]}]}", "t.jsonl:2: lanes[0].points[0]: non-finite")]
    [InlineData("{\"frame\":\"a.png\",\"width\":100,\"height\":50,\"lanes\":[{\"points\":[[1,49]]}]}", "t.jsonl:2: lanes[0].points: a lane needs at least 2 points")]
    [InlineData("{\"frame\":\"a.png\",\"height\":50,\"lanes\":[]}", "t.jsonl:2: width: required key is missing")]
    [InlineData("{\"width\":100,\"height\":50,\"lanes\":[]}", "t.jsonl:2: frame: required key is missing")]
    [InlineData("{\"frame\":\"a.png\",\"width\":100,\"height\":50}", "t.jsonl:2: lanes: required key is missing")]
    [InlineData("{\"frame\":\"a.png\",\"width\":100,\"height\":50,\"lanes\":[{\"points\":[[1,49],[201,0]]}]}", "t.jsonl:2: lanes[0].points[1]: point (201, 0) is outside")]
    [InlineData("{\"frame\":\"a.png\",\"width\":100,\"height\":50,\"lanes\":[{\"points\":[[1,49],[2,0]],\"score\":1.5}]}", "t.jsonl:2: lanes[0].score")]
    [InlineData("{\"frame\":\"a.png\",\"width\":100,\"height\":50,\"lanes\":[{\"points\":[[1,49],[2,0]],\"kind\":\"zigzag\"}]}", "t.jsonl:2: lanes[0].kind")]
    [InlineData("{\"frame\":\"a.png\",\"width\":100,\"height\":50,\"lanes\":[{\"points\":[[1,49],[2,0]],\"slot\":1.5}]}", "t.jsonl:2: lanes[0].slot")]
    [InlineData("[1,2]", "t.jsonl:2: the line is not a JSON object")]
    public void Read_BadLine_NamesFileLineAndKey(string badLine, string expectedPrefix)
    {
        BadInputException ex = Assert.Throws<BadInputException>(() => ReadAll(Encoding.UTF8.GetBytes(Good.Replace("a.png", "z.png", StringComparison.Ordinal) + "\n" + badLine + "\n")));
        Assert.StartsWith(expectedPrefix, ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Read_DuplicateFrame_NamesBothLines()
    {
        BadInputException ex = Assert.Throws<BadInputException>(() => ReadAll(Encoding.UTF8.GetBytes(Good + "\n\n" + Good + "\n")));
        Assert.Equal("t.jsonl:3: frame: duplicate frame 'a.png' (first on line 1)", ex.Message);
    }

    [Fact]
    public void Read_NonUtf8_NamesLine()
    {
        byte[] bytes = [.. Encoding.UTF8.GetBytes(Good + "\n{\"frame\":\"b"), 0xC3, 0x28, .. Encoding.UTF8.GetBytes("\",\"width\":1,\"height\":1,\"lanes\":[]}\n")];
        BadInputException ex = Assert.Throws<BadInputException>(() => ReadAll(bytes));
        Assert.Equal("t.jsonl:2: the line is not valid UTF-8 text", ex.Message);
    }

    [Fact]
    public void Read_PredictionWithoutSize_IsAccepted_AndCrLfAndBomAreTolerated()
    {
        byte[] bytes = [0xEF, 0xBB, 0xBF, .. Encoding.UTF8.GetBytes("{\"frame\":\"a.png\",\"lanes\":[]}\r\n  \r\n{\"frame\":\"b.png\",\"lanes\":[]}")];
        using var reader = LaneFileReader.FromStream(new MemoryStream(bytes), "p.jsonl", sizeRequired: false);
        Assert.Equal(["a.png", "b.png"], reader.ReadAll().Select(r => r.Frame).ToArray());
    }

    [Fact]
    public void Open_MissingFileOrDirectory_IsBadInput()
    {
        Assert.EndsWith("file not found", Assert.Throws<BadInputException>(() => LaneFileReader.Open("no/such/file.jsonl", true)).Message, StringComparison.Ordinal);
        Assert.Contains("is a directory", Assert.Throws<BadInputException>(() => LaneFileReader.Open(Path.GetTempPath(), true)).Message, StringComparison.Ordinal);
    }

    private static void ReadAll(byte[] bytes)
    {
        using var reader = LaneFileReader.FromStream(new MemoryStream(bytes), "t.jsonl", sizeRequired: true);
        foreach (LaneRecord _ in reader.ReadAll())
        {
        }
    }
}
