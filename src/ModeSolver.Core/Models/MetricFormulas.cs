using ModeSolver.Formulas;

namespace ModeSolver.Models;

/// <summary>
/// A symmetric n x n matrix of formulas in the fields (a field-space metric G_IJ or a Jordan-frame kinetic matrix
/// K^J_IJ), the identity when none is given: each entry's value, gradient and Hessian, exact from
/// <see cref="MultiFormula"/>; entries that use no field are constants. Both triangles share one formula.
/// </summary>
internal sealed class MetricFormulas
{
    private readonly int _n;
    private readonly MultiFormula?[] _formula; // [I * n + J]; null for a constant entry
    private readonly double[] _constant;       // [I * n + J] of the constant entries

    private MetricFormulas(int n, MultiFormula?[] formula, double[] constant)
    {
        _n = n;
        _formula = formula;
        _constant = constant;
        bool identity = true;
        for (int i = 0; i < n; i++)
            for (int j = 0; j < n; j++)
                if (formula[i * n + j] is not null || constant[i * n + j] != (i == j ? 1.0 : 0.0)) identity = false;
        IsIdentity = identity;
        IsConstant = Array.TrueForAll(formula, f => f is null);
    }

    /// <summary>True when no entry depends on the fields.</summary>
    public bool IsConstant { get; }

    /// <summary>True when every entry is the constant of the identity matrix.</summary>
    public bool IsIdentity { get; }

    /// <summary>
    /// The matrix of <paramref name="rows"/> (null: the identity), checked n x n and symmetric (entry [I][J] the same
    /// formula as [J][I], spaces aside); <paramref name="what"/> names it in messages.
    /// </summary>
    public static MetricFormulas Create(string[] names, IReadOnlyList<IReadOnlyList<string>>? rows, IReadOnlyDictionary<string, double>? parameters, string what)
    {
        int n = names.Length;
        var formula = new MultiFormula?[n * n];
        var constant = new double[n * n];
        if (rows is null)
        {
            for (int i = 0; i < n; i++) constant[i * n + i] = 1.0;
            return new MetricFormulas(n, formula, constant);
        }
        string fields = string.Join(", ", names);
        if (rows.Count != n)
            throw new TheoryException($"the {what} has {rows.Count} row(s) but the theory has {n} field(s) ({fields}); give {n} rows of {n} formulas");
        for (int i = 0; i < n; i++)
            if (rows[i] is null || rows[i].Count != n)
                throw new TheoryException($"row {i + 1} ({names[i]}) of the {what} has {rows[i]?.Count ?? 0} entries but the theory has {n} field(s) ({fields}); give {n} formulas per row");
        var zero = new double[n];
        for (int i = 0; i < n; i++)
            for (int j = i; j < n; j++)
            {
                string text = rows[i][j] ?? throw new TheoryException($"the {what} entry [{names[i]}][{names[j]}] is missing");
                string mirror = rows[j][i] ?? "";
                if (j > i && !string.Equals(Squeeze(text), Squeeze(mirror), StringComparison.Ordinal))
                    throw new TheoryException($"the {what} is not symmetric: entry [{names[i]}][{names[j]}] = \"{text}\" but [{names[j]}][{names[i]}] = \"{mirror}\"; give the same formula in both places");
                var f = MultiFormula.Compile(text, names, parameters);
                bool usesField = false;
                foreach (var (name, _) in Parser.CollectNames(text, Array.Empty<string>()))
                    if (Array.IndexOf(names, name) >= 0) usesField = true;
                if (usesField)
                {
                    formula[i * n + j] = f;
                    formula[j * n + i] = f;
                }
                else
                {
                    double c = f.Value(zero);
                    if (!double.IsFinite(c)) throw new TheoryException($"the {what} entry [{names[i]}][{names[j]}] = \"{text}\" is not finite ({c})");
                    constant[i * n + j] = c;
                    constant[j * n + i] = c;
                }
            }
        return new MetricFormulas(n, formula, constant);
    }

    /// <summary>Rows as text: [[1, 0], [0, exp(2*b*phi)]].</summary>
    public static string Describe(IReadOnlyList<IReadOnlyList<string>> rows) =>
        "[" + string.Join(", ", rows.Select(r => "[" + string.Join(", ", r) + "]")) + "]";

    private static string Squeeze(string s)
    {
        var sb = new System.Text.StringBuilder(s.Length);
        foreach (char c in s) if (!char.IsWhiteSpace(c)) sb.Append(c);
        return sb.ToString();
    }

    /// <summary>
    /// Entry [I][J] at <paramref name="phi"/> (n values): the value, and with <paramref name="order"/> &gt;= 1 its gradient
    /// into <paramref name="gradient"/> (n), with order 2 its Hessian into <paramref name="hessian"/> (n x n).
    /// </summary>
    public double Entry(int i, int j, ReadOnlySpan<double> phi, int order, Span<double> gradient, Span<double> hessian)
    {
        int n = _n;
        var f = _formula[i * n + j];
        if (f is null)
        {
            if (order >= 1) gradient[..n].Clear();
            if (order >= 2) hessian[..(n * n)].Clear();
            return _constant[i * n + j];
        }
        return order switch
        {
            0 => f.Value(phi),
            1 => f.Evaluate(phi, gradient[..n], Span<double>.Empty),
            _ => f.Evaluate(phi, gradient[..n], hessian[..(n * n)]),
        };
    }
}
