namespace ModeSolver.Models;

/// <summary>Writes f, f', f'', ... at <paramref name="phi"/> into <paramref name="d"/> (as many orders as d is long).</summary>
public delegate void DerivativeEvaluator(double phi, Span<double> d);

/// <summary>A field function that can supply derivatives beyond the third (the Jordan-frame map needs (Omega^2)'''').</summary>
public interface IDerivativeFunction : IFieldFunction
{
    /// <summary>Highest derivative order this function can supply exactly.</summary>
    int MaxOrder { get; }

    /// <summary>d[0] = f, d[1] = f', ... up to d.Length - 1 (at most <see cref="MaxOrder"/>). Allocation-free.</summary>
    void EvaluateDerivatives(double phi, Span<double> d);
}

/// <summary>
/// An <see cref="IDerivativeFunction"/> built from a derivative evaluator (e.g. a parsed formula's
/// EvaluateDerivatives, or a closed form written in C#).
/// </summary>
public sealed class DerivativeFunction : IDerivativeFunction
{
    private readonly DerivativeEvaluator _evaluate;

    /// <summary>Wraps <paramref name="evaluate"/>, which must fill up to <paramref name="maxOrder"/> + 1 entries.</summary>
    public DerivativeFunction(DerivativeEvaluator evaluate, int maxOrder = 5, IReadOnlyList<double>? nonSmoothPoints = null, string text = "")
    {
        ArgumentNullException.ThrowIfNull(evaluate);
        if (maxOrder < 3) throw new ArgumentOutOfRangeException(nameof(maxOrder), "at least three derivatives are needed");
        _evaluate = evaluate;
        MaxOrder = maxOrder;
        NonSmoothPoints = nonSmoothPoints ?? Array.Empty<double>();
        Text = text;
    }

    /// <summary>A formula as a derivative function (six derivatives at most, enough for the metric frame map).</summary>
    public static DerivativeFunction FromFormula(Formulas.Formula formula)
    {
        ArgumentNullException.ThrowIfNull(formula);
        return new DerivativeFunction(formula.EvaluateDerivatives, Math.Min(Formulas.Formula.MaxOrder, 6), formula.NonSmoothPoints, formula.Text);
    }

    /// <summary>Human-readable form (may be empty).</summary>
    public string Text { get; }

    /// <inheritdoc/>
    public int MaxOrder { get; }

    /// <inheritdoc/>
    public IReadOnlyList<double> NonSmoothPoints { get; }

    /// <summary>The constant function c.</summary>
    public static DerivativeFunction Constant(double c) =>
        new((phi, d) => { d.Clear(); if (d.Length > 0) d[0] = c; }, 16, null, c.ToString(System.Globalization.CultureInfo.InvariantCulture));

    /// <inheritdoc/>
    public void EvaluateDerivatives(double phi, Span<double> d)
    {
        if (d.Length > MaxOrder + 1) throw new ArgumentException($"at most {MaxOrder} derivatives are available", nameof(d));
        _evaluate(phi, d);
    }

    /// <inheritdoc/>
    public Jet3 Evaluate(double phi)
    {
        Span<double> d = stackalloc double[4];
        _evaluate(phi, d);
        return new Jet3(d[0], d[1], d[2], d[3]);
    }

    /// <inheritdoc/>
    public override string ToString() => Text;
}
