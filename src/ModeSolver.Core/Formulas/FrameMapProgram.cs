using ModeSolver.Models;

namespace ModeSolver.Formulas;

/// <summary>
/// The Einstein-frame V and K of a Jordan-frame theory given by formulas (physics.md section 1), composed as one
/// program: V = V_J / (Omega^2)^2 and K = K_J / Omega^2 + (3/2) [(Omega^2)' / Omega^2]^2 (metric; Palatini drops the
/// second term), with (Omega^2)' differentiated symbolically (<see cref="Differentiator"/>). Sub-trees shared by V and
/// K (Omega^2 itself, and the parts of Omega^2 its derivative reuses) are computed once, and the program runs as
/// generated straight-line code (<see cref="ProgramJit"/>) or, where the runtime cannot compile code, on the order-3
/// interpreter. Only for smooth formulas (no abs, step, min, max or piecewise): <see cref="TryCreate"/> returns null
/// otherwise and the theory keeps its Taylor-arithmetic path. Thread-safe and allocation-free.
/// </summary>
internal sealed class FrameMapProgram
{
    private const int StackDoubles = 2048;
    private readonly CompiledProgram _program;
    private readonly int _v, _k;
    private readonly double[] _constants;
    private readonly Func<double[], double, JetPair>? _jit;

    private FrameMapProgram(CompiledProgram program, int v, int k)
    {
        _program = program;
        _v = v;
        _k = k;
        _constants = ProgramJit.Constants(program);
        _jit = program.RegisterCount * 4 <= StackDoubles ? ProgramJit.PairFor(program, v, k) : null;
    }

    /// <summary>True when evaluation runs generated code.</summary>
    public bool IsGenerated => _jit != null;

    /// <summary>The fused program, or null when a formula is not smooth by construction or the program is too large.</summary>
    public static FrameMapProgram? TryCreate(Formula omegaSquared, Formula? kineticJ, Formula potentialJ, bool palatini)
    {
        ArgumentNullException.ThrowIfNull(omegaSquared);
        ArgumentNullException.ThrowIfNull(potentialJ);
        if (!IsSmooth(omegaSquared.Root) || !IsSmooth(potentialJ.Root) || (kineticJ != null && !IsSmooth(kineticJ.Root))) return null;
        Node w = omegaSquared.Root;
        Node two = Differentiator.Number(2);
        Node v = Differentiator.Div(potentialJ.Root, Differentiator.Pow(w, two));
        Node kj = kineticJ?.Root ?? Differentiator.Number(1);
        Node k = Differentiator.Div(kj, w);
        if (!palatini)
        {
            if (Differentiator.Derivative(w) is not { } w1) return null;
            k = Differentiator.Add(k, Differentiator.Mul(Differentiator.Number(1.5), Differentiator.Pow(Differentiator.Div(w1, w), two)));
        }
        string text = $"V = ({potentialJ.Text}) / ({omegaSquared.Text})^2; K from K_J = {kineticJ?.Text ?? "1"}";
        var (program, results) = Compiler.CompileShared([v, k], text);
        if (program.RegisterCount * 4 > StackDoubles) return null;
        return new FrameMapProgram(program, results[0], results[1]);
    }

    /// <summary>Einstein-frame V and K jets at <paramref name="phi"/>.</summary>
    public JetPair Evaluate(double phi) => _jit != null ? _jit(_constants, phi) : Interpret(phi);

    /// <summary>True when the program can also run in double-double arithmetic (<see cref="EvaluateExtended"/>).</summary>
    public bool SupportsExtended => Extended.Supports(_program);

    /// <summary>
    /// V and K jets evaluated in double-double arithmetic and rounded at the end: exact to double precision where the
    /// double evaluation loses the slope of a plateau to cancellation. About 30 times slower than <see cref="Evaluate"/>.
    /// </summary>
    [System.Runtime.CompilerServices.SkipLocalsInit]
    [System.Runtime.CompilerServices.MethodImpl(System.Runtime.CompilerServices.MethodImplOptions.AggressiveOptimization)]
    public JetPair EvaluateExtended(double phi)
    {
        Span<Series3<Extended>> s = stackalloc Series3<Extended>[_program.RegisterCount];
        Jet3Evaluator.Run<Extended>(_program, phi, s);
        return new JetPair(Jet3Evaluator.Read(s, _v), Jet3Evaluator.Read(s, _k));
    }

    /// <summary>The same by the interpreter (the reference for the generated code).</summary>
    [System.Runtime.CompilerServices.SkipLocalsInit]
    internal unsafe JetPair Interpret(double phi)
    {
        double* s = stackalloc double[_program.RegisterCount * 4];
        Jet3 v = Jet3Evaluator.Run(_program, phi, s); // the program's result register is _v
        double* kr = s + (_k << 2);
        var k = new Jet3(kr[0], kr[1], 2 * kr[2], 6 * kr[3]);
        return new JetPair(v, k);
    }

    private static bool IsSmooth(Node n)
    {
        if (n.Kind is NodeKind.Piecewise or NodeKind.Condition) return false;
        if (n.Kind == NodeKind.Function && n.Function is Func.Abs or Func.Step or Func.Min or Func.Max) return false;
        foreach (var c in n.Children) if (!IsSmooth(c)) return false;
        return true;
    }
}
