using LaneBaseline.Core.Results;

namespace LaneBaseline.Vision.Pipeline.Workspace;

/// <summary>
/// The sliding-window search's state (stage <c>fit</c>): column histogram, lane candidates with their windows and
/// fits, and the fit scratch. The finished lanes go to <see cref="FrameWorkspace"/>'s output.
/// </summary>
public sealed class SearchSection
{
    internal SearchSection(int birdsEyeWidth)
    {
        ColumnMass = new double[birdsEyeWidth];
        Smoothed = new double[birdsEyeWidth];
        CandidateX = new double[FrameWorkspace.MaxCandidates];
        CandidateMass = new double[FrameWorkspace.MaxCandidates];
        CandidateWindows = new SearchWindow[FrameWorkspace.MaxCandidates][];
        CandidateFits = new LaneEstimate[FrameWorkspace.MaxCandidates];
        CandidateTopY = new double[FrameWorkspace.MaxCandidates];
        for (int i = 0; i < FrameWorkspace.MaxCandidates; i++)
        {
            CandidateWindows[i] = new SearchWindow[FrameWorkspace.MaxWindows];
        }

        FitX = new double[FrameWorkspace.MaxWindows];
        FitY = new double[FrameWorkspace.MaxWindows];
        FitW = new double[FrameWorkspace.MaxWindows];
        FitUse = new bool[FrameWorkspace.MaxWindows];
        FitBest = new bool[FrameWorkspace.MaxWindows];
    }

    internal double[] ColumnMass { get; }

    internal double[] Smoothed { get; }

    internal int CandidateCount { get; set; }

    internal double[] CandidateX { get; }

    internal double[] CandidateMass { get; }

    internal SearchWindow[][] CandidateWindows { get; }

    internal LaneEstimate[] CandidateFits { get; }

    internal double[] CandidateTopY { get; }

    internal int WindowCount { get; set; }

    internal double[] FitX { get; }

    internal double[] FitY { get; }

    internal double[] FitW { get; }

    internal bool[] FitUse { get; }

    internal bool[] FitBest { get; }
}
