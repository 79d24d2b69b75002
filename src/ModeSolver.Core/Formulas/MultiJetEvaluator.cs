using System.Runtime.CompilerServices;

namespace ModeSolver.Formulas;

/// <summary>
/// Where the partial derivatives of n variables up to order 2 or 3 sit in one register: the value, the gradient
/// (n entries), the distinct second partials f_ij, i &lt;= j (n(n+1)/2), and at order 3 the distinct third partials
/// f_ijk, i &lt;= j &lt;= k (n(n+1)(n+2)/6), each block in lexicographic order. Immutable.
/// </summary>
internal sealed class MultiLayout
{
    public MultiLayout(int variables, int order)
    {
        if (variables < 1) throw new ArgumentOutOfRangeException(nameof(variables));
        if (order is < 1 or > 3) throw new ArgumentOutOfRangeException(nameof(order));
        N = variables;
        Order = order;
        int n = variables;
        PairOf = new int[n * n];
        var pairs = new List<(int I, int J)>();
        if (order >= 2)
            for (int i = 0; i < n; i++)
                for (int j = i; j < n; j++)
                {
                    PairOf[i * n + j] = PairOf[j * n + i] = 1 + n + pairs.Count;
                    pairs.Add((i, j));
                }
        Pairs = pairs.ToArray();
        var triples = new List<Triple>();
        if (order >= 3)
        {
            int start = 1 + n + pairs.Count;
            for (int i = 0; i < n; i++)
                for (int j = i; j < n; j++)
                    for (int k = j; k < n; k++)
                        triples.Add(new Triple(start + triples.Count, 1 + i, 1 + j, 1 + k,
                            PairOf[i * n + j], PairOf[i * n + k], PairOf[j * n + k]));
        }
        Triples = triples.ToArray();
        Width = 1 + n + Pairs.Length + Triples.Length;
        TripleOf = new int[order >= 3 ? n * n * n : 0];
        if (order >= 3)
            for (int i = 0; i < n; i++)
                for (int j = 0; j < n; j++)
                    for (int k = 0; k < n; k++)
                    {
                        Span<int> s = [i, j, k];
                        s.Sort();
                        int t = 0;
                        while (Triples[t].Rank != (s[0], s[1], s[2])) t++;
                        TripleOf[(i * n + j) * n + k] = Triples[t].At;
                    }
    }

    /// <summary>One third partial f_ijk: its slot, the slots of f_i, f_j, f_k and of f_ij, f_ik, f_jk.</summary>
    public readonly record struct Triple(int At, int I, int J, int K, int IJ, int IK, int JK)
    {
        public (int, int, int) Rank => (I - 1, J - 1, K - 1);
    }

    /// <summary>Number of variables.</summary>
    public int N { get; }

    /// <summary>Highest derivative order kept (1, 2 or 3).</summary>
    public int Order { get; }

    /// <summary>Doubles per register.</summary>
    public int Width { get; }

    /// <summary>Slot of f_ij for any i, j (index i*n + j).</summary>
    public int[] PairOf { get; }

    /// <summary>The (i, j), i &lt;= j, of each second-partial slot, in slot order.</summary>
    public (int I, int J)[] Pairs { get; }

    /// <summary>Every third-partial slot.</summary>
    public Triple[] Triples { get; }

    /// <summary>Slot of f_ijk for any i, j, k (index (i*n + j)*n + k).</summary>
    public int[] TripleOf { get; }
}

/// <summary>
/// The interpreter of a program in several variables on truncated multivariate Taylor series (value, gradient, second
/// and third partials, <see cref="MultiLayout"/>): the exact mixed partial derivatives to rounding, in one pass, each
/// instruction by its kernel in <see cref="MultiKernels"/> (which the generated code, <see cref="MultiProgramJit"/>,
/// runs too). Allocation-free.
/// </summary>
internal static unsafe class MultiJetEvaluator
{
    /// <summary>
    /// Runs <paramref name="program"/> at <paramref name="point"/>; <paramref name="s"/> holds
    /// <see cref="MultiLayout.Width"/> doubles per register. Returns a pointer to the result register's series.
    /// </summary>
    [SkipLocalsInit]
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public static double* Run(CompiledProgram program, MultiLayout L, ReadOnlySpan<double> point, double* s)
    {
        int w = L.Width;
        for (int v = 0; v < L.N; v++)
        {
            double* x = s + v * w;
            for (int k = 0; k < w; k++) x[k] = 0;
            x[0] = point[v];
            x[1 + v] = 1;
        }
        var code = program.Code;
        for (int pc = 0; pc < code.Length; pc++)
        {
            ref readonly Instr I = ref code[pc];
            switch (I.Op)
            {
                case Op.JumpIfNot:
                    if (!CompiledProgram.Holds(I.Aux, s[I.A * w], s[I.B * w])) pc = I.N - 1;
                    break;
                case Op.Jump: pc = I.N - 1; break;
                default:
                    MultiKernels.Run<Real, MemoryRegister>(L, I.Op, new(s + I.Dst * w), new(s + I.A * w), new(s + I.B * w),
                        new(s + I.Aux * w), new(s + (I.Aux + 1) * w), I.C, I.N);
                    break;
            }
        }
        return s + program.Result * w;
    }
}
