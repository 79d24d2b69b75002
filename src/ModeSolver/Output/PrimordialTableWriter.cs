using System.Globalization;
using System.Text;
using ModeSolver.Report;

namespace ModeSolver.Output;

/// <summary>
/// Writes the primordial table for Boltzmann codes: '#' comment lines (model, units, pivot, A_s, n_s, r, generator),
/// then three space-separated columns k [1/Mpc], P_s, P_t in C's %.10e format (e.g. 2.1000000000e-09), one row per k, k increasing.
/// </summary>
public static class PrimordialTableWriter
{
    /// <summary>Default file name.</summary>
    public const string FileName = "primordial.dat";

    private static readonly CultureInfo Inv = CultureInfo.InvariantCulture;

    /// <summary>Writes the table to a text writer (use Console.Out for stdout).</summary>
    public static void Write(RunReport report, TextWriter writer)
    {
        ArgumentNullException.ThrowIfNull(report);
        ArgumentNullException.ThrowIfNull(writer);
        var t = report.Table;
        if (t.K.Length != t.Ps.Length || t.K.Length != t.Pt.Length)
            throw new ArgumentException($"primordial table: k, P_s and P_t have different lengths ({t.K.Length}, {t.Ps.Length}, {t.Pt.Length})");
        for (int i = 1; i < t.K.Length; i++)
            if (!(t.K[i] > t.K[i - 1]))
                throw new ArgumentException($"primordial table: k is not strictly increasing at row {i + 1}");

        var m = report.Model;
        var p = report.Pivot;
        writer.WriteLine($"# primordial power spectra written by {report.Generator}");
        writer.WriteLine($"# model: {OneLine(m.Id)} ({m.Frame.Code()}): {OneLine(m.Description)}");
        writer.WriteLine($"# V = {OneLine(m.Potential)}; K = {OneLine(m.Kinetic)}" + (m.ConformalFactor is null ? "" : $"; Omega^2 = {OneLine(m.ConformalFactor)}"));
        if (m.Parameters.Length > 0)
        {
            var sb = new StringBuilder("# parameters:");
            foreach (var par in m.Parameters) sb.Append(' ').Append(par.Name).Append(" = ").Append(par.Value.ToString("R", Inv).ToLowerInvariant());
            writer.WriteLine(sb.ToString());
        }
        writer.WriteLine(string.Create(Inv, $"# pivot: k_* = {p.KPivot:R} 1/Mpc, N_* = {p.NStar:0.####}"));
        writer.WriteLine(string.Create(Inv, $"# at the pivot: A_s = {p.As:0.000000e+00}, n_s = {p.Ns:0.000000}, r = {p.R:0.000000e+00}, alpha_s = {p.AlphaS:0.000e+00}, n_t = {p.Nt:0.000e+00}"));
        writer.WriteLine($"# amplitude method: {report.AmplitudeMethod}");
        double kUnit = 1.0;
        if (t.H is double h)
        {
            kUnit = 1.0 / h;
            writer.WriteLine(string.Create(Inv, $"# units: k in h/Mpc with h = {h:R} (k[h/Mpc] = k[1/Mpc] / h; comoving, a = 1 today); P_s and P_t dimensionless (P_t sums both polarisations)"));
        }
        else
            writer.WriteLine("# units: k in 1/Mpc (comoving, a = 1 today); P_s and P_t dimensionless (P_t sums both polarisations)");
        writer.WriteLine(string.Create(Inv, $"# rows: {t.K.Length}, log-spaced in k"));
        writer.WriteLine("# columns: k P_s P_t");
        for (int i = 0; i < t.K.Length; i++)
            writer.WriteLine(string.Create(Inv, $"{t.K[i] * kUnit:0.0000000000e+00} {t.Ps[i]:0.0000000000e+00} {t.Pt[i]:0.0000000000e+00}"));
    }

    /// <summary>Writes the table to a file (overwriting).</summary>
    public static void Write(RunReport report, string path)
    {
        using var sw = new StreamWriter(path, false, new UTF8Encoding(false)) { NewLine = "\n" };
        Write(report, sw);
    }

    private static string OneLine(string s) => TextSafety.Printable(s);
}
