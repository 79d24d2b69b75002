using System.Runtime.InteropServices;
using System.Text;
using ModeSolver.Decks;
using ModeSolver.Output;
using ModeSolver.Pipeline;
using ModeSolver.Spectra;
using ModeSolver.Report;

namespace ModeSolver.Native;

/// <summary>
/// One run behind an <c>ms_run*</c> handle: the parsed input (kept, so that a sampler changes keys and reruns without
/// parsing the deck again), the last result (pivot-only or whole spectrum), and the strings handed out to C. Every
/// public member takes the run's lock, so one run may be used from several threads (one call at a time) and
/// different runs run in parallel.
/// </summary>
internal sealed unsafe class NativeRun : IDisposable
{
    private readonly Lock _gate = new();
    private RunInput _input = new();
    private PivotRun? _pivot;
    private RunReport? _report;
    private PrimordialSpectrum? _interpolant;
    private int _threads;
    private byte* _error;
    private readonly List<nint> _flags = [];
    private readonly List<nint> _warnings = [];
    private bool _disposed;

    /// <summary>Runs <paramref name="body"/> under the lock; failures become a code and the run's error message.</summary>
    public int Call(Action<NativeRun> body)
    {
        lock (_gate)
        {
            if (_disposed) return NativeErrors.Usage;
            SetError(null);
            try
            {
                body(this);
                return NativeErrors.Ok;
            }
            catch (Exception e)
            {
                var (code, message) = NativeErrors.Classify(e);
                SetError(NativeErrors.OneLine(message));
                return code;
            }
        }
    }

    /// <summary>The last call's error message (UTF-8, owned by the run), or an empty string.</summary>
    public byte* Error
    {
        get { lock (_gate) return _error is null ? Empty : _error; }
    }

    /// <summary>Replaces the input by the deck text (parsed once here); the result is dropped.</summary>
    public void LoadDeck(string text, string source)
    {
        var input = DeckReader.Parse(text, source);
        _input = input;
        Drop();
    }

    /// <summary>Replaces the input by the deck file at <paramref name="path"/>.</summary>
    public void LoadDeckFile(string path)
    {
        _input = DeckReader.Read(path);
        Drop();
    }

    /// <summary>Sets a numeric deck key (command-line override rules).</summary>
    public void SetNumber(string key, double value) { _input = RunInputKeys.WithNumber(_input, key, value); Drop(); }

    /// <summary>Sets a text deck key (command-line override rules).</summary>
    public void SetText(string key, string value) { _input = RunInputKeys.WithText(_input, key, value); Drop(); }

    /// <summary>Removes a key's value.</summary>
    public void Unset(string key) { RunInputKeys.Unset(_input, key); Drop(); }

    /// <summary>Worker threads for the modes (0: all cores).</summary>
    public void SetThreads(int threads)
    {
        if (threads < 0 || threads > 4096) throw new UsageException($"threads must be from 0 (all cores) to 4096 (got {threads})");
        _threads = threads;
    }

    /// <summary>Validates the input (as `spectrum --check`): resolves the settings and builds the theory.</summary>
    public void Check()
    {
        var settings = SettingsResolver.Resolve(_input);
        SetWarnings(settings.Warnings);
    }

    /// <summary>Background, matching, normalisation and the exact pivot mode.</summary>
    public void RunPivot()
    {
        Drop();
        var settings = SettingsResolver.Resolve(_input);
        SetWarnings(settings.Warnings);
        _pivot = SpectrumPipeline.RunPivot(settings);
    }

    /// <summary>The whole pipeline: spectra across the deck's k, slow-roll comparison and flags.</summary>
    public void RunSpectrum()
    {
        Drop();
        var settings = SettingsResolver.Resolve(_input);
        SetWarnings(settings.Warnings);
        var report = SpectrumPipeline.Run(settings, new PipelineOptions { Threads = _threads });
        SetWarnings(report.Warnings);
        foreach (var f in report.Flags) _flags.Add(Utf8($"[{f.Kind}] {f.Message}"));
        var s = report.Spectrum;
        int m = s.K.Length;
        _interpolant = new PrimordialSpectrum
        {
            K = [.. s.K], Ps = [.. s.Ps], Pt = [.. s.Pt], R = [.. s.R], Ns = [.. s.Ns], Nt = [.. s.Nt], AlphaS = [.. s.AlphaS],
            AlphaT = new double[m], ErrorEstimate = [.. s.RelError], RhsEvaluations = new int[m], FrozenBeforeEnd = new bool[m],
            CheckK = [], CheckDeviation = [],
        };
        _report = report;
    }

    /// <summary>A named result of the last run (see modesolver.h for the names).</summary>
    public double Value(string name)
    {
        if (_report is { } r)
        {
            var p = r.Pivot;
            return name switch
            {
                "A_s" => p.As, "n_s" => p.Ns, "r" => p.R, "alpha_s" => p.AlphaS, "n_t" => p.Nt, "N_star" => p.NStar,
                "k_pivot" => p.KPivot, "phi_star" => p.PhiStar, "H_star" => p.HStar, "energy_scale_gev" => p.EnergyScaleGeV,
                "V_scale" => p.VScale, "N_total" => p.NTotal, "N_reh" => p.NReh, "max_rel_error" => p.MaxRelError,
                "rhs_per_mode" => p.RhsEvaluationsPerMode,
                _ => throw UnknownValue(name),
            };
        }
        if (_pivot is { } q)
        {
            var e = q.Exact;
            var p = q.Pivot;
            return name switch
            {
                "A_s" => e.Ps, "n_s" => e.Ns, "r" => e.R, "alpha_s" => e.AlphaS, "n_t" => e.Nt, "N_star" => p.NStar,
                "k_pivot" => p.KPivot, "phi_star" => p.PhiStar, "H_star" => p.HStar, "energy_scale_gev" => p.VStarQuarterGeV,
                "V_scale" => p.VScale, "N_total" => p.NTotal, "N_reh" => p.NReh, "max_rel_error" => e.ErrorEstimate,
                "rhs_per_mode" => e.RhsEvaluations,
                _ => throw UnknownValue(name),
            };
        }
        throw new UsageException($"no result yet: call ms_run_pivot or ms_run_spectrum before asking for {name}");
    }

    /// <summary>
    /// The estimated absolute error of a pivot value of the last run (A_s, n_s, alpha_s, r, n_t; summary.json's
    /// <c>errors</c>), NaN when not estimated.
    /// </summary>
    public double ValueError(string name)
    {
        var e = _report?.Pivot.Errors ?? _pivot?.Exact.Errors
            ?? throw new UsageException($"no result yet: call ms_run_pivot or ms_run_spectrum before asking for the error of {name}");
        return name switch
        {
            "A_s" => e.As, "n_s" => e.Ns, "alpha_s" => e.AlphaS, "r" => e.R, "n_t" => e.Nt,
            _ => throw new UsageException($"'{name}' has no error estimate (valid: A_s, n_s, alpha_s, r, n_t)"),
        };
    }

    /// <summary>
    /// Whether the last run met the requested tolerance (summary.json's <c>tolerance_met</c>): max_rel_error at most
    /// modes.tolerance (after a pivot-only run, the pivot mode's estimate).
    /// </summary>
    public bool ToleranceMet()
    {
        if (_report is { } r) return r.Pivot.ToleranceMet;
        if (_pivot is { } q) return q.Exact.ErrorEstimate <= q.Settings.KRange.Tolerance;
        throw new UsageException("no result yet: call ms_run_pivot or ms_run_spectrum before asking whether the tolerance was met");
    }

    /// <summary>Number of spectrum samples of the last spectrum run.</summary>
    public int SpectrumSize => Report("the spectrum size").Spectrum.K.Length;

    /// <summary>Copies the run's own samples (k in 1/Mpc, P_s, P_t, estimated relative error of P_s) into caller buffers.</summary>
    public void CopySpectrum(double* k, double* ps, double* pt, double* relError, nuint capacity)
    {
        var s = Report("the spectrum").Spectrum;
        int m = s.K.Length;
        if (capacity < (nuint)m) throw new UsageException($"the buffers hold {capacity} values; the spectrum has {m} (ask ms_run_spectrum_size)");
        for (int i = 0; i < m; i++)
        {
            if (k is not null) k[i] = s.K[i];
            if (ps is not null) ps[i] = s.Ps[i];
            if (pt is not null) pt[i] = s.Pt[i];
            if (relError is not null) relError[i] = s.RelError[i];
        }
    }

    /// <summary>P_s and P_t at caller k (1/Mpc) inside the run's k range, by the spectrum stage's own interpolation.</summary>
    public void SpectrumAt(double* k, nuint n, double* ps, double* pt)
    {
        Report("spectra at given k");
        var f = _interpolant!;
        if (n > 0 && k is null) throw new UsageException("k is a null pointer");
        double lo = f.K[0], hi = f.K[^1];
        for (nuint i = 0; i < n; i++)
        {
            double x = k[i];
            if (!(x >= lo * (1 - 1e-9) && x <= hi * (1 + 1e-9)))
                throw new DeckException(FormattableString.Invariant(
                    $"k = {x:G6} /Mpc (element {i}) is outside the run's k range [{lo:G6}, {hi:G6}] /Mpc; widen modes.k_min/modes.k_max"), "k");
        }
        for (nuint i = 0; i < n; i++)
        {
            double x = Math.Clamp(k[i], lo, hi);
            if (ps is not null) ps[i] = f.InterpolatePs(x);
            if (pt is not null) pt[i] = f.InterpolatePt(x);
        }
    }

    /// <summary>Flags of the last spectrum run, "[kind] message" (owned by the run).</summary>
    public int FlagCount { get { lock (_gate) return _flags.Count; } }

    /// <summary>Warnings of the last run (owned by the run).</summary>
    public int WarningCount { get { lock (_gate) return _warnings.Count; } }

    /// <summary>Flag <paramref name="i"/>, or null when out of range.</summary>
    public byte* Flag(nuint i) { lock (_gate) return i < (nuint)_flags.Count ? (byte*)_flags[(int)i] : null; }

    /// <summary>Warning <paramref name="i"/>, or null when out of range.</summary>
    public byte* Warning(nuint i) { lock (_gate) return i < (nuint)_warnings.Count ? (byte*)_warnings[(int)i] : null; }

    /// <summary>Frees everything the run handed out.</summary>
    public void Dispose()
    {
        lock (_gate)
        {
            if (_disposed) return;
            _disposed = true;
            Drop();
            SetError(null);
        }
    }

    private RunReport Report(string what) =>
        _report ?? throw new UsageException($"{what} needs a spectrum run: call ms_run_spectrum first");

    private static UsageException UnknownValue(string name) => new(
        $"'{name}' is not a result name (valid: A_s, n_s, r, alpha_s, n_t, N_star, k_pivot, phi_star, H_star, energy_scale_gev, V_scale, N_total, N_reh, max_rel_error, rhs_per_mode)");

    private void Drop()
    {
        _pivot = null;
        _report = null;
        _interpolant = null;
        FreeAll(_flags);
        FreeAll(_warnings);
    }

    private void SetWarnings(IEnumerable<string> warnings)
    {
        FreeAll(_warnings);
        foreach (string w in warnings) _warnings.Add(Utf8(w));
    }

    private void SetError(string? message)
    {
        if (_error is not null) NativeMemory.Free(_error);
        _error = message is null ? null : (byte*)Utf8(message);
    }

    private static void FreeAll(List<nint> strings)
    {
        foreach (nint p in strings) NativeMemory.Free((void*)p);
        strings.Clear();
    }

    /// <summary>A NUL-terminated UTF-8 copy in native memory (freed by the run).</summary>
    internal static nint Utf8(string s)
    {
        int n = Encoding.UTF8.GetByteCount(s);
        byte* p = (byte*)NativeMemory.Alloc((nuint)n + 1);
        Encoding.UTF8.GetBytes(s, new Span<byte>(p, n));
        p[n] = 0;
        return (nint)p;
    }

    private static readonly byte* Empty = (byte*)Utf8("");
}
