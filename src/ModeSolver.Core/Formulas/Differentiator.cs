namespace ModeSolver.Formulas;

/// <summary>
/// Symbolic derivative of a smooth syntax tree with respect to the variable (the usual rules of calculus), for
/// composing new formulas from given ones (e.g. the frame map's (Omega^2)'). The result reuses the input's
/// sub-trees as shared node objects, so a compiler that shares repeated nodes evaluates them once.
/// Trees with abs, step, min, max or piecewise have no derivative here (null): their callers keep the
/// Taylor-arithmetic path, which handles switch points.
/// </summary>
internal static class Differentiator
{
    /// <summary>d<paramref name="node"/>/d(variable), or null when the tree is not smooth by construction.</summary>
    public static Node? Derivative(Node node)
    {
        switch (node.Kind)
        {
            case NodeKind.Number:
            case NodeKind.Constant:
            case NodeKind.Parameter:
                return Number(0);
            case NodeKind.Variable:
                return Number(1);
            case NodeKind.Negate:
                return D(node, 0) is { } d0 ? Neg(d0) : null;
            case NodeKind.Add:
            case NodeKind.Subtract:
            {
                if (D(node, 0) is not { } da || D(node, 1) is not { } db) return null;
                return node.Kind == NodeKind.Add ? Add(da, db) : Sub(da, db);
            }
            case NodeKind.Multiply:
            {
                if (D(node, 0) is not { } da || D(node, 1) is not { } db) return null;
                var (a, b) = (node.Children[0], node.Children[1]);
                return Add(Mul(da, b), Mul(a, db));
            }
            case NodeKind.Divide:
            {
                if (D(node, 0) is not { } da || D(node, 1) is not { } db) return null;
                var (a, b) = (node.Children[0], node.Children[1]);
                // (a/b)' = a'/b - (a/b) b'/b, reusing the quotient node.
                return Sub(Div(da, b), Div(Mul(node, db), b));
            }
            case NodeKind.Power:
                return PowerDerivative(node);
            case NodeKind.Function:
                return FunctionDerivative(node);
            default:
                return null; // Condition, Piecewise
        }
    }

    private static Node? D(Node node, int child) => Derivative(node.Children[child]);

    private static Node? PowerDerivative(Node node)
    {
        var (a, b) = (node.Children[0], node.Children[1]);
        if (Derivative(a) is not { } da || Derivative(b) is not { } db) return null;
        if (!b.DependsOnVariable)
        {
            // (a^c)' = c a^(c-1) a'
            Node lowered = b.Kind == NodeKind.Number ? Number(b.Value - 1) : Sub(b, Number(1));
            return Mul(Mul(b, Pow(a, lowered)), da);
        }
        // (a^b)' = a^b (b' ln a + b a'/a)
        return Mul(node, Add(Mul(db, Fn(Func.Log, a)), Div(Mul(b, da), a)));
    }

    private static Node? FunctionDerivative(Node node)
    {
        if (node.Children.Length != 1) return null; // min, max
        var u = node.Children[0];
        if (Derivative(u) is not { } du) return null;
        Node? outer = node.Function switch
        {
            Func.Exp => node,
            Func.Log => Div(Number(1), u),
            Func.Log10 => Div(Number(1 / Math.Log(10)), u),
            Func.Sqrt => Div(Number(0.5), node),
            Func.Sin => Fn(Func.Cos, u),
            Func.Cos => Neg(Fn(Func.Sin, u)),
            Func.Tan => Add(Number(1), Mul(node, node)),
            Func.Sinh => Fn(Func.Cosh, u),
            Func.Cosh => Fn(Func.Sinh, u),
            Func.Tanh => Sub(Number(1), Mul(node, node)),
            Func.Asin => Div(Number(1), Fn(Func.Sqrt, Sub(Number(1), Mul(u, u)))),
            Func.Acos => Neg(Div(Number(1), Fn(Func.Sqrt, Sub(Number(1), Mul(u, u))))),
            Func.Atan => Div(Number(1), Add(Number(1), Mul(u, u))),
            Func.Asinh => Div(Number(1), Fn(Func.Sqrt, Add(Mul(u, u), Number(1)))),
            Func.Acosh => Div(Number(1), Fn(Func.Sqrt, Sub(Mul(u, u), Number(1)))),
            Func.Atanh => Div(Number(1), Sub(Number(1), Mul(u, u))),
            _ => null, // abs, step
        };
        return outer is null ? null : Mul(outer, du);
    }

    // Constructors that drop exact zeros and ones, so derivatives of constants and of phi cost nothing.

    /// <summary>A number node.</summary>
    public static Node Number(double x) => new(NodeKind.Number, 0, []) { Value = x };

    private static bool IsNumber(Node n, double x) => n.Kind == NodeKind.Number && n.Value == x;

    /// <summary>a + b.</summary>
    public static Node Add(Node a, Node b) =>
        IsNumber(a, 0) ? b : IsNumber(b, 0) ? a : new Node(NodeKind.Add, 0, [a, b]);

    /// <summary>a - b.</summary>
    public static Node Sub(Node a, Node b) =>
        IsNumber(b, 0) ? a : IsNumber(a, 0) ? Neg(b) : new Node(NodeKind.Subtract, 0, [a, b]);

    /// <summary>a * b.</summary>
    public static Node Mul(Node a, Node b) =>
        IsNumber(a, 0) || IsNumber(b, 0) ? Number(0) : IsNumber(a, 1) ? b : IsNumber(b, 1) ? a : new Node(NodeKind.Multiply, 0, [a, b]);

    /// <summary>a / b.</summary>
    public static Node Div(Node a, Node b) =>
        IsNumber(a, 0) ? Number(0) : IsNumber(b, 1) ? a : new Node(NodeKind.Divide, 0, [a, b]);

    /// <summary>a ^ b.</summary>
    public static Node Pow(Node a, Node b) =>
        IsNumber(b, 0) ? Number(1) : IsNumber(b, 1) ? a : new Node(NodeKind.Power, 0, [a, b]);

    /// <summary>-a.</summary>
    public static Node Neg(Node a) => IsNumber(a, 0) ? a : new Node(NodeKind.Negate, 0, [a]);

    private static Node Fn(Func f, Node a) => new(NodeKind.Function, 0, [a]) { Function = f };
}
