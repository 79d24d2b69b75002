using System.Collections.Immutable;
using System.Text.Json;
using ModeSolver.Bispectrum;
using PureHDF;

namespace ModeSolver.Output;

/// <summary>
/// The bispectrum in summary.json (object "bispectrum": f_NL_equilateral and f_NL_squeezed at the pivot with their errors
/// and slow-roll values, the convention, the curve's range and the flags) and in run.h5 (group /bispectrum: attributes as
/// in the JSON; datasets triangle_k1, triangle_k2, triangle_k3, triangle_f_NL, triangle_f_NL_error (the deck's triangles), equilateral_k, equilateral_f_NL, equilateral_f_NL_error, equilateral_f_NL_slow_roll; with a shape
/// grid, shape_x (the values of x2 = k2/k1 and x3 = k3/k1), shape_f_NL and shape_f_NL_error [x2, x3], NaN outside the triangles).
/// </summary>
internal static class BispectrumOutputs
{
    /// <summary>The convention line written with the numbers.</summary>
    public const string Convention = "f_NL = (5/6) B / (P1 P2 + P2 P3 + P3 P1), <zeta zeta zeta> = (2 pi)^3 delta(k1+k2+k3) B, P = 2 pi^2 P_s / k^3; zeta from the spatial metric a^2 exp(2 zeta) delta_ij; squeezed limit +(5/12)(1 - n_s)";

    public static void WriteJson(Utf8JsonWriter w, BispectrumReport? b)
    {
        if (b is null) return;
        w.WriteStartObject("bispectrum");
        w.WriteString("convention", Convention);
        Num(w, "k_pivot", b.KPivot);
        Num(w, "f_NL_equilateral", b.Equilateral.FNL);
        Num(w, "f_NL_equilateral_error", b.Equilateral.Error);
        Num(w, "f_NL_equilateral_slow_roll", b.Equilateral.SlowRoll);
        Num(w, "f_NL_squeezed", b.Squeezed.FNL);
        Num(w, "f_NL_squeezed_error", b.Squeezed.Error);
        Num(w, "f_NL_squeezed_slow_roll", b.Squeezed.SlowRoll);
        Num(w, "squeezed_ratio", b.SqueezedRatio);
        w.WriteNumber("equilateral_points", b.Curve.K.Length);
        if (b.Curve.K.Length > 0)
        {
            Num(w, "equilateral_k_min", b.Curve.K[0]);
            Num(w, "equilateral_k_max", b.Curve.K[^1]);
            double lo = double.PositiveInfinity, hi = double.NegativeInfinity, err = 0;
            for (int i = 0; i < b.Curve.FNL.Length; i++)
            {
                lo = Math.Min(lo, b.Curve.FNL[i]);
                hi = Math.Max(hi, b.Curve.FNL[i]);
                err = Math.Max(err, b.Curve.Error[i]);
            }
            Num(w, "equilateral_f_NL_min", lo);
            Num(w, "equilateral_f_NL_max", hi);
            Num(w, "equilateral_max_error", err);
        }
        w.WriteStartArray("triangles");
        foreach (var t in b.Triangles)
        {
            w.WriteStartObject();
            Num(w, "k1", t.K1);
            Num(w, "k2", t.K2);
            Num(w, "k3", t.K3);
            Num(w, "f_NL", t.FNL);
            Num(w, "f_NL_error", t.Error);
            w.WriteEndObject();
        }
        w.WriteEndArray();
        w.WriteNumber("shape_grid", b.Shape?.X.Length ?? 0);
        Num(w, "flag_threshold", b.FlagThreshold);
        w.WriteStartArray("flags");
        foreach (var f in b.Flags) w.WriteStringValue(f);
        w.WriteEndArray();
        Num(w, "seconds", b.Seconds);
        w.WriteEndObject();
    }

    public static void AddHdf5(H5File file, BispectrumReport? b)
    {
        if (b is null) return;
        var g = new H5Group
        {
            ["equilateral_k"] = Arr(b.Curve.K),
            ["equilateral_f_NL"] = Arr(b.Curve.FNL),
            ["equilateral_f_NL_error"] = Arr(b.Curve.Error),
            ["equilateral_f_NL_slow_roll"] = Arr(b.Curve.SlowRoll),
        };
        g.Attributes["convention"] = Convention;
        if (b.Triangles.Length > 0)
        {
            g["triangle_k1"] = b.Triangles.Select(t => t.K1).ToArray();
            g["triangle_k2"] = b.Triangles.Select(t => t.K2).ToArray();
            g["triangle_k3"] = b.Triangles.Select(t => t.K3).ToArray();
            g["triangle_f_NL"] = b.Triangles.Select(t => t.FNL).ToArray();
            g["triangle_f_NL_error"] = b.Triangles.Select(t => t.Error).ToArray();
        }
        g.Attributes["k_pivot"] = b.KPivot;
        g.Attributes["f_NL_equilateral"] = b.Equilateral.FNL;
        g.Attributes["f_NL_equilateral_error"] = b.Equilateral.Error;
        g.Attributes["f_NL_equilateral_slow_roll"] = b.Equilateral.SlowRoll;
        g.Attributes["f_NL_squeezed"] = b.Squeezed.FNL;
        g.Attributes["f_NL_squeezed_error"] = b.Squeezed.Error;
        g.Attributes["f_NL_squeezed_slow_roll"] = b.Squeezed.SlowRoll;
        g.Attributes["squeezed_ratio"] = b.SqueezedRatio;
        g.Attributes["flag_threshold"] = b.FlagThreshold;
        if (b.Shape is { } s)
        {
            int n = s.X.Length;
            var f = new double[n, n];
            var e = new double[n, n];
            for (int i = 0; i < n; i++)
                for (int j = 0; j < n; j++)
                {
                    f[i, j] = s.FNL[i * n + j];
                    e[i, j] = s.Error[i * n + j];
                }
            g["shape_x"] = Arr(s.X);
            g["shape_f_NL"] = f;
            g["shape_f_NL_error"] = e;
            g.Attributes["shape_k1"] = s.K1;
        }
        file["bispectrum"] = g;
    }

    private static double[] Arr(ImmutableArray<double> a) => Hdf5Writer.Arr(a);

    private static void Num(Utf8JsonWriter w, string name, double v) => SummaryJsonWriter.Num(w, name, v);
}
