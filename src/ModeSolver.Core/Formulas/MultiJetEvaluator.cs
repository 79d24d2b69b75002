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
/// Runs a program in several variables on truncated multivariate Taylor series (value, gradient, second and third
/// partials, <see cref="MultiLayout"/>): the exact mixed partial derivatives to rounding, in one pass. Elementary functions
/// take their derivatives F', F'', F''' from <see cref="Kernels.Chain"/> (the declarations the one-variable paths use) and
/// combine them by the multivariate chain rule: y_i = F' a_i, y_ij = F' a_ij + F'' a_i a_j,
/// y_ijk = F' a_ijk + F'' (a_ij a_k + a_ik a_j + a_jk a_i) + F''' a_i a_j a_k. Allocation-free.
/// </summary>
internal static unsafe class MultiJetEvaluator
{
    /// <summary>
    /// Runs <paramref name="program"/> at <paramref name="point"/>; <paramref name="s"/> holds
    /// <see cref="MultiLayout.Width"/> doubles per register. Returns a pointer to the result register's series.
    /// </summary>
    [SkipLocalsInit]
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
            double* d = s + I.Dst * w;
            double* a = s + I.A * w;
            double* b = s + I.B * w;
            double c = I.C;
            switch (I.Op)
            {
                case Op.JumpIfNot:
                    if (!CompiledProgram.Holds(I.Aux, a[0], b[0])) pc = I.N - 1;
                    break;
                case Op.Jump: pc = I.N - 1; break;
                case Op.LoadConst: d[0] = c; for (int k = 1; k < w; k++) d[k] = 0; break;
                case Op.Copy: for (int k = 0; k < w; k++) d[k] = a[k]; break;
                case Op.Neg: for (int k = 0; k < w; k++) d[k] = -a[k]; break;
                case Op.Add: for (int k = 0; k < w; k++) d[k] = a[k] + b[k]; break;
                case Op.Sub: for (int k = 0; k < w; k++) d[k] = a[k] - b[k]; break;
                case Op.AddC: d[0] = a[0] + c; for (int k = 1; k < w; k++) d[k] = a[k]; break;
                case Op.SubCR: d[0] = c - a[0]; for (int k = 1; k < w; k++) d[k] = -a[k]; break;
                case Op.MulC: for (int k = 0; k < w; k++) d[k] = a[k] * c; break;
                case Op.DivC: for (int k = 0; k < w; k++) d[k] = a[k] / c; break;
                case Op.Mul: Mul(L, a, b, d); break;
                case Op.Div: Div(L, a, b, d); break;
                case Op.Pow:
                {
                    // a^b = exp(b log a), with the value pow(a0, b0).
                    double* l = s + I.Aux * w;
                    double* m = s + (I.Aux + 1) * w;
                    Kernels.Chain<Real>(Op.Log, a[0], 0.0, 0, out var l0, out var l1, out var l2, out var l3);
                    Compose(L, a, l, l0.V, l1.V, l2.V, l3.V);
                    Mul(L, b, l, m);
                    double p = Math.Pow(a[0], b[0]);
                    Compose(L, m, d, p, p, p, p);
                    break;
                }
                case Op.Abs:
                {
                    // Right-hand branch at a zero: the sign of the first non-zero coefficient (value, then derivatives in slot order).
                    double sign = 1;
                    for (int k = 0; k < w; k++)
                        if (a[k] != 0) { sign = a[k] < 0 ? -1 : 1; break; }
                    d[0] = Math.Abs(a[0]);
                    for (int k = 1; k < w; k++) d[k] = sign * a[k];
                    break;
                }
                case Op.Step: d[0] = Scalar.Step(a[0]); for (int k = 1; k < w; k++) d[k] = 0; break;
                case Op.Min:
                case Op.Max:
                {
                    if (double.IsNaN(a[0]) || double.IsNaN(b[0]))
                    {
                        for (int k = 0; k < w; k++) d[k] = double.NaN;
                        break;
                    }
                    int cmp = 0;
                    for (int k = 0; k < w && cmp == 0; k++) cmp = a[k].CompareTo(b[k]);
                    double* src = (I.Op == Op.Min ? cmp <= 0 : cmp >= 0) ? a : b;
                    for (int k = 0; k < w; k++) d[k] = src[k];
                    break;
                }
                default:
                {
                    Kernels.Chain<Real>(I.Op, a[0], c, I.N, out var f0, out var f1, out var f2, out var f3);
                    Compose(L, a, d, f0.V, f1.V, f2.V, f3.V);
                    break;
                }
            }
        }
        return s + program.Result * w;
    }

    /// <summary>d = F(a) by the multivariate chain rule, given F and its first three derivatives at a0.</summary>
    private static void Compose(MultiLayout L, double* a, double* d, double f0, double f1, double f2, double f3)
    {
        int n = L.N;
        // Third partials first: they read a's first and second partials (d never aliases a).
        foreach (var t in L.Triples)
            d[t.At] = f1 * a[t.At] + f2 * (a[t.IJ] * a[t.K] + a[t.IK] * a[t.J] + a[t.JK] * a[t.I]) + f3 * a[t.I] * a[t.J] * a[t.K];
        var pairs = L.Pairs;
        for (int p = 0; p < pairs.Length; p++)
        {
            int at = 1 + n + p;
            d[at] = f1 * a[at] + f2 * a[1 + pairs[p].I] * a[1 + pairs[p].J];
        }
        for (int i = 1; i <= n; i++) d[i] = f1 * a[i];
        d[0] = f0;
    }

    /// <summary>d = a b (the Leibniz rule for each partial).</summary>
    private static void Mul(MultiLayout L, double* a, double* b, double* d)
    {
        int n = L.N;
        double a0 = a[0], b0 = b[0];
        foreach (var t in L.Triples)
            d[t.At] = a0 * b[t.At] + a[t.At] * b0
                + a[t.I] * b[t.JK] + a[t.J] * b[t.IK] + a[t.K] * b[t.IJ]
                + a[t.IJ] * b[t.K] + a[t.IK] * b[t.J] + a[t.JK] * b[t.I];
        var pairs = L.Pairs;
        for (int p = 0; p < pairs.Length; p++)
        {
            int at = 1 + n + p, i = 1 + pairs[p].I, j = 1 + pairs[p].J;
            d[at] = a0 * b[at] + a[i] * b[j] + a[j] * b[i] + a[at] * b0;
        }
        for (int i = 1; i <= n; i++) d[i] = a0 * b[i] + a[i] * b0;
        d[0] = a0 * b0;
    }

    /// <summary>d = a / b, from a = d b order by order (b0 non-zero).</summary>
    private static void Div(MultiLayout L, double* a, double* b, double* d)
    {
        int n = L.N;
        double b0 = b[0];
        double q0 = a[0] / b0;
        d[0] = q0;
        for (int i = 1; i <= n; i++) d[i] = (a[i] - q0 * b[i]) / b0;
        var pairs = L.Pairs;
        for (int p = 0; p < pairs.Length; p++)
        {
            int at = 1 + n + p, i = 1 + pairs[p].I, j = 1 + pairs[p].J;
            d[at] = (a[at] - q0 * b[at] - d[i] * b[j] - d[j] * b[i]) / b0;
        }
        foreach (var t in L.Triples)
            d[t.At] = (a[t.At] - q0 * b[t.At]
                - d[t.I] * b[t.JK] - d[t.J] * b[t.IK] - d[t.K] * b[t.IJ]
                - d[t.IJ] * b[t.K] - d[t.IK] * b[t.J] - d[t.JK] * b[t.I]) / b0;
    }
}
