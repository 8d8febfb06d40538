using System.Globalization;
using System.Text;
using LaneBaseline.Core;
using LaneBaseline.Core.Calibration;
using LaneBaseline.Core.LaneFiles;
using LaneBaseline.Core.Metrics;
using LaneBaseline.Core.Options;
using LaneBaseline.Core.Results;
using LaneBaseline.Vision.IO;
using LaneBaseline.Vision.Metrics;
using LaneBaseline.Vision.Pipeline;
using OpenCvSharp;

namespace LaneBaseline.Cli.Commands;

/// <summary>What a <c>tune --calibrate</c> run measured.</summary>
internal sealed record CalibrationSummary(int Frames, int Lanes, int Positives, double EceBefore, double EceAfter);
