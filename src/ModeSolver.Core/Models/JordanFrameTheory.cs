namespace ModeSolver.Models;

/// <summary>
/// A Jordan-frame theory S = int sqrt(-g_J) [Omega^2 R_J/2 - K_J (d phi)^2/2 - V_J], mapped to the Einstein frame
/// (physics.md section 1): V = V_J / Omega^4 and K = K_J / Omega^2 + (3/2) [(Omega^2)_phi / Omega^2]^2 (metric) or
/// K = K_J / Omega^2 (Palatini). Derivatives up to third order are exact: they come from truncated Taylor-jet
/// arithmetic on the derivative arrays of the inputs (K''' needs (Omega^2)'''').
/// </summary>
public sealed class JordanFrameTheory : IValidatedTheory
{
    private readonly IDerivativeFunction _omega2;
    private readonly IDerivativeFunction? _kineticJ;
    private readonly IDerivativeFunction _potentialJ;
    private readonly double[] _nonSmooth;
    // V and K composed into one generated program (smooth formula input); null: Taylor arithmetic on the inputs.
    private readonly Formulas.FrameMapProgram? _fused;
    // True: the fused program runs in double-double arithmetic (see WithExtendedPrecision).
    private readonly bool _extended;
    // With _extended: the checked table of the double-double jets in ln|phi| (null: every call evaluates the map).
    private readonly FieldJetTable? _table;

    /// <summary>Creates the theory.</summary>
    /// <param name="omegaSquared">Omega^2(phi); needs four derivatives in the metric formulation.</param>
    /// <param name="kineticJ">K_J(phi), or null for 1.</param>
    /// <param name="potentialJ">V_J(phi).</param>
    /// <param name="palatini">True for the Palatini formulation, false (default) for metric.</param>
    /// <param name="description">One-line description.</param>
    /// <param name="validRange">Declared valid range; infinite when null (see <see cref="FindValidInterval"/>).</param>
    public JordanFrameTheory(IDerivativeFunction omegaSquared, IDerivativeFunction? kineticJ, IDerivativeFunction potentialJ,
        bool palatini = false, string description = "", (double, double)? validRange = null)
        : this(omegaSquared, kineticJ, potentialJ, palatini, description, validRange, null, false, null)
    {
    }

    /// <summary>
    /// The theory of formula inputs: V and K with their derivatives come from one fused program (generated code)
    /// when every formula is smooth by construction, else from Taylor arithmetic on the formulas' derivatives.
    /// </summary>
    public static JordanFrameTheory FromFormulas(Formulas.Formula omegaSquared, Formulas.Formula? kineticJ, Formulas.Formula potentialJ,
        bool palatini = false, string description = "")
    {
        ArgumentNullException.ThrowIfNull(omegaSquared);
        ArgumentNullException.ThrowIfNull(potentialJ);
        var fused = Formulas.FrameMapProgram.TryCreate(omegaSquared, kineticJ, potentialJ, palatini);
        return new JordanFrameTheory(DerivativeFunction.FromFormula(omegaSquared), kineticJ is null ? null : DerivativeFunction.FromFormula(kineticJ),
            DerivativeFunction.FromFormula(potentialJ), palatini, description, null, fused, false, null);
    }

    private JordanFrameTheory(IDerivativeFunction omegaSquared, IDerivativeFunction? kineticJ, IDerivativeFunction potentialJ,
        bool palatini, string description, (double, double)? validRange, Formulas.FrameMapProgram? fused, bool extended, FieldJetTable? table)
    {
        _fused = fused;
        _extended = extended && fused is not null;
        _table = _extended ? table : null;
        ArgumentNullException.ThrowIfNull(omegaSquared);
        ArgumentNullException.ThrowIfNull(potentialJ);
        if (!palatini && omegaSquared.MaxOrder < 4)
            throw new ArgumentException("the metric formulation needs four derivatives of Omega^2", nameof(omegaSquared));
        _omega2 = omegaSquared;
        _kineticJ = kineticJ;
        _potentialJ = potentialJ;
        IsPalatini = palatini;
        Description = description ?? "";
        ValidRange = validRange ?? (double.NegativeInfinity, double.PositiveInfinity);
        if (!(ValidRange.Min < ValidRange.Max)) throw new ArgumentException("the valid range must have Min < Max", nameof(validRange));
        _nonSmooth = EinsteinFrameTheory.MergeSorted(omegaSquared.NonSmoothPoints, kineticJ?.NonSmoothPoints, potentialJ.NonSmoothPoints);
    }

    /// <inheritdoc/>
    public string Description { get; }

    /// <summary>True in the Palatini formulation.</summary>
    public bool IsPalatini { get; }

    /// <inheritdoc/>
    public bool IsCanonical => false;

    /// <inheritdoc/>
    public IReadOnlyList<double> NonSmoothPoints => _nonSmooth;

    /// <inheritdoc/>
    public (double Min, double Max) ValidRange { get; }

    /// <summary>The same theory with another declared valid range.</summary>
    public JordanFrameTheory WithValidRange((double, double) range) =>
        new(_omega2, _kineticJ, _potentialJ, IsPalatini, Description, range, _fused, _extended, _table);

    /// <summary>
    /// Relative change of the attractor slope V_phi/(K V) between double and double-double evaluation of the fused
    /// program at <paramref name="phi"/> and two neighbouring doubles (the largest of the three): the round-off the
    /// double evaluation leaves in the slope. 0 when the program has no double-double form.
    /// </summary>
    public double SlopeRoundOff(double phi)
    {
        if (_fused is not { SupportsExtended: true } f) return 0;
        double worst = 0;
        foreach (double x in new[] { phi, Math.BitIncrement(phi), Math.BitDecrement(phi) })
        {
            var d = f.Evaluate(x);
            var e = f.EvaluateExtended(x);
            double sd = d.Potential.D1 / (d.Kinetic.Value * d.Potential.Value);
            double se = e.Potential.D1 / (e.Kinetic.Value * e.Potential.Value);
            if (!double.IsFinite(sd) || !double.IsFinite(se)) continue;
            double scale = Math.Abs(se);
            if (scale > 0) worst = Math.Max(worst, Math.Abs(sd - se) / scale);
        }
        return worst;
    }

    /// <summary>True when V and K are evaluated in double-double arithmetic (<see cref="WithExtendedPrecision"/>).</summary>
    public bool IsExtendedPrecision => _extended;

    /// <summary>The same theory evaluated in plain double arithmetic (undoes <see cref="WithExtendedPrecision"/>).</summary>
    public JordanFrameTheory WithPlainPrecision() =>
        _extended ? new(_omega2, _kineticJ, _potentialJ, IsPalatini, Description, ValidRange, _fused, false, null) : this;

    /// <summary>
    /// The same theory with V and K evaluated in double-double arithmetic (when the fused program supports it): for
    /// plateaus whose slope double arithmetic cannot resolve (see <see cref="SlopeRoundOff"/>). The double-double jets
    /// are served from a checked interpolation table in ln|phi| (<see cref="FieldJetTable"/>: built on first use from the
    /// exact map, each interval verified against it, the exact map answering wherever a check fails), about 50 times
    /// cheaper per call than the double-double evaluation.
    /// </summary>
    public JordanFrameTheory WithExtendedPrecision()
    {
        if (_fused is not { SupportsExtended: true } f) return this;
        return new(_omega2, _kineticJ, _potentialJ, IsPalatini, Description, ValidRange, _fused, true, new FieldJetTable(f.EvaluateExtended));
    }

    /// <summary>True when the double-double jets come through the checked table (<see cref="WithExtendedPrecision"/>).</summary>
    public bool UsesJetTable => _table is not null;

    /// <summary>The same theory with every call evaluating the double-double map directly (no table): the reference for the table.</summary>
    public JordanFrameTheory WithoutJetTable() =>
        _table is null ? this : new(_omega2, _kineticJ, _potentialJ, IsPalatini, Description, ValidRange, _fused, _extended, null);

    /// <summary>Intervals of the jet table built so far and how many failed their check (0, 0 without a table).</summary>
    internal (int Built, int Failed) JetTableStatistics() => _table?.Statistics() ?? (0, 0);

    /// <summary>True when V and K come from one fused generated program (see <see cref="FromFormulas"/>).</summary>
    public bool IsFused => _fused is not null;

    /// <inheritdoc/>
    public JetPair Jets(double phi) => _table is { } t ? t.Evaluate(phi)
        : _fused is { } f ? (_extended ? f.EvaluateExtended(phi) : f.Evaluate(phi)) : new JetPair(ComposedPotential(phi), ComposedKinetic(phi));

    /// <summary>V and K evaluated directly (double-double when extended), bypassing the jet table: the table's reference.</summary>
    public JetPair ExactJets(double phi) => _table is { } t ? t.Exact(phi) : Jets(phi);

    /// <summary>Omega^2 at phi.</summary>
    public double OmegaSquared(double phi)
    {
        Span<double> d = stackalloc double[1];
        _omega2.EvaluateDerivatives(phi, d);
        return d[0];
    }

    /// <inheritdoc/>
    public Jet3 Potential(double phi) => _fused is not null ? Jets(phi).Potential : ComposedPotential(phi);

    /// <inheritdoc/>
    public Jet3 Kinetic(double phi) => _fused is not null ? Jets(phi).Kinetic : ComposedKinetic(phi);

    /// <summary>V by Taylor arithmetic on the inputs' derivatives (the reference for the fused program).</summary>
    internal Jet3 ComposedPotential(double phi)
    {
        Span<double> d = stackalloc double[4];
        _omega2.EvaluateDerivatives(phi, d);
        var w = TaylorJet.FromDerivatives(d);
        _potentialJ.EvaluateDerivatives(phi, d);
        var vj = TaylorJet.FromDerivatives(d);
        var w2 = TaylorJet.Square(w);
        return (vj / w2).ToJet3();
    }

    /// <summary>K by Taylor arithmetic on the inputs' derivatives (the reference for the fused program).</summary>
    internal Jet3 ComposedKinetic(double phi)
    {
        Span<double> d = stackalloc double[5];
        TaylorJet kj;
        if (_kineticJ is null) kj = TaylorJet.Constant(1.0);
        else
        {
            _kineticJ.EvaluateDerivatives(phi, d[..4]);
            kj = TaylorJet.FromDerivatives(d[..4]);
        }
        if (IsPalatini)
        {
            _omega2.EvaluateDerivatives(phi, d[..4]);
            var wp = TaylorJet.FromDerivatives(d[..4]);
            return (kj / wp).ToJet3();
        }
        _omega2.EvaluateDerivatives(phi, d);
        var w = TaylorJet.FromDerivatives(d);
        var w1 = TaylorJet.DerivativeFromDerivatives(d); // (Omega^2)' with three exact orders
        var ratio = w1 / w;
        var k = kj / w + 1.5 * TaylorJet.Square(ratio);
        return k.ToJet3();
    }

    /// <inheritdoc/>
    public string? InvalidReason(double phi)
    {
        double w = OmegaSquared(phi);
        if (double.IsNaN(w) || w <= 0) return "Omega^2 <= 0";
        if (!double.IsFinite(w)) return "Omega^2 is not finite";
        return TheoryValidity.KineticAndPotentialReason(this, phi);
    }

    /// <inheritdoc/>
    public void ValidateRange(double phiFrom, double phiTo) => TheoryValidity.ValidateRange(this, phiFrom, phiTo, "Jordan-frame theory");

    /// <inheritdoc/>
    public (double Min, double Max) FindValidInterval(double phiInside, double searchLimit = 1e3) =>
        TheoryValidity.FindValidInterval(this, phiInside, searchLimit);
}
