using System.Globalization;
using ModeSolver.Integrators;
using ModeSolver.Models;
using ModeSolver.Physics;

namespace ModeSolver.Background;

/// <summary>
/// Integrates the exact homogeneous background of an <see cref="IInflatonTheory"/> in e-folds (physics.md section 2),
/// from N = 0 to the end of inflation and on through the first oscillations.
/// </summary>
/// <remarks>
/// During inflation the state is (phi, phi') and H^2 = V/(3 - e1) comes from the constraint; after the end the state
/// carries ln H as well, which keeps the equations regular where V passes through zero. Every epsilon_1 = 1 crossing
/// of the inflationary history is located; after an end, a dip of epsilon_1 below 1 counts as inflation resuming only
/// when it lasts <see cref="BackgroundSettings.ReentryEFolds"/>. The integration stops exactly where the field reaches a
/// non-smooth point of the theory and restarts there, so no step straddles a jump in V_phi.
/// </remarks>
public static class BackgroundSolver
{
    /// <summary>The default method for the inflationary phase (explicit, high order).</summary>
    public static IOdeMethod DefaultMethod() => new DormandPrince853();

    /// <summary>The default method after the end (oscillations): switches between explicit and implicit steps as stiffness requires.</summary>
    public static IOdeMethod DefaultReheatingMethod() => new AutoSwitching();

    private enum Kind { Rise, Fall, VZero, PhiEnd, RangeLow, RangeHigh, Kink }

    /// <summary>Integrates the background; throws <see cref="PhysicsException"/> when the physics cannot be computed.</summary>
    public static BackgroundSolution Solve(IInflatonTheory theory, BackgroundSettings settings)
    {
        ArgumentNullException.ThrowIfNull(theory);
        ArgumentNullException.ThrowIfNull(settings);
        double phi0 = settings.Phi0;
        var (rangeMin, rangeMax) = theory.ValidRange;
        if (!double.IsFinite(phi0))
            throw new PhysicsException($"The initial field value phi0 = {phi0} is not finite; give a finite phi0.");
        if (!(phi0 > rangeMin && phi0 < rangeMax))
            throw new PhysicsException($"The initial field value phi0 = {phi0:G6} lies outside the theory's valid range ({rangeMin:G6}, {rangeMax:G6}); choose phi0 inside it.");
        Jet3 v0 = theory.Potential(phi0);
        Jet3 k0 = theory.Kinetic(phi0);
        if (!(v0.Value > 0) || !double.IsFinite(v0.Value))
            throw new PhysicsException($"V <= 0 (or not finite) at the start, N = 0, phi = {phi0:G6} (V = {v0.Value:G6}); start where the potential is positive.");
        if (!(k0.Value > 0))
            throw new PhysicsException($"The kinetic function K = {k0.Value:G6} is not positive at the start, phi = {phi0:G6}; start where K > 0.");
        double dphi0 = settings.DPhi0 ?? -v0.D1 / (k0.Value * v0.Value);
        if (!double.IsFinite(dphi0))
            throw new PhysicsException($"The initial velocity dphi/dN = {dphi0} at phi = {phi0:G6} is not finite; give a finite dphi0.");
        double e1Start = 0.5 * k0.Value * dphi0 * dphi0;
        if (e1Start >= 3.0)
            throw new PhysicsException($"epsilon_1 = {e1Start:G6} >= 3 at the start (N = 0, phi = {phi0:G6}, dphi/dN = {dphi0:G6}): the kinetic start is too large (H^2 = V/(3 - epsilon_1) needs epsilon_1 < 3); {(settings.DPhi0 is null ? "the slow-roll attractor velocity -V_phi/(K V) is that large here: start where the potential is flatter, or give a smaller dphi0" : $"lower |dphi0| below {Math.Sqrt(6.0 / k0.Value):G6}")}.");
        if (!(settings.Tolerance > 0 && settings.Tolerance < 1))
            throw new ArgumentOutOfRangeException(nameof(settings), "Tolerance must lie in (0, 1).");

        var inflationMethod = settings.InflationMethod ?? DefaultMethod();
        var reheatingMethod = settings.ReheatingMethod ?? DefaultReheatingMethod();
        var run = new Run(theory, settings, inflationMethod, reheatingMethod);
        return run.Execute(phi0, dphi0);
    }

    private sealed class Run
    {
        private readonly IInflatonTheory _theory;
        private readonly BackgroundSettings _s;
        private readonly IOdeMethod _inflation;
        private readonly IOdeMethod _reheating;
        private readonly RightHandSide _constrained;
        private readonly RightHandSide _regular;
        private readonly List<BackgroundSegment> _segments = new();
        private readonly List<double> _crossings = new();
        private readonly List<double> _rising = new();
        private readonly List<double> _nonSmooth = new();

        public Run(IInflatonTheory theory, BackgroundSettings s, IOdeMethod inflation, IOdeMethod reheating)
        {
            _theory = theory;
            _s = s;
            _inflation = inflation;
            _reheating = reheating;
            _constrained = (t, y, d) => BackgroundEquations.Constrained(theory, Side(y[0]), y, d);
            // After the end the field is back where double arithmetic resolves the slope: the continuation evaluates a
            // double-double Jordan-frame map in plain double (its many fast oscillations would otherwise dominate the run).
            _after = theory is JordanFrameTheory { IsExtendedPrecision: true } j ? j.WithPlainPrecision() : theory;
            var after = _after;
            _regular = (t, y, d) => BackgroundEquations.Regular(after, Side(y[0]), y, d);
        }

        // When a segment starts exactly on a kink, V and K are evaluated one ulp to the side the field moves to,
        // so the first stage of the restart sees the slope of the new branch.
        private double _kinkPhi = double.NaN;
        private double _kinkDirection;

        private double Side(double phi)
            => phi == _kinkPhi ? (_kinkDirection > 0 ? Math.BitIncrement(phi) : Math.BitDecrement(phi)) : phi;

        private void SetRestart(double phi, double dphi, bool atKink)
        {
            _kinkPhi = atKink ? phi : double.NaN;
            _kinkDirection = dphi;
        }

        private readonly IInflatonTheory _after;

        private double E1(ReadOnlySpan<double> y) => 0.5 * _theory.Kinetic(y[0]).Value * y[1] * y[1];

        private double E1After(ReadOnlySpan<double> y) => 0.5 * _after.Kinetic(y[0]).Value * y[1] * y[1];

        private void AddKinkEvents(List<EventSpec> specs, List<(Kind, double)> kinds, double phiNow)
        {
            var points = _theory.NonSmoothPoints;
            for (int i = 0; i < points.Count; i++)
            {
                double pk = points[i];
                if (Math.Abs(phiNow - pk) <= 1e-13 * Math.Max(1.0, Math.Abs(pk))) continue;
                specs.Add(new EventSpec((t, y) => y[0] - pk, EventDirection.Either, Terminal: true, Name: "kink"));
                kinds.Add((Kind.Kink, pk));
            }
        }

        private void AddRangeEvents(List<EventSpec> specs, List<(Kind, double)> kinds)
        {
            var (lo, hi) = _theory.ValidRange;
            if (double.IsFinite(lo))
            {
                specs.Add(new EventSpec((t, y) => y[0] - lo, EventDirection.Falling, Terminal: true, Name: "range-low"));
                kinds.Add((Kind.RangeLow, lo));
            }
            if (double.IsFinite(hi))
            {
                specs.Add(new EventSpec((t, y) => y[0] - hi, EventDirection.Rising, Terminal: true, Name: "range-high"));
                kinds.Add((Kind.RangeHigh, hi));
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
                string state = ex.State.Length >= 2 ? $"phi = {ex.State[0]:G6}, dphi/dN = {ex.State[1]:G6}" : "state unknown";
                if (ex.State.Length >= 2 && NonFiniteModel(ex.State[0], ex.State[1]) is { } bad)
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

        /// <summary>Describes V, K or a derivative that is NaN or infinite at, beside or just ahead of <paramref name="phi"/>; null when all are finite.</summary>
        private string? NonFiniteModel(double phi, double dphi)
        {
            if (!double.IsFinite(phi)) return $"phi = {phi}";
            // The failing step may have probed a little ahead of the last good state: look there too, in the direction of motion.
            double dir = double.IsFinite(dphi) && dphi != 0 ? Math.Sign(dphi) * Math.Max(Math.Abs(dphi), 1e-3) : 1.0;
            var probes = new List<double> { phi, Math.BitIncrement(phi), Math.BitDecrement(phi) };
            for (double h = 1e-9; h <= 0.5; h *= 3) probes.Add(phi + dir * h);
            foreach (double x in probes)
            {
                var v = _theory.Potential(x);
                var k = _theory.Kinetic(x);
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

        private void CheckPositive(double n, double phi)
        {
            double v = _theory.Potential(Side(phi)).Value;
            if (!(v > 0))
                throw new PhysicsException($"V <= 0 reached during inflation at N = {n:G8}, phi = {phi:G6} (V = {v:G6} past the non-smooth point); the potential must stay positive until inflation ends.");
        }

        private static double[] Snap(double[] state, double phi)
        {
            var y = (double[])state.Clone();
            y[0] = phi;
            return y;
        }

        public BackgroundSolution Execute(double phi0, double dphi0)
        {
            double n = 0;
            double[] y = { phi0, dphi0 };
            while (true)
            {
                // ---- inflationary phase: state (phi, phi') ----
                var specs = new List<EventSpec>();
                var kinds = new List<(Kind Kind, double Value)>();
                specs.Add(new EventSpec((t, s) => E1(s) - 1.0, EventDirection.Rising, Terminal: true, Name: "epsilon1-up")); kinds.Add((Kind.Rise, 1));
                specs.Add(new EventSpec((t, s) => E1(s) - 1.0, EventDirection.Falling, Terminal: false, Name: "epsilon1-down")); kinds.Add((Kind.Fall, 1));
                specs.Add(new EventSpec((t, s) => _theory.Potential(s[0]).Value, EventDirection.Falling, Terminal: true, Name: "V-zero")); kinds.Add((Kind.VZero, 0));
                if (_s.PhiEnd is double pe)
                {
                    specs.Add(new EventSpec((t, s) => s[0] - pe, EventDirection.Either, Terminal: true, Name: "phi-end")); kinds.Add((Kind.PhiEnd, pe));
                }
                AddRangeEvents(specs, kinds);
                AddKinkEvents(specs, kinds, y[0]);
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
                var (kind, value) = kinds[last.EventIndex];
                n = last.T;
                switch (kind)
                {
                    case Kind.Kink:
                        _nonSmooth.Add(n);
                        y = Snap(last.State, value);
                        SetRestart(value, y[1], atKink: true);
                        CheckPositive(n, y[0]);
                        continue;
                    case Kind.VZero:
                        throw new PhysicsException($"V <= 0 reached during inflation at N = {n:G8}, phi = {last.State[0]:G6}; the potential must stay positive until inflation ends (add an end field value or change the potential).");
                    case Kind.RangeLow:
                    case Kind.RangeHigh:
                        throw new PhysicsException($"The field left the theory's valid range at N = {n:G8}, phi = {value:G6}; start elsewhere or set an end field value inside the range.");
                    case Kind.PhiEnd:
                        return BackgroundSolution.Create(_theory, _segments, n, _crossings, _rising, _nonSmooth, endedAtPhiEnd: true, null);
                    case Kind.Rise:
                        _crossings.Add(n);
                        _rising.Add(n);
                        SetRestart(last.State[0], last.State[1], atKink: false);
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
            return BackgroundSolution.Create(_theory, _segments, _rising[idx], _crossings, _rising, _nonSmooth, endedAtPhiEnd: false, _continuationNote, _continuationStop);
        }

        /// <summary>
        /// The error of a background that is still inflating at the e-fold limit: a field that has come to rest where V > 0
        /// and V_phi = 0 is trapped in a false minimum (eternal de Sitter); otherwise it is still rolling.
        /// </summary>
        private PhysicsException NeverEnds(double n, double[] y)
        {
            var v = _theory.Potential(y[0]);
            double slope = Math.Abs(v.D1 / (_theory.Kinetic(y[0]).Value * v.Value)); // the attractor speed |V_phi/(K V)|
            if (v.Value > 0 && Math.Abs(y[1]) < 1e-6 && slope < 1e-6)
                return new PhysicsException(string.Create(CultureInfo.InvariantCulture,
                    $"The field is trapped in a false minimum at phi = {y[0]:G6} (V = {v.Value:G4} > 0, V_phi = {v.D1:G3}) (at rest there at N = {n:G6}): inflation never ends; start on the other side of the barrier, change the potential, or end inflation by hand before it (phi_end)."));
            return new PhysicsException(string.Create(CultureInfo.InvariantCulture,
                $"Inflation does not end within {_s.MaxEFolds:G6} e-folds, the largest background computed (still inflating at phi = {y[0]:G6}, epsilon_1 = {E1(y):G4}); start nearer the end (phi0 or start.efolds) or end inflation by hand (phi_end)."));
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
            double phi = failure.State.Length > 0 ? failure.State[0] : double.NaN;
            double dphi = failure.State.Length > 1 ? failure.State[1] : double.NaN;
            string why = NonFiniteModel(phi, dphi) is { } bad ? $"the model is not finite there ({bad})"
                : double.IsFinite(phi) && _theory.Potential(phi).Value < 0 ? $"V < 0 there (V = {_theory.Potential(phi).Value:G4}) and the field runs away"
                : failure.Failure == IntegrationFailure.StepBudgetExhausted ? $"its budget of {ContinuationStepBudget} steps ran out (very fast oscillations, or a singular or non-smooth minimum)"
                : $"the integration broke down ({failure.Failure}; the potential is singular or not smooth there)";
            _continuationNote = string.Create(CultureInfo.InvariantCulture,
                $"the continuation after the end of inflation stopped {failure.T - nUp:G3} e-folds after the end (N = {failure.T:G8}, phi = {phi:G6}): {why}; the background is recorded up to N = {reached:G8}{(pending ? " and the last fall of epsilon_1 below 1 is not counted as inflation resuming" : "")}");
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

        /// <summary>Runs past an end; returns whether inflation resumed, with the state (phi, phi') and N to resume from.</summary>
        private (bool Resumed, double[] Y, double N) Continue(double nUp, double[] stateAtUp)
        {
            double stop = nUp + Math.Max(0.0, _s.EFoldsAfterEnd);
            if (!(stop > nUp)) return (false, stateAtUp, nUp);
            double n = nUp;
            double hsq = BackgroundEquations.ConstraintHubbleSquared(_theory, stateAtUp[0], stateAtUp[1]);
            double[] y = { stateAtUp[0], stateAtUp[1], 0.5 * Math.Log(hsq) };
            double pendingFall = double.NaN;
            int dips = 0, kinksBefore = _nonSmooth.Count;
            double firstDip = double.NaN;
            while (n < stop || !double.IsNaN(pendingFall))
            {
                var specs = new List<EventSpec>();
                var kinds = new List<(Kind Kind, double Value)>();
                bool pending = !double.IsNaN(pendingFall);
                if (pending)
                {
                    specs.Add(new EventSpec((t, s) => E1After(s) - 1.0, EventDirection.Rising, Terminal: true, Name: "epsilon1-up")); kinds.Add((Kind.Rise, 1));
                }
                else
                {
                    specs.Add(new EventSpec((t, s) => E1After(s) - 1.0, EventDirection.Falling, Terminal: true, Name: "epsilon1-down")); kinds.Add((Kind.Fall, 1));
                }
                AddRangeEvents(specs, kinds);
                AddKinkEvents(specs, kinds, y[0]);
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
                        return (true, new[] { y[0], y[1] }, n);
                    }
                    break;
                }
                var last = TerminalEvent(sol, specs);
                var (kind, value) = kinds[last.EventIndex];
                n = last.T;
                y = last.State;
                switch (kind)
                {
                    case Kind.Kink:
                        _nonSmooth.Add(n);
                        y = Snap(y, value);
                        SetRestart(value, y[1], atKink: true);
                        break;
                    case Kind.RangeLow:
                    case Kind.RangeHigh:
                        // Inflation has ended already: the model being undefined further on only cuts the continuation short.
                        _continuationNote = string.Create(CultureInfo.InvariantCulture,
                            $"the continuation after the end of inflation stopped {n - nUp:G3} e-folds after the end (N = {n:G8}) where the field left the theory's valid range at phi = {value:G6}; the background is recorded up to there");
                        return (false, y, n);
                    case Kind.Fall:
                        pendingFall = n;
                        SetRestart(y[0], y[1], atKink: false);
                        break;
                    case Kind.Rise:
                        pendingFall = double.NaN; // a short accelerating dip of an oscillation, not inflation
                        SetRestart(y[0], y[1], atKink: false);
                        // epsilon_1 dips below 1 at each turning point: two dips per oscillation.
                        if (dips++ == 0) firstDip = n;
                        if (FastOscillationsStop(nUp, n, stop, dips, firstDip, kinksBefore)) return (false, y, n);
                        break;
                }
            }
            return (false, y, n);
        }
    }
}
