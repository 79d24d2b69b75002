namespace ModeSolver.Formulas;

/// <summary>Compiles a resolved syntax tree into a <see cref="CompiledProgram"/>, folding constant sub-expressions.</summary>
internal sealed class Compiler
{
    private readonly string _text;
    private readonly List<Instr> _code = new();
    private int _registers = 1; // registers 0 .. variables-1 hold the variables
    // Set by CompileShared: a node object met again (a sub-tree shared by several roots) reuses its register.
    private Dictionary<Node, Operand>? _shared;

    private Compiler(string text) => _text = text;

    private readonly record struct Operand(bool IsConstant, double Value, int Register)
    {
        public static Operand Const(double c) => new(true, c, -1);
        public static Operand Reg(int r) => new(false, 0, r);
    }

    public static CompiledProgram Compile(Node root, string text, int variables = 1)
    {
        var c = new Compiler(text) { _registers = Math.Max(1, variables) };
        var result = c.CompileNode(root);
        int reg = c.Materialize(result);
        return new CompiledProgram(c._code.ToArray(), c._registers, reg);
    }

    /// <summary>
    /// One program computing several results from trees that share node objects (each shared node is computed once).
    /// Only for trees without piecewise (a register computed in one branch must not be reused outside it).
    /// </summary>
    public static (CompiledProgram Program, int[] Results) CompileShared(Node[] roots, string text)
    {
        var c = new Compiler(text) { _shared = new Dictionary<Node, Operand>(ReferenceEqualityComparer.Instance) };
        var results = new int[roots.Length];
        for (int i = 0; i < roots.Length; i++) results[i] = c.Materialize(c.CompileNode(roots[i]));
        return (new CompiledProgram(c._code.ToArray(), c._registers, results[0]), results);
    }

    private int NewRegister(int count = 1)
    {
        int r = _registers;
        _registers += count;
        return r;
    }

    private int Emit(Op op, int a, int b = 0, double c = 0, int n = 0, int aux = 0)
    {
        int auxCount = op switch
        {
            Op.PowInt or Op.Pow or Op.Asin or Op.Acos or Op.Asinh or Op.Acosh or Op.Atan or Op.Atanh => 2,
            Op.Sin or Op.Cos or Op.Sinh or Op.Cosh or Op.Tan or Op.Tanh => 1,
            _ => 0,
        };
        int dst = NewRegister();
        if (auxCount > 0) aux = NewRegister(auxCount);
        _code.Add(new Instr { Op = op, Dst = dst, A = a, B = b, C = c, N = n, Aux = aux });
        return dst;
    }

    private int Materialize(Operand x)
    {
        if (!x.IsConstant) return x.Register;
        int dst = NewRegister();
        _code.Add(new Instr { Op = Op.LoadConst, Dst = dst, C = x.Value });
        return dst;
    }

    private Operand Fold(Node node, double value)
    {
        if (!double.IsFinite(value))
            throw Parser.Error(_text, node.Column, "a finite constant",
                $"constant part '{Printer.Print(node, inlineParameters: false)}' evaluates to {value.ToString(System.Globalization.CultureInfo.InvariantCulture)}");
        return Operand.Const(value);
    }

    private static bool IsSmallInteger(double x) => x == Math.Floor(x) && Math.Abs(x) <= int.MaxValue;

    private Operand CompileNode(Node node)
    {
        if (_shared is null) return CompileFresh(node);
        if (_shared.TryGetValue(node, out var known)) return known;
        var x = CompileFresh(node);
        _shared[node] = x;
        return x;
    }

    private Operand CompileFresh(Node node)
    {
        switch (node.Kind)
        {
            case NodeKind.Number:
            case NodeKind.Constant:
            case NodeKind.Parameter:
                return Operand.Const(node.Value);
            case NodeKind.Variable:
                return Operand.Reg(node.Index);
            case NodeKind.Negate:
            {
                var x = CompileNode(node.Children[0]);
                return x.IsConstant ? Operand.Const(-x.Value) : Operand.Reg(Emit(Op.Neg, x.Register));
            }
            case NodeKind.Add:
            {
                var a = CompileNode(node.Children[0]);
                var b = CompileNode(node.Children[1]);
                if (a.IsConstant && b.IsConstant) return Fold(node, a.Value + b.Value);
                if (a.IsConstant) return Operand.Reg(Emit(Op.AddC, b.Register, c: a.Value));
                if (b.IsConstant) return Operand.Reg(Emit(Op.AddC, a.Register, c: b.Value));
                return Operand.Reg(Emit(Op.Add, a.Register, b.Register));
            }
            case NodeKind.Subtract:
            {
                var a = CompileNode(node.Children[0]);
                var b = CompileNode(node.Children[1]);
                if (a.IsConstant && b.IsConstant) return Fold(node, a.Value - b.Value);
                if (a.IsConstant) return Operand.Reg(Emit(Op.SubCR, b.Register, c: a.Value));
                if (b.IsConstant) return Operand.Reg(Emit(Op.AddC, a.Register, c: -b.Value)); // a - c == a + (-c) exactly
                return Operand.Reg(Emit(Op.Sub, a.Register, b.Register));
            }
            case NodeKind.Multiply:
            {
                var a = CompileNode(node.Children[0]);
                var b = CompileNode(node.Children[1]);
                if (a.IsConstant && b.IsConstant) return Fold(node, a.Value * b.Value);
                if (a.IsConstant) return Operand.Reg(Emit(Op.MulC, b.Register, c: a.Value));
                if (b.IsConstant) return Operand.Reg(Emit(Op.MulC, a.Register, c: b.Value));
                return Operand.Reg(Emit(Op.Mul, a.Register, b.Register));
            }
            case NodeKind.Divide:
            {
                var a = CompileNode(node.Children[0]);
                var b = CompileNode(node.Children[1]);
                if (a.IsConstant && b.IsConstant) return Fold(node, a.Value / b.Value);
                if (a.IsConstant) return Operand.Reg(Emit(Op.DivCR, b.Register, c: a.Value));
                if (b.IsConstant) return Operand.Reg(Emit(Op.DivC, a.Register, c: b.Value));
                return Operand.Reg(Emit(Op.Div, a.Register, b.Register));
            }
            case NodeKind.Power:
            {
                var a = CompileNode(node.Children[0]);
                var b = CompileNode(node.Children[1]);
                if (a.IsConstant && b.IsConstant)
                    return Fold(node, IsSmallInteger(b.Value)
                        ? Taylor.PowIntScalar(a.Value, (int)b.Value)
                        : Math.Pow(a.Value, b.Value));
                if (b.IsConstant)
                {
                    if (IsSmallInteger(b.Value))
                    {
                        int m = (int)b.Value;
                        if (m == 1) return a;
                        return Operand.Reg(Emit(Op.PowInt, a.Register, n: m));
                    }
                    return Operand.Reg(Emit(Op.PowC, a.Register, c: b.Value));
                }
                if (a.IsConstant)
                {
                    if (a.Value == Math.E) return Operand.Reg(Emit(Op.Exp, b.Register));
                    return Operand.Reg(Emit(Op.CPow, b.Register, c: a.Value));
                }
                return Operand.Reg(Emit(Op.Pow, a.Register, b.Register));
            }
            case NodeKind.Function:
                return CompileFunction(node);
            case NodeKind.Piecewise:
                return CompilePiecewise(node);
            default:
                throw new InvalidOperationException($"unexpected node {node.Kind}");
        }
    }

    private static Op OpOf(Func f) => f switch
    {
        Func.Exp => Op.Exp, Func.Log => Op.Log, Func.Log10 => Op.Log10, Func.Sqrt => Op.Sqrt,
        Func.Sin => Op.Sin, Func.Cos => Op.Cos, Func.Tan => Op.Tan,
        Func.Sinh => Op.Sinh, Func.Cosh => Op.Cosh, Func.Tanh => Op.Tanh,
        Func.Asin => Op.Asin, Func.Acos => Op.Acos, Func.Atan => Op.Atan,
        Func.Asinh => Op.Asinh, Func.Acosh => Op.Acosh, Func.Atanh => Op.Atanh,
        Func.Abs => Op.Abs, Func.Step => Op.Step, Func.Min => Op.Min, _ => Op.Max,
    };

    private Operand CompileFunction(Node node)
    {
        var op = OpOf(node.Function);
        if (node.Children.Length == 2)
        {
            var a = CompileNode(node.Children[0]);
            var b = CompileNode(node.Children[1]);
            if (a.IsConstant && b.IsConstant) return Fold(node, CompiledProgram.Apply(op, a.Value, b.Value, 0, 0));
            return Operand.Reg(Emit(op, Materialize(a), Materialize(b)));
        }
        var x = CompileNode(node.Children[0]);
        if (x.IsConstant) return Fold(node, CompiledProgram.Apply(op, x.Value, 0, 0, 0));
        return Operand.Reg(Emit(op, x.Register));
    }

    private Operand CompilePiecewise(Node node)
    {
        var args = node.Children;
        int result = -1;
        var jumpsToEnd = new List<int>();
        for (int i = 0; i + 1 < args.Length; i += 2)
        {
            var cond = args[i];
            var left = CompileNode(cond.Children[0]);
            var right = CompileNode(cond.Children[1]);
            if (left.IsConstant && right.IsConstant)
            {
                if (!CompiledProgram.Holds((int)cond.Relation, left.Value, right.Value)) continue; // branch never taken
                var v = CompileNode(args[i + 1]);
                if (result < 0 && jumpsToEnd.Count == 0) return v; // first reachable branch always taken
                result = StoreInto(result, v);
                return FinishPiecewise(result, jumpsToEnd);
            }
            int la = Materialize(left), rb = Materialize(right);
            int jumpIndex = _code.Count;
            _code.Add(new Instr { Op = Op.JumpIfNot, A = la, B = rb, Aux = (int)cond.Relation });
            var value = CompileNode(args[i + 1]);
            result = StoreInto(result, value);
            jumpsToEnd.Add(_code.Count);
            _code.Add(new Instr { Op = Op.Jump });
            var jump = _code[jumpIndex];
            jump.N = _code.Count;
            _code[jumpIndex] = jump;
        }
        var otherwise = CompileNode(args[^1]);
        if (result < 0 && jumpsToEnd.Count == 0) return otherwise;
        result = StoreInto(result, otherwise);
        return FinishPiecewise(result, jumpsToEnd);
    }

    private int StoreInto(int result, Operand value)
    {
        if (result < 0) result = NewRegister();
        if (value.IsConstant) _code.Add(new Instr { Op = Op.LoadConst, Dst = result, C = value.Value });
        else _code.Add(new Instr { Op = Op.Copy, Dst = result, A = value.Register });
        return result;
    }

    private Operand FinishPiecewise(int result, List<int> jumpsToEnd)
    {
        foreach (int j in jumpsToEnd)
        {
            var jump = _code[j];
            jump.N = _code.Count;
            _code[j] = jump;
        }
        return Operand.Reg(result);
    }
}
