using System.Collections.Concurrent;
using ModeSolver.Physics;

namespace ModeSolver.Spectra;

/// <summary>
/// Solves one mode per wavenumber in parallel with one workspace per worker (any mode integrator), each k independent
/// so the results are bit-identical for any number of threads; a failure is reported at the smallest k whatever the
/// thread schedule (a <see cref="PhysicsException"/> as it is, anything else wrapped in one naming the k).
/// </summary>
internal static class ParallelModes
{
    public static TResult[] Solve<TWorker, TResult>(double[] ks, int dop, Func<TWorker> worker, Func<TWorker, double, TResult> solve)
    {
        var results = new TResult[ks.Length];
        var options = new ParallelOptions { MaxDegreeOfParallelism = dop > 0 ? dop : Environment.ProcessorCount };
        var exceptions = new ConcurrentQueue<(int Index, Exception Error)>();
        Parallel.ForEach(Partitioner.Create(0, ks.Length, Math.Max(1, ks.Length / (4 * options.MaxDegreeOfParallelism))), options,
            worker,
            (range, _, w) =>
            {
                for (int i = range.Item1; i < range.Item2; i++)
                {
                    try { results[i] = solve(w, ks[i]); }
                    catch (Exception e) { exceptions.Enqueue((i, e)); }
                }
                return w;
            },
            _ => { });
        if (!exceptions.IsEmpty)
        {
            var first = exceptions.OrderBy(x => x.Index).First().Error;
            if (first is PhysicsException) throw first;
            throw new PhysicsException($"mode k = {ks[exceptions.Min(x => x.Index)]:G6} failed: {first.Message}", first);
        }
        return results;
    }
}
