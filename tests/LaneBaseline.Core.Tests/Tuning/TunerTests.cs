using LaneBaseline.Core.Tuning;
using Xunit;

namespace LaneBaseline.Core.Tests.Tuning;

public sealed class TunerTests
{
    private static readonly SearchSpace Space = new(
    [
        new TuneParameter("a.x", 0, 10),
        new TuneParameter("b.n", 10, 120, WholeNumbers: true),
        new TuneParameter("c.s", 0.01, 10, Log: true),
    ]);

    // Tiny synthetic objective with a known optimum at x = 3.2, n = 70, s = 0.5 (value 0).
    private static double Objective(IReadOnlyList<double> v) =>
        -(Math.Pow(v[0] - 3.2, 2) + Math.Pow((v[1] - 70) / 10, 2) + Math.Pow(Math.Log(v[2] / 0.5), 2));

    // Source: van der Corput / Halton (1960) radical inverse: base 2 gives 1/2, 1/4, 3/4, 1/8; base 3 gives 1/3, 2/3, 1/9.
    [Fact]
    public void Halton_MatchesRadicalInverse()
    {
        Assert.Equal([0.5, 0.25, 0.75, 0.125], Enumerable.Range(1, 4).Select(i => Tuner.Halton(i, 2)));
        Assert.Equal(1.0 / 3, Tuner.Halton(1, 3), 15);
        Assert.Equal(2.0 / 3, Tuner.Halton(2, 3), 15);
        Assert.Equal(1.0 / 9, Tuner.Halton(3, 3), 15);
    }

    [Fact]
    public void Run_FindsKnownOptimum()
    {
        IReadOnlyList<Trial> trials = new Tuner(Space, 80, seed: 4, threads: 2).Run(Objective);
        Trial best = Tuner.Best(trials);
        Assert.Equal(80, trials.Count);
        Assert.InRange(best.Values[0], 2.9, 3.5);
        Assert.InRange(best.Values[1], 65, 75);
        Assert.InRange(best.Values[2], 0.35, 0.7);
        Assert.Equal(Math.Round(best.Values[1]), best.Values[1]); // whole-number parameter stays whole
        Assert.Contains(trials, t => t.Phase == "refine");
        // The refinement must have improved on the best quasi-random point.
        Assert.True(best.Score > Tuner.Best([.. trials.Where(t => t.Phase == "explore")]).Score);
    }

    [Fact]
    public void Run_WithStart_EvaluatesTheClampedStartFirst_AndNeverEndsBelowIt()
    {
        // Start outside the box on two axes: x = 12 clamps to 10, n = 64.6 rounds to 65, s = 0.5 stays.
        // Source: common practice (a pattern search started at a feasible point never returns a worse point).
        IReadOnlyList<Trial> trials = new Tuner(Space, 12, seed: 4, threads: 2) { Start = [12, 64.6, 0.5] }.Run(Objective);
        Assert.Equal(12, trials.Count);
        Assert.Equal("start", trials[0].Phase);
        Assert.Equal([10, 65, 0.5], trials[0].Values);
        Assert.Equal(Objective([10, 65, 0.5]), trials[0].Score, 12);
        Assert.True(Tuner.Best(trials).Score >= trials[0].Score);
        Assert.Equal(12 - 1 - (int)Math.Ceiling(12 * 0.6) + 1, trials.Count(t => t.Phase == "refine"));
    }

    [Fact]
    public void Run_SameSeed_SameTrialsWhateverThreads()
    {
        IReadOnlyList<Trial> a = new Tuner(Space, 40, seed: 9, threads: 1).Run(Objective);
        IReadOnlyList<Trial> b = new Tuner(Space, 40, seed: 9, threads: 3).Run(Objective);
        Assert.Equal(a.Select(t => (t.Phase, string.Join(',', t.Values), t.Score)), b.Select(t => (t.Phase, string.Join(',', t.Values), t.Score)));
        IReadOnlyList<Trial> c = new Tuner(Space, 40, seed: 10, threads: 1).Run(Objective);
        Assert.NotEqual(a[0].Values, c[0].Values);
    }

    [Fact]
    public void Run_Resumed_ReusesLoggedTrials_AndEndsTheSame()
    {
        IReadOnlyList<Trial> full = new Tuner(Space, 30, seed: 2, threads: 2).Run(Objective);
        int calls = 0;
        IReadOnlyList<Trial> resumed = new Tuner(Space, 30, seed: 2, threads: 2).Run(
            v =>
            {
                Interlocked.Increment(ref calls);
                return Objective(v);
            },
            previous: [.. full.Take(17)]);
        Assert.Equal(30 - 17, calls);
        Assert.Equal(full.Select(t => t.Score), resumed.Select(t => t.Score));
    }

    [Fact]
    public void SearchSpace_BadKey_NamesFileAndLine()
    {
        const string yaml = "parameters:\n  - key: canny.lowThreshold\n    min: 10\n    maxx: 20\n";
        BadInputException ex = Assert.Throws<BadInputException>(() => SearchSpace.Parse(yaml, "space.yaml"));
        Assert.Equal("space.yaml:4: maxx: unknown key (expected key, min, max, type, scale)", ex.Message);
        SearchSpace ok = SearchSpace.Parse("parameters:\n  - {key: a.b, min: 1, max: 9, type: int, scale: log}\n", "s.yaml");
        Assert.True(ok.Parameters[0].WholeNumbers && ok.Parameters[0].Log);
    }
}
