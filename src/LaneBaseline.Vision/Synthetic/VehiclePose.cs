namespace LaneBaseline.Vision.Synthetic;

/// <summary>The ego vehicle's pose in the world plane; converts world points to the vehicle (ground) frame.</summary>
/// <remarks>Vehicle frame: X forward, Y left, metres, origin on the road below the camera.</remarks>
internal readonly struct VehiclePose
{
    private readonly double x, y, cos, sin;

    public VehiclePose(double x, double y, double heading)
    {
        this.x = x;
        this.y = y;
        cos = Math.Cos(heading);
        sin = Math.Sin(heading);
        Heading = heading;
    }

    public double Heading { get; }

    public (double X, double Y) ToVehicle(double wx, double wy)
    {
        double dx = wx - x, dy = wy - y;
        return ((cos * dx) + (sin * dy), (-sin * dx) + (cos * dy));
    }
}
