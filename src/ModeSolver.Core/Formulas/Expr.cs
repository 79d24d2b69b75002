using System.Linq.Expressions;
using System.Reflection;

namespace ModeSolver.Formulas;

/// <summary>
/// The code generator's number type: each operation builds the expression tree of the same double operation
/// (System.Linq.Expressions), so a kernel run on <see cref="Expr"/> emits exactly the arithmetic it performs on
/// <see cref="Real"/>. <see cref="Let"/> stores an intermediate in a local of the <see cref="Scope"/> being built.
/// Operations on two literal constants are folded at build time (the same IEEE operation, so the same bits).
/// </summary>
internal readonly struct Expr : IFormulaNumber<Expr>
{
    /// <summary>The locals and statements of the code being built.</summary>
    public sealed class Scope
    {
        /// <summary>Every local of the block.</summary>
        public List<ParameterExpression> Locals { get; } = new();

        /// <summary>The statements, in order.</summary>
        public List<Expression> Body { get; } = new();
    }

    /// <summary>The expression.</summary>
    public readonly Expression E;

    /// <summary>The scope locals go to (null for a literal constant).</summary>
    public readonly Scope? S;

    public Expr(Expression e, Scope? s)
    {
        E = e;
        S = s;
    }

    private static bool IsLiteral(Expr x, out double v)
    {
        if (x.E is ConstantExpression { Value: double d }) { v = d; return true; }
        v = 0;
        return false;
    }

    private static Expr Binary(Expr a, Expr b, Func<Expression, Expression, Expression> make, Func<double, double, double> fold)
        => IsLiteral(a, out double x) && IsLiteral(b, out double y) ? fold(x, y) : new Expr(make(a.E, b.E), a.S ?? b.S);

    private static readonly Type[] One = [typeof(double)];
    private static readonly Type[] Two = [typeof(double), typeof(double)];

    private static Expr Math1(string name, Expr x, Func<double, double> fold)
        => IsLiteral(x, out double v) ? fold(v) : new Expr(Expression.Call(typeof(Math).GetMethod(name, One)!, x.E), x.S);

    private static Expr Helper(string name, Scope? s, params Expr[] args)
    {
        var method = typeof(Scalar).GetMethod(name, BindingFlags.Static | BindingFlags.Public)!;
        var exprs = new Expression[args.Length];
        for (int i = 0; i < args.Length; i++) exprs[i] = args[i].E;
        foreach (var a in args) s ??= a.S;
        return new(Expression.Call(method, exprs), s);
    }

    public static implicit operator Expr(double c) => new(Expression.Constant(c), null);

    public static Expr operator +(Expr a, Expr b) => Binary(a, b, Expression.Add, static (x, y) => x + y);
    public static Expr operator -(Expr a, Expr b) => Binary(a, b, Expression.Subtract, static (x, y) => x - y);
    public static Expr operator *(Expr a, Expr b) => Binary(a, b, Expression.Multiply, static (x, y) => x * y);
    public static Expr operator /(Expr a, Expr b) => Binary(a, b, Expression.Divide, static (x, y) => x / y);
    public static Expr operator -(Expr a) => IsLiteral(a, out double v) ? -v : new Expr(Expression.Negate(a.E), a.S);

    /// <summary>A new local holding <paramref name="x"/> (literals and locals are returned as they are).</summary>
    public static Expr Let(Expr x)
    {
        if (x.E is ConstantExpression or ParameterExpression || x.S is null) return x;
        var v = Expression.Variable(typeof(double));
        x.S.Locals.Add(v);
        x.S.Body.Add(Expression.Assign(v, x.E));
        return new(v, x.S);
    }

    public static Expr Pow(Expr a, Expr b)
        => IsLiteral(a, out double x) && IsLiteral(b, out double y) ? Math.Pow(x, y)
         : new Expr(Expression.Call(typeof(Math).GetMethod(nameof(Math.Pow), Two)!, a.E, b.E), a.S ?? b.S);

    public static Expr Exp(Expr x) => Math1(nameof(Math.Exp), x, Math.Exp);
    public static Expr Log(Expr x) => Math1(nameof(Math.Log), x, Math.Log);
    public static Expr Log10(Expr x) => Math1(nameof(Math.Log10), x, Math.Log10);
    public static Expr Sqrt(Expr x) => Math1(nameof(Math.Sqrt), x, Math.Sqrt);
    public static Expr Sin(Expr x) => Math1(nameof(Math.Sin), x, Math.Sin);
    public static Expr Cos(Expr x) => Math1(nameof(Math.Cos), x, Math.Cos);
    public static Expr Tan(Expr x) => Math1(nameof(Math.Tan), x, Math.Tan);
    public static Expr Sinh(Expr x) => Math1(nameof(Math.Sinh), x, Math.Sinh);
    public static Expr Cosh(Expr x) => Math1(nameof(Math.Cosh), x, Math.Cosh);
    public static Expr Tanh(Expr x) => Math1(nameof(Math.Tanh), x, Math.Tanh);
    public static Expr Asin(Expr x) => Math1(nameof(Math.Asin), x, Math.Asin);
    public static Expr Acos(Expr x) => Math1(nameof(Math.Acos), x, Math.Acos);
    public static Expr Atan(Expr x) => Math1(nameof(Math.Atan), x, Math.Atan);
    public static Expr Asinh(Expr x) => Math1(nameof(Math.Asinh), x, Math.Asinh);
    public static Expr Acosh(Expr x) => Math1(nameof(Math.Acosh), x, Math.Acosh);
    public static Expr Atanh(Expr x) => Math1(nameof(Math.Atanh), x, Math.Atanh);
    public static Expr Abs(Expr x) => Math1(nameof(Math.Abs), x, Math.Abs);
    public static Expr Step(Expr x) => Helper(nameof(Scalar.Step), null, x);
    public static Expr Min(Expr a, Expr b) => Helper(nameof(Scalar.Min), null, a, b);
    public static Expr Max(Expr a, Expr b) => Helper(nameof(Scalar.Max), null, a, b);
    public static Expr AbsSign(Expr a0, Expr a1, Expr a2, Expr a3) => Helper(nameof(Scalar.AbsSign), null, a0, a1, a2, a3);

    public static Expr Choose(Expr a0, Expr a1, Expr a2, Expr a3, Expr b0, Expr b1, Expr b2, Expr b3, bool min)
    {
        var method = typeof(Scalar).GetMethod(nameof(Scalar.Choose), BindingFlags.Static | BindingFlags.Public)!;
        Scope? s = a0.S ?? a1.S ?? a2.S ?? a3.S ?? b0.S ?? b1.S ?? b2.S ?? b3.S;
        return new(Expression.Call(method, a0.E, a1.E, a2.E, a3.E, b0.E, b1.E, b2.E, b3.E, Expression.Constant(min)), s);
    }

    /// <summary>The loop of <see cref="Scalar.FirstSign"/> unrolled into nested conditionals (the same comparisons in the same order).</summary>
    public static Expr FirstSign(ReadOnlySpan<Expr> a)
    {
        Expression r = Expression.Constant(1.0);
        Scope? s = null;
        for (int k = a.Length - 1; k >= 0; k--)
        {
            var x = a[k].E;
            s ??= a[k].S;
            r = Expression.Condition(Expression.NotEqual(x, Zero),
                Expression.Condition(Expression.LessThan(x, Zero), Expression.Constant(-1.0), Expression.Constant(1.0)), r);
        }
        return new(r, s);
    }

    /// <summary>The loop of <see cref="Scalar.ChooseSeries"/> unrolled into nested conditionals (the same comparisons in the same order).</summary>
    public static Expr ChooseSeries(ReadOnlySpan<Expr> a, ReadOnlySpan<Expr> b, bool min)
    {
        var compare = typeof(double).GetMethod(nameof(double.CompareTo), [typeof(double)])!;
        var isNaN = typeof(double).GetMethod(nameof(double.IsNaN), [typeof(double)])!;
        Scope? s = null;
        Expression cmp = Expression.Call(a[^1].E, compare, b[^1].E);
        for (int k = a.Length - 2; k >= 0; k--)
        {
            var c = Expression.Variable(typeof(int));
            // c_k != 0 ? c_k : (later coefficients): evaluated lazily, like the loop that stops at the first difference.
            cmp = Expression.Block(typeof(int), [c], Expression.Assign(c, Expression.Call(a[k].E, compare, b[k].E)),
                Expression.Condition(Expression.NotEqual(c, Expression.Constant(0)), c, cmp));
        }
        for (int k = 0; k < a.Length; k++) s ??= a[k].S ?? b[k].S;
        var take = min ? Expression.LessThanOrEqual(cmp, Expression.Constant(0)) : Expression.GreaterThanOrEqual(cmp, Expression.Constant(0));
        var nan = Expression.OrElse(Expression.Call(isNaN, a[0].E), Expression.Call(isNaN, b[0].E));
        return new(Expression.Condition(nan, Expression.Constant(2.0),
            Expression.Condition(take, Expression.Constant(0.0), Expression.Constant(1.0))), s);
    }

    private static readonly ConstantExpression Zero = Expression.Constant(0.0);

    public static Expr Pick(Expr choice, Expr x, Expr y)
        => new(Expression.Condition(Expression.Equal(choice.E, Expression.Constant(0.0)), x.E,
            Expression.Condition(Expression.Equal(choice.E, Expression.Constant(1.0)), y.E, Expression.Constant(double.NaN))),
            choice.S ?? x.S ?? y.S);
}
