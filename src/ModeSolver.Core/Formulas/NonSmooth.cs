namespace ModeSolver.Formulas;

/// <summary>
/// Finds the field values where a switching argument (of abs, min, max, step, or a piecewise condition) changes sign.
/// Linear arguments are solved exactly; others are scanned over a bounded range and refined by safeguarded Newton
/// (bisection fallback) with exact first derivatives.
/// </summary>
internal sealed class SwitchFunction
{
    private readonly CompiledProgram _program;

    private SwitchFunction(CompiledProgram program, bool linear, double root)
    {
        _program = program;
        IsLinear = linear;
        LinearRoot = root;
    }

    public bool IsLinear { get; }

    /// <summary>The exact root when <see cref="IsLinear"/> (NaN when the argument is constant).</summary>
    public double LinearRoot { get; }

    /// <summary>Collects the switching arguments of a tree (only those that depend on the variable).</summary>
    public static List<SwitchFunction> Collect(Node root, string text)
    {
        var list = new List<SwitchFunction>();
        Walk(root, text, list);
        return list;
    }

    private static void Walk(Node node, string text, List<SwitchFunction> list)
    {
        foreach (var c in node.Children) Walk(c, text, list);
        Node? g = null;
        if (node.Kind == NodeKind.Function && node.Function is Func.Abs or Func.Step)
            g = node.Children[0];
        else if ((node.Kind == NodeKind.Function && node.Function is Func.Min or Func.Max) || node.Kind == NodeKind.Condition)
            g = new Node(NodeKind.Subtract, node.Column, [node.Children[0], node.Children[1]]);
        if (g == null || !g.DependsOnVariable) return;
        var program = Compiler.Compile(g, text);
        bool linear = IsLinearTree(g);
        double root = double.NaN;
        if (linear)
        {
            var (g0, g1) = ValueAndSlope(program, 0);
            if (g1 != 0 && double.IsFinite(g0) && double.IsFinite(g1))
            {
                root = -g0 / g1;
                for (int i = 0; i < 3; i++)
                {
                    var (v, s) = ValueAndSlope(program, root);
                    if (v == 0 || s == 0 || !double.IsFinite(v)) break;
                    double next = root - v / s;
                    if (Math.Abs(ValueAndSlope(program, next).Value) >= Math.Abs(v)) break;
                    root = next;
                }
            }
        }
        list.Add(new SwitchFunction(program, linear, root));
    }

    private static bool IsLinearTree(Node n)
    {
        if (!n.DependsOnVariable) return true;
        return n.Kind switch
        {
            NodeKind.Variable => true,
            NodeKind.Negate => IsLinearTree(n.Children[0]),
            NodeKind.Add or NodeKind.Subtract => IsLinearTree(n.Children[0]) && IsLinearTree(n.Children[1]),
            NodeKind.Multiply => (!n.Children[0].DependsOnVariable && IsLinearTree(n.Children[1]))
                                 || (!n.Children[1].DependsOnVariable && IsLinearTree(n.Children[0])),
            NodeKind.Divide => !n.Children[1].DependsOnVariable && IsLinearTree(n.Children[0]),
            _ => false,
        };
    }

    private static (double Value, double Slope) ValueAndSlope(CompiledProgram p, double x)
        => ValueAndSlope(p, x, new double[p.RegisterCount * 2]);

    private static unsafe (double Value, double Slope) ValueAndSlope(CompiledProgram p, double x, double[] buffer)
    {
        fixed (double* s = buffer)
        {
            double* r = p.RunSeries(x, 1, s);
            return (r[0], r[1]);
        }
    }

    /// <summary>Adds the sign changes of this argument inside [min, max] to <paramref name="roots"/>.</summary>
    public void AddRoots(double min, double max, List<double> roots)
    {
        if (IsLinear)
        {
            if (double.IsFinite(LinearRoot) && LinearRoot >= min && LinearRoot <= max) roots.Add(LinearRoot);
            return;
        }
        var grid = Grid(min, max);
        var buffer = new double[_program.RegisterCount * 2];
        double xPrev = grid[0], gPrev = ValueAndSlope(_program, xPrev, buffer).Value;
        if (gPrev == 0) roots.Add(xPrev);
        for (int i = 1; i < grid.Count; i++)
        {
            double x = grid[i], g = ValueAndSlope(_program, x, buffer).Value;
            if (g == 0) roots.Add(x);
            else if (double.IsFinite(g) && double.IsFinite(gPrev) && gPrev != 0 && Math.Sign(g) != Math.Sign(gPrev))
                roots.Add(Refine(xPrev, gPrev, x, buffer));
            xPrev = x;
            gPrev = g;
        }
    }

    /// <summary>Uniform points over [min, max] plus geometric points toward zero, so both wide and small-field switches are seen.</summary>
    private static List<double> Grid(double min, double max)
    {
        var pts = new List<double>();
        const int Uniform = 4000;
        for (int i = 0; i <= Uniform; i++) pts.Add(min + (max - min) * i / Uniform);
        double scale = Math.Max(Math.Abs(min), Math.Abs(max));
        if (min < 0 && max > 0 || min == 0 || max == 0)
        {
            for (double p = Math.Log10(scale); p >= -8; p -= 0.02)
            {
                double x = Math.Pow(10, p);
                if (x <= max) pts.Add(x);
                if (-x >= min) pts.Add(-x);
            }
        }
        else
        {
            // Geometric refinement near the end closest to zero.
            double lo = Math.Min(Math.Abs(min), Math.Abs(max)), sign = min > 0 ? 1 : -1;
            for (double p = Math.Log10(scale); p >= Math.Log10(lo); p -= 0.02) pts.Add(sign * Math.Pow(10, p));
        }
        pts.Sort();
        return pts;
    }

    private const double MachineEpsilon = 2.220446049250313e-16;

    private double Refine(double a, double ga, double b, double[] buffer)
    {
        double x = 0.5 * (a + b);
        for (int iter = 0; iter < 200; iter++)
        {
            var (g, s) = ValueAndSlope(_program, x, buffer);
            if (g == 0 || !double.IsFinite(g)) return x;
            if (Math.Sign(g) == Math.Sign(ga)) { a = x; ga = g; } else b = x;
            double newton = x - g / s;
            double lo = Math.Min(a, b), hi = Math.Max(a, b);
            double next = double.IsFinite(newton) && newton > lo && newton < hi ? newton : 0.5 * (a + b);
            if (Math.Abs(next - x) <= 4 * MachineEpsilon * Math.Abs(x) || hi - lo <= 4 * MachineEpsilon * Math.Max(Math.Abs(lo), Math.Abs(hi)) || hi - lo < 1e-300)
                return next;
            x = next;
        }
        return x;
    }
}
