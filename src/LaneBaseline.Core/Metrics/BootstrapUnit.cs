namespace LaneBaseline.Core.Metrics;

/// <summary>What one bootstrap draw resamples.</summary>
public enum BootstrapUnit
{
    /// <summary>Single frames (Efron 1979).</summary>
    Frame,

    /// <summary>Whole sequences, the key without its trailing frame number (cluster bootstrap; Davison &amp; Hinkley 1997, Sec. 3.8).</summary>
    Sequence,
}
