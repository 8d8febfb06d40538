using LaneBaseline.Core.Random;

namespace LaneBaseline.Core.Tuning;

/// <summary>
/// Derivative-free search over a <see cref="SearchSpace"/>: a seeded, randomly shifted Halton sequence explores the
/// box (about 60 % of the budget), then a compass (pattern) search refines around the best trial, halving its step
/// whenever no neighbour improves. Trials are proposed in fixed batches and evaluated in parallel; the next batch
/// depends only on the seed and earlier results, so the outcome does not depend on the thread count. Ties go to the
/// earlier trial. A run can be resumed from its trial log: logged trials are reused instead of re-evaluated.
/// </summary>
/// <remarks>
/// <para>References: [1] J. H. Halton, "On the efficiency of certain quasi-random sequences of points in evaluating
/// multi-dimensional integrals", Numerische Mathematik 2, 1960, DOI 10.1007/BF01386213. [2] R. Cranley, T. N. L.
/// Patterson, "Randomization of number theoretic methods for multiple integration", SIAM J. Numer. Anal. 13(6), 1976
/// (random shift). [3] T. G. Kolda, R. M. Lewis, V. Torczon, "Optimization by direct search", SIAM Review 45(3),
/// 2003, DOI 10.1137/S003614450242889 (compass search).</para>
/// </remarks>
public sealed class Tuner
{
    private static readonly int[] Primes = [2, 3, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37, 41, 43, 47, 53, 59, 61, 67, 71];
    private readonly SearchSpace space;
    private readonly double[] shift;

    /// <summary>Creates a tuner.</summary>
    public Tuner(SearchSpace space, int budget, ulong seed, int threads)
    {
        ArgumentNullException.ThrowIfNull(space);
        ArgumentOutOfRangeException.ThrowIfLessThan(budget, 1);
        if (space.Parameters.Count > Primes.Length)
        {
            throw new ArgumentException($"at most {Primes.Length} parameters can be tuned", nameof(space));
        }

        this.space = space;
        Budget = budget;
        Threads = Math.Max(1, threads);
        var rng = new SplitMix64(seed);
        shift = [.. space.Parameters.Select(_ => rng.NextDouble())];
    }

    /// <summary>Total trials.</summary>
    public int Budget { get; }

    /// <summary>Parallel evaluations per batch.</summary>
    public int Threads { get; }

    /// <summary>
    /// Optional starting point (search-space order), evaluated first as trial 0 with phase <c>start</c>, e.g. the
    /// base preset's own values, so the search can only improve on it and refinement can start from it. Values are
    /// clamped into the declared ranges.
    /// </summary>
    public IReadOnlyList<double>? Start { get; init; }

    /// <summary>Trials spent exploring before refinement (including the start point).</summary>
    public int ExploreBudget => Math.Max(1, (int)Math.Ceiling(Budget * 0.6));

    /// <summary>
    /// Runs the search. <paramref name="objective"/> maps values (search-space order) to a score to maximise; it may
    /// be called from several threads at once.
    /// </summary>
    /// <param name="objective">The objective.</param>
    /// <param name="previous">Trials from an earlier, interrupted run with the same space, budget and seed.</param>
    /// <param name="onTrial">Called for each newly evaluated trial, in index order.</param>
    /// <param name="cancellationToken">Stops between batches.</param>
    public IReadOnlyList<Trial> Run(
        Func<IReadOnlyList<double>, double> objective,
        IReadOnlyList<Trial>? previous = null,
        Action<Trial>? onTrial = null,
        CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(objective);
        var done = new List<Trial>();
        int d = space.Parameters.Count;

        // Phase 1: shifted Halton points.
        int explore = Math.Min(Budget, ExploreBudget);
        var candidates = new List<double[]>();
        if (Start is { } start)
        {
            if (start.Count != d)
            {
                throw new InvalidOperationException("the start point needs one value per parameter");
            }

            Evaluate([[.. space.Parameters.Select((p, k) => p.WholeNumbers ? Math.Round(Math.Clamp(start[k], p.Min, p.Max), MidpointRounding.ToEven) : Math.Clamp(start[k], p.Min, p.Max))]], "start", objective, previous, onTrial, done, cancellationToken);
            explore--;
        }

        for (int i = 0; i < explore; i++)
        {
            var v = new double[d];
            for (int k = 0; k < d; k++)
            {
                double u = Halton(i + 1, Primes[k]) + shift[k];
                v[k] = space.Parameters[k].FromUnit(u - Math.Floor(u));
            }

            candidates.Add(v);
        }

        Evaluate(candidates, "explore", objective, previous, onTrial, done, cancellationToken);

        // Phase 2: compass search around the best, step in unit coordinates.
        double step = 0.125;
        while (done.Count < Budget && step > 1e-4)
        {
            Trial best = Best(done);
            var batch = new List<double[]>();
            for (int k = 0; k < d && done.Count + batch.Count < Budget; k++)
            {
                foreach (int sign in new[] { +1, -1 })
                {
                    if (done.Count + batch.Count >= Budget)
                    {
                        break;
                    }

                    TuneParameter p = space.Parameters[k];
                    var v = best.Values.ToArray();
                    v[k] = p.FromUnit(p.ToUnit(v[k]) + (sign * step));
                    if (v[k] != best.Values[k] && !done.Any(t => t.Values.SequenceEqual(v)) && !batch.Any(b => b.SequenceEqual(v)))
                    {
                        batch.Add(v);
                    }
                }
            }

            if (batch.Count == 0)
            {
                step /= 2;
                continue;
            }

            Evaluate(batch, "refine", objective, previous, onTrial, done, cancellationToken);
            if (Best(done) == best)
            {
                step /= 2;
            }
        }

        return done;
    }

    /// <summary>The best trial: highest score, earliest on ties.</summary>
    public static Trial Best(IReadOnlyList<Trial> trials)
    {
        ArgumentNullException.ThrowIfNull(trials);
        Trial best = trials[0];
        foreach (Trial t in trials)
        {
            if (t.Score > best.Score)
            {
                best = t;
            }
        }

        return best;
    }

    /// <summary>Element of the van der Corput sequence in the given base (the Halton coordinate).</summary>
    public static double Halton(int index, int radix)
    {
        double f = 1, r = 0;
        for (int i = index; i > 0; i /= radix)
        {
            f /= radix;
            r += f * (i % radix);
        }

        return r;
    }

    private void Evaluate(
        List<double[]> candidates,
        string phase,
        Func<IReadOnlyList<double>, double> objective,
        IReadOnlyList<Trial>? previous,
        Action<Trial>? onTrial,
        List<Trial> done,
        CancellationToken cancellationToken)
    {
        for (int start = 0; start < candidates.Count; start += Threads)
        {
            cancellationToken.ThrowIfCancellationRequested();
            int n = Math.Min(Threads, candidates.Count - start);
            var scores = new double[n];
            var reused = new bool[n];
            for (int i = 0; i < n; i++)
            {
                int index = done.Count + i;
                if (previous is not null && index < previous.Count && previous[index].Values.SequenceEqual(candidates[start + i]))
                {
                    scores[i] = previous[index].Score;
                    reused[i] = true;
                }
            }

            Parallel.For(0, n, new ParallelOptions { MaxDegreeOfParallelism = Threads, CancellationToken = cancellationToken }, i =>
            {
                if (!reused[i])
                {
                    scores[i] = objective(candidates[start + i]);
                }
            });

            for (int i = 0; i < n; i++)
            {
                var trial = new Trial(done.Count, phase, candidates[start + i], scores[i]);
                done.Add(trial);
                if (!reused[i])
                {
                    onTrial?.Invoke(trial);
                }
            }
        }
    }
}
