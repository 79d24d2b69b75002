namespace ModeSolver.Sweeps;

/// <summary>Computes one sweep point. Implementations must be thread-safe (points are evaluated concurrently) and deterministic.</summary>
public interface ISweepEvaluator
{
    /// <summary>
    /// Evaluates the point: a <see cref="SweepRecord"/> with the point's index (or <see cref="SweepRecord.Failure"/>);
    /// the runner stores it as the journal reads it back (<see cref="SweepRecord.ForJournal"/>). Physics and input errors (a <see cref="Physics.ModeSolverException"/> with exit code 2 or 3)
    /// are caught by the runner and recorded as a failed point with their one-line message; any other exception (an
    /// <see cref="ArgumentException"/> included) is a bug and stops the sweep with exit code 1. An
    /// <see cref="OperationCanceledException"/> while <paramref name="ct"/> is cancelled leaves the point unfinished,
    /// to be computed again on resume.
    /// </summary>
    SweepRecord Evaluate(SweepPoint point, CancellationToken ct);
}

/// <summary>One point of a sweep: its stable index and the ordered (key, value) settings.</summary>
public sealed class SweepPoint
{
    private readonly double[] _values;

    /// <summary>Creates a point; <paramref name="values"/> is kept (not copied).</summary>
    public SweepPoint(long index, IReadOnlyList<string> keys, double[] values, bool wantSpectrum)
    {
        if (keys.Count != values.Length) throw new ArgumentException("keys and values differ in length");
        Index = index;
        Keys = keys;
        _values = values;
        WantSpectrum = wantSpectrum;
    }

    /// <summary>The point's index in the sweep's deterministic order.</summary>
    public long Index { get; }

    /// <summary>The swept keys in deck order.</summary>
    public IReadOnlyList<string> Keys { get; }

    /// <summary>The values, in the order of <see cref="Keys"/>.</summary>
    public IReadOnlyList<double> Values => _values;

    /// <summary>Whether the sweep asks for the spectrum arrays.</summary>
    public bool WantSpectrum { get; }

    /// <summary>The ordered (key, value) pairs.</summary>
    public IEnumerable<KeyValuePair<string, double>> Settings
    {
        get { for (int i = 0; i < _values.Length; i++) yield return new(Keys[i], _values[i]); }
    }

    /// <summary>The value of <paramref name="key"/>; throws a <see cref="KeyNotFoundException"/> naming it if absent.</summary>
    public double this[string key] => TryGet(key, out var v) ? v : throw new KeyNotFoundException($"sweep point {Index}: no key '{key}'");

    /// <summary>The value of <paramref name="key"/> if the point has it.</summary>
    public bool TryGet(string key, out double value)
    {
        for (int i = 0; i < _values.Length; i++)
            if (string.Equals(Keys[i], key, StringComparison.Ordinal)) { value = _values[i]; return true; }
        value = double.NaN;
        return false;
    }

    /// <inheritdoc />
    public override string ToString() =>
        $"#{Index} " + string.Join(", ", Settings.Select(kv => $"{kv.Key}={SweepAxis.Fmt(kv.Value)}"));
}

