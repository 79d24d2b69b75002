using System.Globalization;
using ModeSolver.Integrators;
using ModeSolver.Models;
using ModeSolver.Physics;

namespace ModeSolver.Background;

/// <summary>What one background integration produced, before it is packed into a solution.</summary>
internal sealed record BackgroundOutcome(List<BackgroundSegment> Segments, double NEnd, List<double> Crossings, List<double> Rising,
    List<double> NonSmooth, bool EndedAtSurface, string? ContinuationNote, string? ContinuationStop);

/// <summary>
/// The one background loop for any number of fields: the state is (phi^I, phi'^I) during inflation and
/// (phi^I, phi'^I, ln H) after an end, 2n or 2n + 1 entries. Events are surfaces g(phi) = 0 (end surface, non-smooth
/// surfaces, boundaries of the valid region) plus the epsilon_1 = 1 crossings and V = 0. For one field given as a
/// <see cref="SingleFieldTheory"/> the right-hand sides and e1 are the single-field forms of
/// <see cref="BackgroundEquations"/> on the inner theory (the fast path, and the same numbers as before the n-field
/// solver); otherwise the covariant forms of <see cref="CovariantBackgroundEquations"/>.
/// </summary>
internal sealed class BackgroundRun
{
    private enum Kind { Rise, Fall, VZero, EndSurface, Boundary, Kink }

    private readonly IFieldTheory _field;
    private readonly int _n;
    private readonly IInflatonTheory? _theory;   // the single-field fast path, null for the covariant one
    private readonly IInflatonTheory? _after;
    private readonly CovariantBackgroundEquations? _cov;
    private readonly BackgroundSettings _s;
    private readonly FieldSurface? _end;
    private readonly IOdeMethod _inflation;
    private readonly IOdeMethod _reheating;
    private readonly RightHandSide _constrained;
    private readonly RightHandSide _regular;
    private readonly List<BackgroundSegment> _segments = new();
    private readonly List<double> _crossings = new();
    private readonly List<double> _rising = new();
    private readonly List<double> _nonSmooth = new();
    private readonly double[] _sidePhi;

    public BackgroundRun(IFieldTheory field, BackgroundSettings s, FieldSurface? end, IOdeMethod inflation, IOdeMethod reheating)
    {
        _field = field;
        _n = field.FieldCount;
        _s = s;
        _end = end;
        _inflation = inflation;
        _reheating = reheating;
        _sidePhi = new double[_n];
        if (field is SingleFieldTheory single)
        {
            var theory = single.Inner;
            _theory = theory;
            _constrained = (t, y, d) => BackgroundEquations.Constrained(theory, Side(y[0]), y, d);
            // After the end the field is back where double arithmetic resolves the slope: the continuation evaluates a
            // double-double Jordan-frame map in plain double (its many fast oscillations would otherwise dominate the run).
            _after = theory is JordanFrameTheory { IsExtendedPrecision: true } j ? j.WithPlainPrecision() : theory;
            var after = _after;
            _regular = (t, y, d) => BackgroundEquations.Regular(after, Side(y[0]), y, d);
        }
        else
        {
            var cov = new CovariantBackgroundEquations(field);
            _cov = cov;
            _constrained = (t, y, d) => cov.Constrained(SidePhi(y), y, d);
            _regular = (t, y, d) => cov.Regular(SidePhi(y), y, d);
        }
    }

    // When a segment starts exactly on a coordinate kink phi^I = c, V and G are evaluated one ulp to the side the field
    // moves to, so the first stage of the restart sees the slope of the new branch.
    private int _kinkIndex;
    private double _kinkPhi = double.NaN;
    private double _kinkDirection;

    private double Side(double phi)
        => phi == _kinkPhi ? (_kinkDirection > 0 ? Math.BitIncrement(phi) : Math.BitDecrement(phi)) : phi;

    private ReadOnlySpan<double> SidePhi(ReadOnlySpan<double> y)
    {
        if (double.IsNaN(_kinkPhi) || y[_kinkIndex] != _kinkPhi) return y[.._n];
        y[.._n].CopyTo(_sidePhi);
        _sidePhi[_kinkIndex] = Side(y[_kinkIndex]);
        return _sidePhi;
    }

    private void SetRestart(ReadOnlySpan<double> y, FieldSurface? kink)
    {
        if (kink is { IsCoordinate: true })
        {
            _kinkIndex = kink.CoordinateIndex;
            _kinkPhi = y[_kinkIndex];
            _kinkDirection = y[_n + _kinkIndex];
        }
        else
        {
            _kinkPhi = double.NaN;
            _kinkDirection = y[_n + _kinkIndex];
        }
    }

    private double E1(ReadOnlySpan<double> y) => _theory is { } t ? 0.5 * t.Kinetic(y[0]).Value * y[1] * y[1] : _cov!.Epsilon1(y);

    private double E1After(ReadOnlySpan<double> y) => _after is { } t ? 0.5 * t.Kinetic(y[0]).Value * y[1] * y[1] : _cov!.Epsilon1(y);

    private double Potential(ReadOnlySpan<double> phi) => _theory is { } t ? t.Potential(phi[0]).Value : _field.Potential(phi);

    private static EventDirection Direction(SurfaceCrossing c) => c switch
    {
        SurfaceCrossing.Rising => EventDirection.Rising,
        SurfaceCrossing.Falling => EventDirection.Falling,
        _ => EventDirection.Either,
    };

    /// <summary>"phi = 1.5" for one field, "(phi, chi) = (1.5, 2)" for several.</summary>
    internal static string DescribeFields(IFieldTheory field, ReadOnlySpan<double> y, string format = "G6")
    {
        int n = field.FieldCount;
        if (n == 1) return $"{field.FieldNames[0]} = {y[0].ToString(format, CultureInfo.InvariantCulture)}";
        var values = new string[n];
        for (int i = 0; i < n; i++) values[i] = y[i].ToString(format, CultureInfo.InvariantCulture);
        return $"({string.Join(", ", field.FieldNames)}) = ({string.Join(", ", values)})";
    }

    private string DescribeVelocity(ReadOnlySpan<double> y)
    {
        if (_n == 1) return $"dphi/dN = {y[1].ToString("G6", CultureInfo.InvariantCulture)}";
        var values = new string[_n];
        for (int i = 0; i < _n; i++) values[i] = y[_n + i].ToString("G6", CultureInfo.InvariantCulture);
        return $"dphi/dN = ({string.Join(", ", values)})";
    }

    private void AddKinkEvents(List<EventSpec> specs, List<(Kind, FieldSurface?)> kinds, ReadOnlySpan<double> phiNow)
    {
        var surfaces = _field.NonSmoothSurfaces;
        for (int i = 0; i < surfaces.Count; i++)
        {
            var surface = surfaces[i];
            if (surface.Contains(phiNow)) continue;
            specs.Add(new EventSpec((t, y) => surface.Value(y), Direction(surface.Crossing), Terminal: true, Name: "kink"));
            kinds.Add((Kind.Kink, surface));
        }
    }

    private void AddRangeEvents(List<EventSpec> specs, List<(Kind, FieldSurface?)> kinds)
    {
        var bounds = _field.Boundaries;
        for (int i = 0; i < bounds.Count; i++)
        {
            var surface = bounds[i];
            specs.Add(new EventSpec((t, y) => surface.Value(y), Direction(surface.Crossing), Terminal: true, Name: surface.Name));
            kinds.Add((Kind.Boundary, surface));
        }
    }

    /// <summary>
    /// Step budget of the whole continuation after an end of inflation (all its segments together): the planned few
    /// e-folds of oscillations need a few thousand steps; a continuation that needs far more follows very fast
    /// oscillations (the Palatini map at large xi: omega/H ~ sqrt(xi)) or is stuck at a singular or non-smooth minimum,
    /// and only ends early (with its warning) instead of spending the run's time there.
    /// </summary>
    public const int ContinuationStepBudget = 10_000;

    private int _continuationSteps;

    /// <summary>
    /// Oscillations about a smooth minimum after which a fast continuation stops (see <see cref="FastOscillationRatio"/>):
    /// enough to show the oscillation's shape and amplitude in the plots and the post-inflation epsilon_1, which are all
    /// the continuation feeds (the pivot, the modes and the spectra end before the end of inflation).
    /// </summary>
    public const int ContinuationOscillations = 20;

    /// <summary>
    /// omega/H (measured from the oscillations' period in N) above which the continuation stops after
    /// <see cref="ContinuationOscillations"/> oscillations instead of following the planned e-folds after the end: beyond
    /// it the remaining planned e-folds would take more than ~30 oscillations per e-fold, each a dozen steps or more.
    /// </summary>
    public const double FastOscillationRatio = 200;

    /// <summary>The fast continuation stops only when the planned e-folds left would take more oscillations than this.</summary>
    public const double RemainingOscillationsToStop = 10 * ContinuationOscillations;

    private string? _continuationStop;

    private OdeSolution Integrate(IOdeMethod method, RightHandSide rhs, double t0, double[] y0, double tEnd, List<EventSpec> events, int? maxSteps = null)
    {
        bool continuation = ReferenceEquals(rhs, _regular);
        int budget = maxSteps ?? (continuation ? Math.Max(1, Math.Min(_s.MaxSteps, ContinuationStepBudget - _continuationSteps)) : _s.MaxSteps);
        var options = new OdeOptions
        {
            RelativeTolerance = _s.Tolerance,
            AbsoluteTolerance = 1e-2 * _s.Tolerance,
            Events = events,
            DenseOutput = true,
            MaxSteps = budget,
            MaxStep = _s.MaxStep,
        };
        try
        {
            var sol = method.Solve(new OdeProblem(rhs, t0, y0, tEnd), options);
            if (continuation) _continuationSteps += sol.Statistics.AcceptedSteps + sol.Statistics.RejectedSteps;
            return sol;
        }
        catch (IntegrationException ex)
        {
            if (continuation) _continuationSteps += budget;
            bool known = ex.State.Length >= 2 * _n;
            string state = known ? $"{DescribeFields(_field, ex.State)}, {DescribeVelocity(ex.State)}" : "state unknown";
            if (known && _cov is not null && NotPositiveDefinite(ex.State) is { } where)
                throw new PhysicsException($"The field-space metric G_IJ is not positive definite at {where} (reached near N = {ex.T:G8}): the theory is not valid there; restrict the start or the metric, or end inflation before it (end surface).", ex);
            if (known && NonFiniteModel(ex.State) is { } bad)
                throw new PhysicsException($"The background integration broke down at N = {ex.T:G8}, {state}: the model is not finite there ({bad}); the potential or kinetic function is undefined there (e.g. sqrt or log of a negative number): restrict the model or end inflation before it (phi_end).", ex);
            throw new PhysicsException($"The background integration broke down ({ex.Failure}) at N = {ex.T:G8}, {state}: {OneLine(ex.Message)}; check the potential there or loosen the tolerance.", ex);
        }
    }

    /// <summary>The event that stopped the integration (the driver may append simultaneous non-terminal ones after it).</summary>
    private static EventOccurrence TerminalEvent(OdeSolution sol, List<EventSpec> specs)
    {
        foreach (var ev in sol.Events)
            if (specs[ev.EventIndex].Terminal && ev.T == sol.TFinal) return ev;
        return sol.Events[^1];
    }

    /// <summary>Field values, along the direction of motion from the state, at which a failing step may have probed.</summary>
    private List<double[]> Probes(ReadOnlySpan<double> y)
    {
        int n = _n;
        var probes = new List<double[]>();
        var phi = y[..n].ToArray();
        var dir = new double[n];
        double speed = 0;
        for (int i = 0; i < n; i++) speed += y[n + i] * y[n + i];
        speed = Math.Sqrt(speed);
        for (int i = 0; i < n; i++)
            dir[i] = double.IsFinite(speed) && speed > 0 ? y[n + i] / speed * Math.Max(speed, 1e-3) : (i == 0 ? 1.0 : 0.0);
        probes.Add(phi);
        for (double h = 1e-9; h <= 0.5; h *= 3)
        {
            var x = new double[n];
            for (int i = 0; i < n; i++) x[i] = phi[i] + dir[i] * h;
            probes.Add(x);
        }
        return probes;
    }

    /// <summary>The first field values (at the state or just ahead of it) where G is not positive definite, described; null when G is positive definite there.</summary>
    internal string? NotPositiveDefinite(ReadOnlySpan<double> y)
    {
        int n = _n;
        var g = new double[n * n];
        var scratch = new double[n * n];
        foreach (var x in Probes(y))
        {
            if (!AllFinite(x)) return null;
            _field.Metric(x, g);
            if (!AllFinite(g)) continue;
            double pivot = FieldGeometry.SmallestPivot(g, n, scratch);
            if (!(pivot > 0)) return $"{DescribeFields(_field, x, "G10")} (smallest Cholesky pivot {pivot:G4})";
        }
        return null;
    }

    private static bool AllFinite(ReadOnlySpan<double> x)
    {
        foreach (double v in x) if (!double.IsFinite(v)) return false;
        return true;
    }

    /// <summary>Describes V, K (G) or a derivative that is NaN or infinite at, beside or just ahead of the state's fields; null when all are finite.</summary>
    private string? NonFiniteModel(ReadOnlySpan<double> y)
    {
        if (_theory is { } theory) return NonFiniteModel(theory, y[0], y[1]);
        if (!AllFinite(y[.._n])) return DescribeFields(_field, y);
        int n = _n;
        var grad = new double[n];
        var g = new double[n * n];
        foreach (var x in Probes(y))
        {
            double v = _field.PotentialGradient(x, grad);
            if (!double.IsFinite(v) || !AllFinite(grad)) return $"V = {v:G6} or its gradient not finite at {DescribeFields(_field, x, "G10")}";
            _field.Metric(x, g);
            if (!AllFinite(g)) return $"G_IJ not finite at {DescribeFields(_field, x, "G10")}";
        }
        return null;
    }

    /// <summary>The single-field form (V, K and derivatives at, beside or just ahead of <paramref name="phi"/>).</summary>
    private static string? NonFiniteModel(IInflatonTheory theory, double phi, double dphi)
    {
        if (!double.IsFinite(phi)) return $"phi = {phi}";
        // The failing step may have probed a little ahead of the last good state: look there too, in the direction of motion.
        double dir = double.IsFinite(dphi) && dphi != 0 ? Math.Sign(dphi) * Math.Max(Math.Abs(dphi), 1e-3) : 1.0;
        var probes = new List<double> { phi, Math.BitIncrement(phi), Math.BitDecrement(phi) };
        for (double h = 1e-9; h <= 0.5; h *= 3) probes.Add(phi + dir * h);
        foreach (double x in probes)
        {
            var v = theory.Potential(x);
            var k = theory.Kinetic(x);
            if (!double.IsFinite(v.Value) || !double.IsFinite(v.D1) || !double.IsFinite(v.D2))
                return $"V = {v.Value:G6}, V_phi = {v.D1:G6} at phi = {x:G10}";
            if (!double.IsFinite(k.Value) || !double.IsFinite(k.D1) || !double.IsFinite(k.D2))
                return $"K = {k.Value:G6}, K_phi = {k.D1:G6} at phi = {x:G10}";
        }
        return null;
    }

    private static string OneLine(string s) => s.Replace('\n', ' ').Replace('\r', ' ');

    private void AddSegment(double t0, OdeSolution sol, bool regular)
    {
        if (sol.TFinal > t0) _segments.Add(new BackgroundSegment(t0, sol.TFinal, sol, regular));
    }

    private void CheckPositive(double n, ReadOnlySpan<double> y)
    {
        double v = _theory is { } t ? t.Potential(Side(y[0])).Value : _field.Potential(SidePhi(y));
        if (!(v > 0))
            throw new PhysicsException($"V <= 0 reached during inflation at N = {n:G8}, {DescribeFields(_field, y)} (V = {v:G6} past the non-smooth point); the potential must stay positive until inflation ends.");
    }

    private static double[] Snap(double[] state, FieldSurface surface)
    {
        var y = (double[])state.Clone();
        if (surface.IsCoordinate) y[surface.CoordinateIndex] = surface.CoordinateValue;
        return y;
    }

    public BackgroundOutcome Execute(double[] y0)
    {
        double n = 0;
        double[] y = y0;
        while (true)
        {
            // ---- inflationary phase: state (phi, phi') ----
            var specs = new List<EventSpec>();
            var kinds = new List<(Kind Kind, FieldSurface? Surface)>();
            specs.Add(new EventSpec((t, s) => E1(s) - 1.0, EventDirection.Rising, Terminal: true, Name: "epsilon1-up")); kinds.Add((Kind.Rise, null));
            specs.Add(new EventSpec((t, s) => E1(s) - 1.0, EventDirection.Falling, Terminal: false, Name: "epsilon1-down")); kinds.Add((Kind.Fall, null));
            specs.Add(new EventSpec((t, s) => Potential(s), EventDirection.Falling, Terminal: true, Name: "V-zero")); kinds.Add((Kind.VZero, null));
            if (_end is { } end)
            {
                specs.Add(new EventSpec((t, s) => end.Value(s), Direction(end.Crossing), Terminal: true, Name: "phi-end")); kinds.Add((Kind.EndSurface, end));
            }
            AddRangeEvents(specs, kinds);
            AddKinkEvents(specs, kinds, y);
            if (!(_s.MaxEFolds > n)) throw NeverEnds(n, y);
            var sol = Integrate(_inflation, _constrained, n, y, _s.MaxEFolds, specs);
            AddSegment(n, sol, regular: false);
            foreach (var ev in sol.Events)
                if (kinds[ev.EventIndex].Kind == Kind.Fall && ev.T > n) _crossings.Add(ev.T);
            if (sol.Status != OdeStatus.TerminalEvent)
            {
                throw NeverEnds(sol.TFinal, sol.FinalState);
            }
            var last = TerminalEvent(sol, specs);
            var (kind, surface) = kinds[last.EventIndex];
            n = last.T;
            switch (kind)
            {
                case Kind.Kink:
                    _nonSmooth.Add(n);
                    y = Snap(last.State, surface!);
                    SetRestart(y, surface);
                    CheckPositive(n, y);
                    continue;
                case Kind.VZero:
                    throw new PhysicsException($"V <= 0 reached during inflation at N = {n:G8}, {DescribeFields(_field, last.State)}; the potential must stay positive until inflation ends (add an end field value or change the potential).");
                case Kind.Boundary:
                    throw new PhysicsException($"The field left the theory's valid range at N = {n:G8}, {BoundaryPlace(surface!, last.State)}; start elsewhere or set an end field value inside the range.");
                case Kind.EndSurface:
                    return new BackgroundOutcome(_segments, n, _crossings, _rising, _nonSmooth, true, null, null);
                case Kind.Rise:
                    _crossings.Add(n);
                    _rising.Add(n);
                    SetRestart(last.State, null);
                    break;
            }

            // ---- after an end: state (phi, phi', ln H) ----
            var (resumed, yNext, nNext) = Continue(n, last.State);
            if (!resumed) break;
            n = nNext;
            y = yNext;
        }

        int count = _rising.Count;
        int idx = _s.EndCrossing >= 0 ? _s.EndCrossing : count + _s.EndCrossing;
        if (idx < 0 || idx >= count)
            throw new PhysicsException($"The end-crossing choice {_s.EndCrossing} does not exist: epsilon_1 rose through 1 only {count} time(s) (at N = {string.Join(", ", _rising.Select(r => r.ToString("G8")))}); choose an index in range.");
        return new BackgroundOutcome(_segments, _rising[idx], _crossings, _rising, _nonSmooth, false, _continuationNote, _continuationStop);
    }

    /// <summary>"phi = 1.5" (the boundary's value) for a coordinate boundary, the fields at the crossing otherwise.</summary>
    private string BoundaryPlace(FieldSurface surface, ReadOnlySpan<double> y)
    {
        if (!surface.IsCoordinate) return $"{DescribeFields(_field, y)} ({surface.Name})";
        if (_n == 1) return $"{_field.FieldNames[0]} = {surface.CoordinateValue:G6}";
        return $"{_field.FieldNames[surface.CoordinateIndex]} = {surface.CoordinateValue:G6}, {DescribeFields(_field, y)}";
    }

    /// <summary>
    /// The error of a background that is still inflating at the e-fold limit: a field that has come to rest where V > 0
    /// and V_phi = 0 is trapped in a false minimum (eternal de Sitter); otherwise it is still rolling.
    /// </summary>
    private PhysicsException NeverEnds(double n, double[] y)
    {
        if (_theory is { } theory)
        {
            var v = theory.Potential(y[0]);
            double slope = Math.Abs(v.D1 / (theory.Kinetic(y[0]).Value * v.Value)); // the attractor speed |V_phi/(K V)|
            if (v.Value > 0 && Math.Abs(y[1]) < 1e-6 && slope < 1e-6)
                return new PhysicsException(string.Create(CultureInfo.InvariantCulture,
                    $"The field is trapped in a false minimum at phi = {y[0]:G6} (V = {v.Value:G4} > 0, V_phi = {v.D1:G3}) (at rest there at N = {n:G6}): inflation never ends; start on the other side of the barrier, change the potential, or end inflation by hand before it (phi_end)."));
        }
        else
        {
            var velocity = new double[_n];
            double vn = _field.Potential(y);
            double speed = 0, attractor = 0;
            if (_cov!.AttractorVelocity(y, velocity))
                for (int i = 0; i < _n; i++) { speed = Math.Max(speed, Math.Abs(y[_n + i])); attractor = Math.Max(attractor, Math.Abs(velocity[i])); }
            if (vn > 0 && speed < 1e-6 && attractor < 1e-6)
                return new PhysicsException(string.Create(CultureInfo.InvariantCulture,
                    $"The fields are trapped in a false minimum at {DescribeFields(_field, y)} (V = {vn:G4} > 0, |G^-1 grad V / V| = {attractor:G3}) (at rest there at N = {n:G6}): inflation never ends; start elsewhere, change the potential, or end inflation by hand before it (end surface)."));
        }
        return new PhysicsException(string.Create(CultureInfo.InvariantCulture,
            $"Inflation does not end within {_s.MaxEFolds:G6} e-folds, the largest background computed (still inflating at {DescribeFields(_field, y)}, epsilon_1 = {E1(y):G4}); start nearer the end (phi0 or start.efolds) or end inflation by hand (phi_end)."));
    }

    private string? _continuationNote;

    /// <summary>
    /// Records the continuation up to the last good state of a failed segment (re-integrated to there) and the one
    /// warning line that says where and why it stopped.
    /// </summary>
    private void StopContinuation(double nUp, double n, double[] y, double tEnd, List<EventSpec> specs, IntegrationException failure, bool pending)
    {
        double reached = n;
        if (failure.T > n && failure.T <= tEnd)
        {
            try
            {
                var partial = Integrate(_reheating, _regular, n, y, failure.T, specs, maxSteps: _s.MaxSteps);
                if (partial.Status != OdeStatus.TerminalEvent)
                {
                    AddSegment(n, partial, regular: true);
                    reached = partial.TFinal;
                }
            }
            catch (PhysicsException)
            {
                // The background keeps the segments before this one.
            }
        }
        bool known = failure.State.Length >= 2 * _n;
        string where = known ? DescribeFields(_field, failure.State) : $"{_field.FieldNames[0]} = NaN";
        double vHere = known && AllFinite(failure.State.AsSpan(0, _n)) ? Potential(failure.State) : double.NaN;
        string why = known && _cov is not null && NotPositiveDefinite(failure.State) is { } notPd ? $"the field-space metric G_IJ is not positive definite at {notPd}"
            : known && NonFiniteModel(failure.State) is { } bad ? $"the model is not finite there ({bad})"
            : vHere < 0 ? $"V < 0 there (V = {vHere:G4}) and the field runs away"
            : failure.Failure == IntegrationFailure.StepBudgetExhausted ? $"its budget of {ContinuationStepBudget} steps ran out (very fast oscillations, or a singular or non-smooth minimum)"
            : $"the integration broke down ({failure.Failure}; the potential is singular or not smooth there)";
        _continuationNote = string.Create(CultureInfo.InvariantCulture,
            $"the continuation after the end of inflation stopped {failure.T - nUp:G3} e-folds after the end (N = {failure.T:G8}, {where}): {why}; the background is recorded up to N = {reached:G8}{(pending ? " and the last fall of epsilon_1 below 1 is not counted as inflation resuming" : "")}");
    }

    /// <summary>
    /// After <see cref="ContinuationOscillations"/> oscillations about a smooth minimum (no kink met since the end)
    /// at omega/H above <see cref="FastOscillationRatio"/>, with more than
    /// <see cref="RemainingOscillationsToStop"/> oscillations left to the planned stop: records why the continuation stops there
    /// (a note, not a warning: this is the expected behaviour, e.g. the Palatini map at large xi, omega/H ~ sqrt(xi))
    /// and returns true.
    /// </summary>
    private bool FastOscillationsStop(double nUp, double n, double stop, int dips, double firstDip, int kinksBefore)
    {
        if (dips < 2 * ContinuationOscillations + 1 || _nonSmooth.Count != kinksBefore || !(n > firstDip)) return false;
        double oscillations = 0.5 * (dips - 1);
        double omegaOverH = 2 * Math.PI * oscillations / (n - firstDip);
        if (!(omegaOverH > FastOscillationRatio) || !(n < stop)) return false;
        double remaining = (stop - n) * omegaOverH / (2 * Math.PI);
        if (!(remaining > RemainingOscillationsToStop)) return false; // nearly done: cheaper to finish as planned
        _continuationStop = string.Create(CultureInfo.InvariantCulture,
            $"the continuation after the end of inflation stopped after {ContinuationOscillations} oscillations about the minimum, {n - nUp:G3} e-folds after the end (N = {n:G8}): omega/H ~ {omegaOverH:G3}, and the planned {_s.EFoldsAfterEnd:G3} e-folds would take ~{remaining:G2} more oscillations; the continuation only feeds the plots and the post-inflation epsilon_1, the background is recorded up to there");
        return true;
    }

    private double ConstraintHubbleSquared(ReadOnlySpan<double> y)
        => _theory is { } t ? BackgroundEquations.ConstraintHubbleSquared(t, y[0], y[1]) : _field.Potential(y) / (3.0 - _cov!.Epsilon1(y));

    /// <summary>Runs past an end; returns whether inflation resumed, with the state (phi, phi') and N to resume from.</summary>
    private (bool Resumed, double[] Y, double N) Continue(double nUp, double[] stateAtUp)
    {
        double stop = nUp + Math.Max(0.0, _s.EFoldsAfterEnd);
        if (!(stop > nUp)) return (false, stateAtUp, nUp);
        double n = nUp;
        int dim = 2 * _n;
        double hsq = ConstraintHubbleSquared(stateAtUp);
        double[] y = new double[dim + 1];
        Array.Copy(stateAtUp, y, dim);
        y[dim] = 0.5 * Math.Log(hsq);
        double pendingFall = double.NaN;
        int dips = 0, kinksBefore = _nonSmooth.Count;
        double firstDip = double.NaN;
        while (n < stop || !double.IsNaN(pendingFall))
        {
            var specs = new List<EventSpec>();
            var kinds = new List<(Kind Kind, FieldSurface? Surface)>();
            bool pending = !double.IsNaN(pendingFall);
            if (pending)
            {
                specs.Add(new EventSpec((t, s) => E1After(s) - 1.0, EventDirection.Rising, Terminal: true, Name: "epsilon1-up")); kinds.Add((Kind.Rise, null));
            }
            else
            {
                specs.Add(new EventSpec((t, s) => E1After(s) - 1.0, EventDirection.Falling, Terminal: true, Name: "epsilon1-down")); kinds.Add((Kind.Fall, null));
            }
            AddRangeEvents(specs, kinds);
            AddKinkEvents(specs, kinds, y);
            // A pending fall is followed for the whole re-entry window, even past the planned stop.
            double tEnd = pending ? pendingFall + _s.ReentryEFolds : stop;
            OdeSolution sol;
            try
            {
                sol = Integrate(_reheating, _regular, n, y, tEnd, specs);
            }
            catch (PhysicsException e) when (e.InnerException is IntegrationException failure)
            {
                // After an end of inflation a breakdown (singular or non-smooth minimum, V < 0, a NaN domain) ends only
                // the continuation: keep what was integrated up to the last good state and say so once.
                StopContinuation(nUp, n, y, tEnd, specs, failure, pending);
                return (false, y, n);
            }
            AddSegment(n, sol, regular: true);
            if (sol.Status != OdeStatus.TerminalEvent)
            {
                n = sol.TFinal;
                y = sol.FinalState;
                if (pending)
                {
                    // epsilon_1 stayed below 1 for the whole window: inflation resumed at the fall.
                    _crossings.Add(pendingFall);
                    return (true, y[..dim], n);
                }
                break;
            }
            var last = TerminalEvent(sol, specs);
            var (kind, surface) = kinds[last.EventIndex];
            n = last.T;
            y = last.State;
            switch (kind)
            {
                case Kind.Kink:
                    _nonSmooth.Add(n);
                    y = Snap(y, surface!);
                    SetRestart(y, surface);
                    break;
                case Kind.Boundary:
                    // Inflation has ended already: the model being undefined further on only cuts the continuation short.
                    _continuationNote = string.Create(CultureInfo.InvariantCulture,
                        $"the continuation after the end of inflation stopped {n - nUp:G3} e-folds after the end (N = {n:G8}) where the field left the theory's valid range at {BoundaryPlace(surface!, y)}; the background is recorded up to there");
                    return (false, y, n);
                case Kind.Fall:
                    pendingFall = n;
                    SetRestart(y, null);
                    break;
                case Kind.Rise:
                    pendingFall = double.NaN; // a short accelerating dip of an oscillation, not inflation
                    SetRestart(y, null);
                    // epsilon_1 dips below 1 at each turning point: two dips per oscillation.
                    if (dips++ == 0) firstDip = n;
                    if (FastOscillationsStop(nUp, n, stop, dips, firstDip, kinksBefore)) return (false, y, n);
                    break;
            }
        }
        return (false, y, n);
    }
}
