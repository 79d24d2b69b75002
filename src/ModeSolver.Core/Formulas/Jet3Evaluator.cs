using System.Runtime.CompilerServices;
using ModeSolver.Models;

namespace ModeSolver.Formulas;

/// <summary>
/// The order-3 fast path: the same program run on 4-coefficient Taylor series with every kernel unrolled.
/// Elementary functions use the third-order chain rule (Faa di Bruno) on normalised coefficients:
/// for y = F(a), y0 = F, y1 = F' a1, y2 = F' a2 + F'' a1^2/2, y3 = F' a3 + F'' a1 a2 + F''' a1^3/6,
/// with F, F', F'', F''' written in closed form at a0. Results agree with the general-order recurrences to rounding.
/// </summary>
internal static unsafe class Jet3Evaluator
{
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static void Compose(double* a, double* d, double f0, double f1, double f2, double f3)
    {
        double a1 = a[1];
        d[0] = f0;
        d[1] = f1 * a1;
        d[2] = f1 * a[2] + 0.5 * f2 * a1 * a1;
        d[3] = f1 * a[3] + f2 * a1 * a[2] + f3 * a1 * a1 * a1 / 6;
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static void Select(double* a, double* b, double* d, bool min)
    {
        if (double.IsNaN(a[0]) || double.IsNaN(b[0]))
        {
            d[0] = d[1] = d[2] = d[3] = double.NaN;
            return;
        }
        int cmp = 0;
        for (int k = 0; k <= 3 && cmp == 0; k++) cmp = a[k].CompareTo(b[k]);
        double* src = (min ? cmp <= 0 : cmp >= 0) ? a : b;
        d[0] = src[0]; d[1] = src[1]; d[2] = src[2]; d[3] = src[3];
    }

    /// <summary>Runs the program; <paramref name="s"/> holds 4 doubles per register.</summary>
    [SkipLocalsInit]
    public static Jet3 Run(CompiledProgram program, double phi, double* s)
    {
        s[0] = phi; s[1] = 1; s[2] = 0; s[3] = 0;
        var code = program.Code;
        for (int pc = 0; pc < code.Length; pc++)
        {
            ref readonly Instr I = ref code[pc];
            double* d = s + (I.Dst << 2);
            double* a = s + (I.A << 2);
            double* b = s + (I.B << 2);
            switch (I.Op)
            {
                case Op.LoadConst: d[0] = I.C; d[1] = 0; d[2] = 0; d[3] = 0; break;
                case Op.Copy: d[0] = a[0]; d[1] = a[1]; d[2] = a[2]; d[3] = a[3]; break;
                case Op.Neg: d[0] = -a[0]; d[1] = -a[1]; d[2] = -a[2]; d[3] = -a[3]; break;
                case Op.Add: d[0] = a[0] + b[0]; d[1] = a[1] + b[1]; d[2] = a[2] + b[2]; d[3] = a[3] + b[3]; break;
                case Op.Sub: d[0] = a[0] - b[0]; d[1] = a[1] - b[1]; d[2] = a[2] - b[2]; d[3] = a[3] - b[3]; break;
                case Op.Mul:
                {
                    double a0 = a[0], a1 = a[1], a2 = a[2], a3 = a[3], b0 = b[0], b1 = b[1], b2 = b[2], b3 = b[3];
                    d[0] = a0 * b0;
                    d[1] = a0 * b1 + a1 * b0;
                    d[2] = a0 * b2 + a1 * b1 + a2 * b0;
                    d[3] = a0 * b3 + a1 * b2 + a2 * b1 + a3 * b0;
                    break;
                }
                case Op.Div:
                {
                    double b0 = b[0], b1 = b[1], b2 = b[2], b3 = b[3];
                    double c0 = a[0] / b0;
                    double c1 = (a[1] - b1 * c0) / b0;
                    double c2 = (a[2] - b1 * c1 - b2 * c0) / b0;
                    d[3] = (a[3] - b1 * c2 - b2 * c1 - b3 * c0) / b0;
                    d[0] = c0; d[1] = c1; d[2] = c2;
                    break;
                }
                case Op.AddC: d[0] = a[0] + I.C; d[1] = a[1]; d[2] = a[2]; d[3] = a[3]; break;
                case Op.MulC: { double c = I.C; d[0] = a[0] * c; d[1] = a[1] * c; d[2] = a[2] * c; d[3] = a[3] * c; break; }
                case Op.SubCR: d[0] = I.C - a[0]; d[1] = -a[1]; d[2] = -a[2]; d[3] = -a[3]; break;
                case Op.DivC: { double c = I.C; d[0] = a[0] / c; d[1] = a[1] / c; d[2] = a[2] / c; d[3] = a[3] / c; break; }
                case Op.DivCR:
                {
                    double r = 1 / a[0], q = I.C / a[0];
                    Compose(a, d, q, -q * r, 2 * q * r * r, -6 * q * r * r * r);
                    break;
                }
                case Op.PowInt:
                {
                    int m = I.N;
                    double a0 = a[0];
                    if (m == 2)
                    {
                        double a1 = a[1], a2 = a[2];
                        d[0] = a0 * a0;
                        d[1] = 2 * a0 * a1;
                        d[2] = 2 * a0 * a2 + a1 * a1;
                        d[3] = 2 * (a0 * a[3] + a1 * a2);
                    }
                    else if (m == 0)
                    {
                        d[0] = 1; d[1] = 0; d[2] = 0; d[3] = 0;
                    }
                    else
                    {
                        double mm = m;
                        Compose(a, d, Taylor.PowIntScalar(a0, m), mm * Taylor.PowIntScalar(a0, m - 1),
                            mm * (mm - 1) * Taylor.PowIntScalar(a0, m - 2),
                            m == 1 || m == 2 ? 0 : mm * (mm - 1) * (mm - 2) * Taylor.PowIntScalar(a0, m - 3));
                    }
                    break;
                }
                case Op.PowC:
                {
                    double c = I.C, a0 = a[0], p = Math.Pow(a0, c), r = 1 / a0;
                    Compose(a, d, p, c * p * r, c * (c - 1) * p * r * r, c * (c - 1) * (c - 2) * p * r * r * r);
                    break;
                }
                case Op.CPow:
                {
                    double p = Math.Pow(I.C, a[0]), l = Math.Log(I.C);
                    Compose(a, d, p, l * p, l * l * p, l * l * l * p);
                    break;
                }
                case Op.Pow:
                {
                    // a^b = exp(b log a): l = log-series of a, m = b*l, then exp composed on m with value pow(a0, b0).
                    double* l = s + (I.Aux << 2);
                    double* m = s + ((I.Aux + 1) << 2);
                    double a0 = a[0], r = 1 / a0;
                    Compose(a, l, Math.Log(a0), r, -r * r, 2 * r * r * r);
                    double b0 = b[0], b1 = b[1], b2 = b[2], b3 = b[3];
                    m[0] = b0 * l[0];
                    m[1] = b0 * l[1] + b1 * l[0];
                    m[2] = b0 * l[2] + b1 * l[1] + b2 * l[0];
                    m[3] = b0 * l[3] + b1 * l[2] + b2 * l[1] + b3 * l[0];
                    double p = Math.Pow(a0, b0);
                    Compose(m, d, p, p, p, p);
                    break;
                }
                case Op.Exp: { double e = Math.Exp(a[0]); Compose(a, d, e, e, e, e); break; }
                case Op.Log: { double r = 1 / a[0]; Compose(a, d, Math.Log(a[0]), r, -r * r, 2 * r * r * r); break; }
                case Op.Log10:
                {
                    double r = 1 / a[0], k = 1 / Math.Log(10);
                    Compose(a, d, Math.Log10(a[0]), r * k, -r * r * k, 2 * r * r * r * k);
                    break;
                }
                case Op.Sqrt:
                {
                    double a0 = a[0], q = Math.Sqrt(a0), h = 0.5 / q, r = 1 / a0;
                    Compose(a, d, q, h, -0.5 * h * r, 0.75 * h * r * r);
                    break;
                }
                case Op.Sin: { double sn = Math.Sin(a[0]), cs = Math.Cos(a[0]); Compose(a, d, sn, cs, -sn, -cs); break; }
                case Op.Cos: { double sn = Math.Sin(a[0]), cs = Math.Cos(a[0]); Compose(a, d, cs, -sn, -cs, sn); break; }
                case Op.Tan:
                {
                    double t = Math.Tan(a[0]), w = 1 + t * t;
                    Compose(a, d, t, w, 2 * t * w, 2 * w * (1 + 3 * t * t));
                    break;
                }
                case Op.Sinh: { double sh = Math.Sinh(a[0]), ch = Math.Cosh(a[0]); Compose(a, d, sh, ch, sh, ch); break; }
                case Op.Cosh: { double sh = Math.Sinh(a[0]), ch = Math.Cosh(a[0]); Compose(a, d, ch, sh, ch, sh); break; }
                case Op.Tanh:
                {
                    double t = Math.Tanh(a[0]), ch = Math.Cosh(a[0]), w = 1 / (ch * ch); // sech^2, accurate where tanh saturates
                    Compose(a, d, t, w, -2 * t * w, 2 * w * (2 * t * t - w));
                    break;
                }
                case Op.Asin:
                case Op.Acos:
                {
                    double x = a[0], g = 1 / Math.Sqrt((1 - x) * (1 + x)), g3 = g * g * g, sg = I.Op == Op.Acos ? -1 : 1;
                    Compose(a, d, I.Op == Op.Acos ? Math.Acos(x) : Math.Asin(x), sg * g, sg * x * g3, sg * (1 + 2 * x * x) * g3 * g * g);
                    break;
                }
                case Op.Atan:
                {
                    double x = a[0], q = 1 / (1 + x * x);
                    Compose(a, d, Math.Atan(x), q, -2 * x * q * q, (6 * x * x - 2) * q * q * q);
                    break;
                }
                case Op.Asinh:
                {
                    double x = a[0], g = 1 / Math.Sqrt(1 + x * x), g3 = g * g * g;
                    Compose(a, d, Math.Asinh(x), g, -x * g3, (2 * x * x - 1) * g3 * g * g);
                    break;
                }
                case Op.Acosh:
                {
                    double x = a[0], g = 1 / Math.Sqrt((x - 1) * (x + 1)), g3 = g * g * g;
                    Compose(a, d, Math.Acosh(x), g, -x * g3, (2 * x * x + 1) * g3 * g * g);
                    break;
                }
                case Op.Atanh:
                {
                    double x = a[0], q = 1 / ((1 - x) * (1 + x));
                    Compose(a, d, Math.Atanh(x), q, 2 * x * q * q, (2 + 6 * x * x) * q * q * q);
                    break;
                }
                case Op.Abs:
                {
                    double sign = a[0] > 0 ? 1 : a[0] < 0 ? -1 : a[1] < 0 ? -1 : a[1] > 0 ? 1 : a[2] < 0 ? -1 : a[2] > 0 ? 1 : a[3] < 0 ? -1 : 1;
                    d[0] = Math.Abs(a[0]); d[1] = sign * a[1]; d[2] = sign * a[2]; d[3] = sign * a[3];
                    break;
                }
                case Op.Step: d[0] = CompiledProgram.StepScalar(a[0]); d[1] = 0; d[2] = 0; d[3] = 0; break;
                case Op.Min: Select(a, b, d, min: true); break;
                case Op.Max: Select(a, b, d, min: false); break;
                case Op.JumpIfNot:
                    if (!CompiledProgram.Holds(I.Aux, a[0], b[0])) pc = I.N - 1;
                    break;
                case Op.Jump: pc = I.N - 1; break;
            }
        }
        double* res = s + (program.Result << 2);
        return new Jet3(res[0], res[1], 2 * res[2], 6 * res[3]);
    }
}
