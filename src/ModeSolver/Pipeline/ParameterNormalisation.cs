using System.Globalization;
using ModeSolver.Background;
using ModeSolver.Decks;
using ModeSolver.Matching;
using ModeSolver.Models;
using ModeSolver.Physics;
using ModeSolver.Spectra;

namespace ModeSolver.Pipeline;

/// <summary>
/// Normalisation by a model parameter instead of a rescaling of V: the parameter named by
/// <see cref="AmplitudeSpec.SolveFor"/> is solved for so that the exact P_s at the pivot equals the target A_s, with V
/// as the formulas give it (V scale 1). Secant iteration on ln P_s against ln(parameter) (the parameter keeps its sign);
/// each step rebuilds the theory, the background (the start in e-folds is solved again) and the pivot matching, so
/// N_* follows the reheating history at every step.
/// </summary>
public static class ParameterNormalisation
{
    /// <summary>Relative accuracy of P_s at the pivot reached by the solve.</summary>
    public const double Tolerance = 1e-9;

    private const int MaxIterations = 40;

    /// <summary>The solved parameter value and the pieces of the last (converged) step.</summary>
    /// <param name="Value">The parameter value that gives A_s.</param>
    /// <param name="Settings">The settings with that value (and phi0 of the background actually used).</param>
    /// <param name="Theory">The theory with that value.</param>
    /// <param name="Background">Its background (V scale 1).</param>
    /// <param name="Pivot">The pivot matching with V as given.</param>
    /// <param name="Iterations">Secant steps used.</param>
    public sealed record Result(double Value, RunSettings Settings, IValidatedTheory Theory, BackgroundSolution Background, PivotSolution Pivot, int Iterations);

    /// <summary>Solves for the parameter; <paramref name="solveBackground"/> gives the background of a theory under given settings.</summary>
    /// <exception cref="PhysicsException">no value reaches A_s (one line naming the parameter and the last values).</exception>
    public static Result Solve(RunSettings settings, Func<IValidatedTheory, RunSettings, BackgroundSolution> solveBackground, double tolerance)
    {
        ArgumentNullException.ThrowIfNull(settings);
        ArgumentNullException.ThrowIfNull(solveBackground);
        string name = settings.Amplitude.SolveFor ?? throw new ArgumentException("no parameter to solve for", nameof(settings));
        double target = settings.Amplitude.ScalarAmplitude ?? throw new ArgumentException("no target A_s", nameof(settings));
        double start = settings.Model.Parameters[name];
        var amplitude = new ExactAmplitude(Math.Min(tolerance, 1e-6));
        var pivotSettings = SpectrumPipeline.PivotSettingsFor(settings) with { ScalarAmplitude = null };

        Result Evaluate(double value, out double lnRatio)
        {
            var pars = new Dictionary<string, double>(settings.Model.Parameters, StringComparer.Ordinal) { [name] = value };
            var s = settings with { Model = settings.Model with { Parameters = pars } };
            if (s.Initial.StartEfolds is double ne)
            {
                double guess;
                try { guess = SlowRollStart.FieldBeforeEnd(TheoryFactory.Build(s.Model, settings.Initial.Phi0), ne, s.Model.PhiEnd, settings.Initial.Phi0); }
                catch (PhysicsException) { guess = SlowRollStart.FieldBeforeEnd(TheoryFactory.Build(s.Model), ne, s.Model.PhiEnd, double.NaN); }
                s = s with { Initial = s.Initial with { Phi0 = guess } };
            }
            var theory = TheoryFactory.Build(s);
            var bg = solveBackground(theory, s);
            var pivot = PivotMatcher.Match(bg, pivotSettings, amplitude);
            double ps = amplitude.ScalarPower(pivot.Background, pivot.ToBackgroundUnits(pivot.KPivot));
            if (!(ps > 0) || !double.IsFinite(ps))
                throw new PhysicsException(string.Create(CultureInfo.InvariantCulture, $"normalising by {name}: P_s at the pivot is {ps:G6} for {name} = {value:G8}; the parameter cannot be solved for"));
            lnRatio = Math.Log(ps / target);
            s = s with { Initial = s.Initial with { Phi0 = bg.At(bg.NStart).Phi } };
            return new Result(value, s, theory, bg, pivot, 0);
        }

        double sign = Math.Sign(start);
        double x0 = Math.Log(Math.Abs(start));
        var r0 = Evaluate(start, out double f0);
        if (Math.Abs(f0) <= Tolerance) return r0 with { Iterations = 0 };
        double x1 = x0 + (f0 > 0 ? 0.5 : -0.5);
        double f1 = f0;
        Result r1 = r0;
        for (int i = 1; i <= MaxIterations; i++)
        {
            r1 = Evaluate(sign * Math.Exp(x1), out f1);
            if (Math.Abs(f1) <= Tolerance) return r1 with { Iterations = i };
            double slope = (f1 - f0) / (x1 - x0);
            if (!(Math.Abs(slope) > 1e-12) || !double.IsFinite(slope))
                throw new PhysicsException(string.Create(CultureInfo.InvariantCulture,
                    $"normalising by {name}: P_s at the pivot does not change with {name} (from {name} = {sign * Math.Exp(x0):G6} to {sign * Math.Exp(x1):G6}); choose another parameter or rescale V (leave normalisation.solve_for out)"));
            double next = x1 - f1 / slope;
            next = Math.Clamp(next, x1 - 5, x1 + 5);
            (x0, f0) = (x1, f1);
            x1 = next;
        }
        throw new PhysicsException(string.Create(CultureInfo.InvariantCulture,
            $"normalising by {name}: no value reaches A_s = {target:G4} after {MaxIterations} steps (last {name} = {r1.Value:G8}, P_s off by {Math.Exp(f1) - 1:+0.0e+00;-0.0e+00}); rescale V instead (leave normalisation.solve_for out)"));
    }
}
