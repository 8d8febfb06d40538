using CsCheck;
using LaneBaseline.Core;
using LaneBaseline.Testing;
using LaneBaseline.Vision.Masks;
using OpenCvSharp;
using Xunit;

namespace LaneBaseline.Vision.Tests.Fuzz;

// Property (CLI contract: bad input is exit 3, never an unhandled exception): the instance-mask reader, fed random
// mutations of a valid 8-bit mask PNG, either returns a one-channel 8/16-bit mask or throws BadInputException.
public sealed class MaskReaderFuzzTests
{
    [Fact]
    public void MaskRead_MutatedPng_OnlyBadInput()
    {
        using var dir = new TempDir();
        using var mask = new Mat(36, 64, MatType.CV_8UC1, Scalar.All(0));
        Cv2.Line(mask, new Point(10, 35), new Point(20, 0), Scalar.All(1), 3);
        Cv2.Line(mask, new Point(50, 35), new Point(40, 0), Scalar.All(2), 3);
        Cv2.ImEncode(".png", mask, out byte[] valid);
        int n = 0;
        Mutations.Of(valid).Sample(
            bytes =>
            {
                string path = dir.File($"m{Interlocked.Increment(ref n)}.png");
                File.WriteAllBytes(path, bytes);
                try
                {
                    using Mat m = MaskFiles.Read(path);
                    Assert.Equal(1, m.Channels());
                }
                catch (BadInputException ex)
                {
                    Assert.StartsWith(path, ex.Message, StringComparison.Ordinal);
                }
            },
            iter: 80,
            threads: 1);
    }
}
