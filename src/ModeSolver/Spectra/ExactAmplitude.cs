using ModeSolver.Background;
using ModeSolver.Matching;
using ModeSolver.Perturbations;

namespace ModeSolver.Spectra;

/// <summary>The pivot amplitude from one exact scalar mode (no slow-roll approximation); for normalisation and the N_* iteration.</summary>
public sealed class ExactAmplitude : IPivotAmplitude
{
    private readonly ModeSettings _settings;

    /// <summary>Uses a scalar-only mode at <paramref name="tolerance"/> relative accuracy (default 1e-6).</summary>
    public ExactAmplitude(double tolerance = 1e-6)
    {
        _settings = new ModeSettings { Tolerance = tolerance, Kinds = ModeKinds.Scalar, Derivatives = false };
        _settings.Validate();
    }

    /// <inheritdoc />
    public string Name => "exact";

    /// <inheritdoc />
    public double ScalarPower(IBackground background, double kBackgroundUnits) =>
        new ModeIntegrator().Solve(background, kBackgroundUnits, _settings).Ps;
}

/// <summary>Exact observables at one k (background units).</summary>
/// <param name="K">Wavenumber.</param>
/// <param name="Ps">Scalar power.</param>
/// <param name="Pt">Tensor power.</param>
/// <param name="Ns">Scalar index.</param>
/// <param name="Nt">Tensor index.</param>
/// <param name="R">Tensor-to-scalar ratio.</param>
/// <param name="AlphaS">Running of the scalar index.</param>
/// <param name="ErrorEstimate">Estimated relative error of P.</param>
/// <param name="RhsEvaluations">Work of the mode integration.</param>
public sealed record PivotValues(double K, double Ps, double Pt, double Ns, double Nt, double R, double AlphaS, double ErrorEstimate, int RhsEvaluations)
{
    /// <summary>Computes the values from one scalar+tensor mode with derivatives at <paramref name="tolerance"/> (default 1e-6).</summary>
    public static PivotValues Compute(IBackground background, double k, double tolerance = 1e-6)
    {
        var m = new ModeIntegrator().Solve(background, k, new ModeSettings { Tolerance = tolerance });
        return new PivotValues(k, m.Ps, m.Pt, m.Ns, m.Nt, m.R, m.AlphaS, m.ErrorEstimate, m.RhsEvaluations);
    }
}
