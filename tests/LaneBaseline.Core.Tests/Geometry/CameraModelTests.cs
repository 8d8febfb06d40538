using LaneBaseline.Core;
using LaneBaseline.Core.Geometry;
using Xunit;

namespace LaneBaseline.Core.Tests.Geometry;

public sealed class CameraModelTests
{
    private static CameraModel TableCamera(double pitchDeg) => new()
    {
        ImageWidth = 1280,
        ImageHeight = 720,
        Fx = 1000,
        Fy = 1000,
        Cx = 640,
        Cy = 360,
        MountHeightM = 1.5,
        PitchDeg = pitchDeg,
    };

    // Source: docs/checks.md "Camera geometry": pinhole f = 1000 px, (640, 360), h = 1.5 m; H = K·[[0,−1,0],
    // [−sin θ,0,h cos θ],[cos θ,0,h sin θ]] (Hartley & Zisserman, Multiple View Geometry, 2nd ed.; Zhang, PAMI 2000, eq. 2).
    [Theory]
    [InlineData(0, 20, 0, 640, 435)]
    [InlineData(0, 20, -1.8, 730, 435)]
    [InlineData(0, 10, 0, 640, 510)]
    [InlineData(0, 40, 0, 640, 397.5)]
    [InlineData(2, 20, 0, 640, 399.9745)]
    [InlineData(2, 20, -1.8, 729.8196, 399.9745)]
    [InlineData(2, 40, 0, 640, 362.5759)]
    public void ProjectGroundToImage_MatchesPublishedTable(double pitchDeg, double x, double y, double u, double v)
    {
        (double pu, double pv) = TableCamera(pitchDeg).ProjectGroundToImage(x, y);
        Assert.Equal(u, pu, 0.001);
        Assert.Equal(v, pv, 0.001);
    }

    [Fact]
    public void HorizonRow_AtTwoDegreesPitch_MatchesPublishedValue()
    {
        // Source: docs/checks.md "Camera geometry", θ = 2°: horizon row v = 325.08 (= 360 − 1000·tan 2°).
        Assert.Equal(325.08, TableCamera(2).HorizonRowAtCentre(), 2);
    }

    [Fact]
    public void GroundToImage_EqualsPublishedClosedForm()
    {
        // Source: docs/checks.md, H = K · [[0,−1,0],[−sin θ,0,h cos θ],[cos θ,0,h sin θ]], normalised to H33 = 1.
        double t = 2 * Math.PI / 180, h = 1.5;
        var k = new Matrix3(1000, 0, 640, 0, 1000, 360, 0, 0, 1);
        var m = new Matrix3(0, -1, 0, -Math.Sin(t), 0, h * Math.Cos(t), Math.Cos(t), 0, h * Math.Sin(t));
        double[] want = (k * m).NormalizedHomography().ToRowMajor();
        double[] got = TableCamera(2).GroundToImage.ToRowMajor();
        for (int i = 0; i < 9; i++)
        {
            Assert.Equal(want[i], got[i], 9);
        }
    }

    [Theory]
    [InlineData(0, 0, 0, 0, 0)]
    [InlineData(2.5, 1.2, -0.8, -0.2, 0.02)]
    [InlineData(-1, -3, 2, -0.35, 0)]
    public void GroundToImageToGround_RoundTrips(double pitch, double yaw, double roll, double k1, double k2)
    {
        // Source: common practice (a projection followed by its inverse is the identity).
        CameraModel cam = TableCamera(pitch) with { YawDeg = yaw, RollDeg = roll, K1 = k1, K2 = k2 };
        for (double x = 4; x <= 80; x += 7.3)
        {
            for (double y = -6; y <= 6; y += 1.7)
            {
                (double u, double v) = cam.ProjectGroundToImage(x, y);
                (double gx, double gy) = cam.ImageToGround(u, v);
                Assert.Equal(x, gx, 6);
                Assert.Equal(y, gy, 6);
            }
        }
    }

    [Fact]
    public void HomographyInverse_TimesHomography_IsIdentity()
    {
        // Source: common practice (definition of the inverse matrix).
        CameraModel cam = TableCamera(3) with { YawDeg = 2, RollDeg = 1 };
        Matrix3 product = (cam.ImageToGroundHomography * cam.GroundToImage).NormalizedHomography();
        double[] id = Matrix3.Identity.ToRowMajor();
        double[] got = product.ToRowMajor();
        for (int i = 0; i < 9; i++)
        {
            Assert.Equal(id[i], got[i], 9);
        }
    }

    [Fact]
    public void Yaw_Left_MovesForwardPointToTheRightOfTheImage()
    {
        // Source: common practice (turning the camera left moves straight-ahead objects right in the image).
        (double u, _) = (TableCamera(0) with { YawDeg = 5 }).ProjectGroundToImage(50, 0);
        Assert.Equal(640 + (1000 * Math.Tan(5 * Math.PI / 180)), u, 6);
    }

    [Fact]
    public void SaveLoad_RoundTripsAndControlPointsAgree()
    {
        CameraModel cam = TableCamera(2) with { YawDeg = 0.5, K1 = -0.1 };
        string path = Path.Combine(Path.GetTempPath(), "lb-cam-" + Guid.NewGuid().ToString("N") + ".json");
        try
        {
            cam.Save(path);
            CameraModel back = CameraModel.Load(path);
            Assert.Equal(cam, back);
            IReadOnlyList<CameraControlPoint> cps = cam.ControlPoints();
            Assert.Equal(4, cps.Count);
            foreach (CameraControlPoint c in cps)
            {
                (double u, double v) = back.ProjectGroundToImage(c.GroundXM, c.GroundYM);
                Assert.Equal(c.U, u, 6);
                Assert.Equal(c.V, v, 6);
            }
        }
        finally
        {
            File.Delete(path);
        }
    }

    [Theory]
    [InlineData("{\"imageWidth\":1280,\"imageHeight\":720,\"fy\":1000,\"cx\":640,\"cy\":360,\"mountHeightM\":1.5}", "fx: required key is missing")]
    [InlineData("{\"imageWidth\":1280,\"imageHeight\":720,\"fx\":-5,\"fy\":1000,\"cx\":640,\"cy\":360,\"mountHeightM\":1.5}", "fx: must be a positive")]
    [InlineData("{\"imageWidth\":\"wide\",\"imageHeight\":720,\"fx\":1000,\"fy\":1000,\"cx\":640,\"cy\":360,\"mountHeightM\":1.5}", "imageWidth: must be an integer")]
    [InlineData("{\"imageWidth\":1280,\"imageHeight\":720,\"fx\":1000,\"fy\":1000,\"cx\":640,\"cy\":360,\"mountHeightM\":1.5,\"groundToImage\":[1,0,0,0,1,0,0,0,1]}", "groundToImage[0]: ")]
    [InlineData("[1,2]", "one JSON object")]
    [InlineData("{\"imageWidth\":", "not valid JSON")]
    public void Parse_BadInput_NamesFileAndKey(string json, string expected)
    {
        BadInputException ex = Assert.Throws<BadInputException>(() => CameraModel.Parse(json, "cam.json"));
        Assert.StartsWith("cam.json", ex.Message, StringComparison.Ordinal);
        Assert.Contains(expected, ex.Message, StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("{\"schema_version\":2,\"image_width\":1280,\"image_height\":720,\"fx\":1000,\"fy\":1000,\"cx\":640,\"cy\":360,\"mount_height_m\":-1}", "mount_height_m: must be in")]
    [InlineData("{\"schema_version\":2,\"image_width\":1280,\"image_height\":720,\"fx\":1000,\"fy\":1000,\"cx\":640,\"cy\":360}", "mount_height_m: required key is missing")]
    [InlineData("{\"schema_version\":2,\"imageWidth\":1280,\"imageHeight\":720,\"fx\":1000,\"fy\":1000,\"cx\":640,\"cy\":360,\"mountHeightM\":1.5}", "image_width: required key is missing")]
    [InlineData("{\"schema_version\":2,\"image_width\":1280,\"image_height\":720,\"fx\":1000,\"fy\":1000,\"cx\":640,\"cy\":360,\"mount_height_m\":1.5,\"ground_to_image\":[1,0,0,0,1,0,0,0,1]}", "ground_to_image[0]: ")]
    [InlineData("{\"schema_version\":3,\"image_width\":1280}", "schema_version: unsupported version (this build reads versions 1 and 2)")]
    [InlineData("{\"version\":2,\"imageWidth\":1280}", "version: unsupported version")]
    public void Parse_Version2_BadInput_NamesTheSnakeCaseKey(string json, string expected)
    {
        BadInputException ex = Assert.Throws<BadInputException>(() => CameraModel.Parse(json, "cam.json"));
        Assert.Contains(expected, ex.Message, StringComparison.Ordinal);
    }

    // Issue 16 (one key style): render writes version 2 (snake_case); the version 1 file users already have (the
    // committed sample before 2026-12-05, camelCase) still reads to the same camera, and so does its version 2 text.
    [Fact]
    public void Version1File_AndVersion2File_ReadToTheSameCamera()
    {
        string v1 = File.ReadAllText(Testing.RepoPaths.Combine("tests", "corpus", "camera", "camera-v1.json"));
        Assert.Contains("\"mountHeightM\"", v1, StringComparison.Ordinal);
        CameraModel old = CameraModel.Parse(v1, "camera-v1.json");
        string v2 = old.ToJson();
        Assert.Contains("\"schema_version\": 2", v2, StringComparison.Ordinal);
        Assert.Contains("\"mount_height_m\": 1.5", v2, StringComparison.Ordinal);
        Assert.DoesNotContain("mountHeightM", v2, StringComparison.Ordinal);
        Assert.Equal(old, CameraModel.Parse(v2, "camera.json"));
        Assert.Equal(old, CameraModel.Load(Testing.RepoPaths.Combine("sample-frames", "camera.json")));
    }

    [Fact]
    public void Load_MissingFile_IsBadInput()
    {
        Assert.Throws<BadInputException>(() => CameraModel.Load(Path.Combine(Path.GetTempPath(), "no-such-dir-lb", "camera.json")));
    }

    [Fact]
    public void GroundToImage_LevelCamera_KeepsTheUnnormalisedClosedForm()
    {
        // Source: docs/checks.md closed form at θ = 0: H = K · [[0,−1,0],[0,0,h],[1,0,0]]; its H33 is 0,
        // so it cannot be scaled to 1 and is kept as is.
        double[] want = (new Matrix3(1000, 0, 640, 0, 1000, 360, 0, 0, 1) * new Matrix3(0, -1, 0, 0, 0, 1.5, 1, 0, 0)).ToRowMajor();
        double[] got = TableCamera(0).GroundToImage.ToRowMajor();
        for (int i = 0; i < 9; i++)
        {
            Assert.Equal(want[i], got[i], 9);
        }
    }
}
