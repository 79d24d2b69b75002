using ModeSolver.Background;
using ModeSolver.Matching;
using ModeSolver.Perturbations;

namespace ModeSolver.Spectra;

/// <summary>
/// The exact pivot amplitude of an n-field theory for the matching: P_R of one n x n mode on the view of the
/// matcher's V scale (no slow-roll approximation). Holds the base view; the matcher's rescaled view is found by its
/// V scale, so the same background is used whatever view is passed.
/// </summary>
public sealed class FieldAmplitude : IPivotAmplitude
{
    private readonly AdiabaticBackground _base;
    private readonly ModeSettings _settings;

    /// <summary>Scalar-only n-field modes of <paramref name="background"/> at <paramref name="tolerance"/>.</summary>
    public FieldAmplitude(AdiabaticBackground background, double tolerance = 1e-6)
    {
        ArgumentNullException.ThrowIfNull(background);
        _base = background;
        _settings = new ModeSettings { Tolerance = tolerance, Kinds = ModeKinds.Scalar, Derivatives = false };
        _settings.Validate();
    }

    /// <inheritdoc />
    public string Name => "exact";

    /// <inheritdoc />
    public double ScalarPower(IBackground background, double kBackgroundUnits)
    {
        ArgumentNullException.ThrowIfNull(background);
        var view = _base.WithVScale(background.VScale);
        return new FieldModeIntegrator(view).Solve(view, kBackgroundUnits, _settings, transfer: false).Pr;
    }
}

/// <summary>
/// n_s, alpha_s and n_t of n-field modes as finite differences of ln P in ln k (the n x n system carries no
/// k-derivative blocks): five modes at ln k + j h, j = -2..2, give the 5-point first and second differences. The error
/// of each bounds (i) the truncation by the difference between the 5-point and 3-point forms (the 3-point truncation
/// is h^2/6 f''' against h^4/30 f^(5): their difference exceeds the 5-point truncation whenever the series is
/// dominated by its first term, true for slow-roll spectra whose successive ln k derivatives fall by a slow-roll
/// order) and (ii) the propagated mode errors: sum_j |c_j| eps_j with eps_j the relative error bound of P at point j.
/// </summary>
public static class FieldSlopes
{
    /// <summary>The step h in ln k of the pivot stencil.</summary>
    public const double Step = 0.2;

    /// <summary>First derivative and its error bound from ln P at ln k + j h (j = -2..2) with relative errors <paramref name="eps"/>.</summary>
    public static (double Value, double Error) First(ReadOnlySpan<double> lnP, ReadOnlySpan<double> eps, double h)
    {
        double d5 = (lnP[0] - 8.0 * lnP[1] + 8.0 * lnP[3] - lnP[4]) / (12.0 * h);
        double d3 = (lnP[3] - lnP[1]) / (2.0 * h);
        double noise = (eps[0] + 8.0 * eps[1] + 8.0 * eps[3] + eps[4]) / (12.0 * h);
        return (d5, Math.Abs(d5 - d3) + noise);
    }

    /// <summary>Second derivative and its error bound, as <see cref="First"/>.</summary>
    public static (double Value, double Error) Second(ReadOnlySpan<double> lnP, ReadOnlySpan<double> eps, double h)
    {
        double d5 = (-lnP[0] + 16.0 * lnP[1] - 30.0 * lnP[2] + 16.0 * lnP[3] - lnP[4]) / (12.0 * h * h);
        double d3 = (lnP[1] - 2.0 * lnP[2] + lnP[3]) / (h * h);
        double noise = (eps[0] + 16.0 * eps[1] + 30.0 * eps[2] + 16.0 * eps[3] + eps[4]) / (12.0 * h * h);
        return (d5, Math.Abs(d5 - d3) + noise);
    }
}
