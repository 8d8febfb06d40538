using LaneBaseline.Core.Metrics;

namespace LaneBaseline.Cli.Reports;

/// <summary>What the gallery needs: the images and the lane files the score came from.</summary>
/// <param name="FramesDir">Folder the frame keys are relative to.</param>
/// <param name="TruthPath">Truth lane file.</param>
/// <param name="Systems">Prediction lane files with their names.</param>
/// <param name="Threads">Worker threads for the gallery's scoring pass (the page does not depend on it).</param>
internal sealed record GalleryRequest(string FramesDir, string TruthPath, IReadOnlyList<ScoredSystem> Systems, int Threads = 1)
{
    /// <summary>Frame scores captured by the score run that produced the results, or null to score the frames here.</summary>
    public WorstFrameGallery.FrameCandidates? Candidates { get; init; }

    /// <summary>The score run's settings when known in memory (else read from the score file).</summary>
    public ScoreSettings? Settings { get; init; }

    /// <summary>The network of the regression gallery (<c>--focus</c>), or null for the first system that is not the baseline.</summary>
    public string? Focus { get; init; }
}
