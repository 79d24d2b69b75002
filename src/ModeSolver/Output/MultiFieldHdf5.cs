using System.Collections.Immutable;
using ModeSolver.Results;
using PureHDF;

namespace ModeSolver.Output;

/// <summary>
/// The /multifield group of run.h5 (n-field runs only):
/// /multifield/trajectory: datasets N, fields and velocities (2-D, N x n, field order in the attribute field_names),
/// epsilon_1, eta_perp, m_s2_over_H2 (NaN unless n = 2), R_fs; attribute N_end.
/// /multifield/delta_N (when computed): attributes P_zeta, P_zeta_error, f_NL_local, f_NL_local_error, P_zeta_modes,
/// relative_difference, allowance, agrees, N_exit, epsilon_1_exit, N_remaining, slice, slice_H, velocity, backgrounds,
/// N_integration_error; datasets N_I, N_I_error, N_IJ and N_IJ_error (n x n, the covariant N_;IJ), steps.
/// A delta N that could not be computed leaves the attribute delta_N_note instead.
/// /isocurvature (from the modes, n-field runs): datasets k, P_S, C_RS, cos_delta, beta_iso, T_RS, P_R_exit and
/// spectra_matrix (k x 2 x 2: [[P_R, C_RS], [C_RS, P_S]] at each k, P_R from /spectrum/P_s); attributes fields and the
/// pivot values P_S, P_S_error, C_RS, cos_delta, beta_iso, T_RS, P_R_exit.
/// </summary>
internal static class MultiFieldHdf5
{
    public static void Add(H5File file, Report.RunReport report)
    {
        Isocurvature(file, report);
        Add(file, report.MultiField);
    }

    private static void Isocurvature(H5File file, Report.RunReport report)
    {
        if (report.Isocurvature is not { } iso) return;
        int count = iso.K.Length;
        var matrix = new double[count, 2, 2];
        bool sameK = report.Spectrum.K.Length == count;
        for (int i = 0; i < count; i++)
        {
            matrix[i, 0, 0] = sameK ? report.Spectrum.Ps[i] : double.NaN;
            matrix[i, 0, 1] = matrix[i, 1, 0] = iso.Crs[i];
            matrix[i, 1, 1] = iso.Ps[i];
        }
        var g = new H5Group
        {
            ["k"] = Hdf5Writer.Arr(iso.K),
            ["P_S"] = Hdf5Writer.Arr(iso.Ps),
            ["C_RS"] = Hdf5Writer.Arr(iso.Crs),
            ["cos_delta"] = Hdf5Writer.Arr(iso.CosDelta),
            ["beta_iso"] = Hdf5Writer.Arr(iso.BetaIso),
            ["T_RS"] = Hdf5Writer.Arr(iso.Trs),
            ["P_R_exit"] = Hdf5Writer.Arr(iso.PrExit),
            ["spectra_matrix"] = matrix,
        };
        var p = iso.Pivot;
        g.Attributes["fields"] = iso.FieldCount;
        g.Attributes["P_S"] = p.Ps;
        g.Attributes["P_S_error"] = p.PsError;
        g.Attributes["C_RS"] = p.Crs;
        g.Attributes["cos_delta"] = p.CosDelta;
        g.Attributes["beta_iso"] = p.BetaIso;
        g.Attributes["T_RS"] = p.Trs;
        g.Attributes["P_R_exit"] = p.PrExit;
        file["isocurvature"] = g;
    }

    private static void Add(H5File file, MultiFieldResults? m)
    {
        if (m is null) return;
        var t = m.Trajectory;
        int count = t.N.Length, n = t.FieldCount;
        var trajectory = new H5Group
        {
            ["N"] = Hdf5Writer.Arr(t.N),
            ["fields"] = Matrix(t.Fields, count, n),
            ["velocities"] = Matrix(t.Velocities, count, n),
            ["epsilon_1"] = Hdf5Writer.Arr(t.Epsilon1),
            ["eta_perp"] = Hdf5Writer.Arr(t.TurnRate),
            ["m_s2_over_H2"] = Hdf5Writer.Arr(t.EntropicMass),
            ["R_fs"] = Hdf5Writer.Arr(t.RicciScalar),
        };
        trajectory.Attributes["field_names"] = t.FieldNames.ToArray();
        trajectory.Attributes["N_end"] = t.NEnd;
        var group = new H5Group { ["trajectory"] = trajectory };
        if (m.DeltaN is { } d)
        {
            var r = d.Raw;
            var g = new H5Group
            {
                ["N_I"] = Hdf5Writer.Arr(r.Gradient),
                ["N_I_error"] = Hdf5Writer.Arr(r.GradientError),
                ["N_IJ"] = Matrix(r.Hessian, n, n),
                ["N_IJ_error"] = Matrix(r.HessianError, n, n),
                ["steps"] = Hdf5Writer.Arr(r.Steps),
            };
            g.Attributes["P_zeta"] = d.Pzeta;
            g.Attributes["P_zeta_error"] = d.PzetaError;
            g.Attributes["f_NL_local"] = d.FNL;
            g.Attributes["f_NL_local_error"] = d.FNLError;
            g.Attributes["P_zeta_modes"] = d.ModesPzeta;
            g.Attributes["relative_difference"] = d.RelativeDifference;
            g.Attributes["allowance"] = d.Allowance;
            g.Attributes["agrees"] = d.Agrees ? 1 : 0;
            g.Attributes["N_exit"] = r.ExitN;
            g.Attributes["epsilon_1_exit"] = r.Epsilon1;
            g.Attributes["N_remaining"] = r.NRemaining;
            g.Attributes["slice"] = MultiFieldJson.SliceCode(r.Slice);
            g.Attributes["slice_H"] = r.SliceH;
            g.Attributes["velocity"] = MultiFieldJson.VelocityCode(r.Velocity);
            g.Attributes["backgrounds"] = r.Backgrounds;
            g.Attributes["N_integration_error"] = r.NIntegrationError;
            group["delta_N"] = g;
        }
        else group.Attributes["delta_N_note"] = m.DeltaNNote ?? "";
        file["multifield"] = group;
    }

    /// <summary>A row-major flat array as a rows x cols dataset.</summary>
    internal static double[,] Matrix(ImmutableArray<double> flat, int rows, int cols)
    {
        var a = new double[rows, cols];
        for (int i = 0; i < rows; i++)
            for (int j = 0; j < cols; j++) a[i, j] = flat[i * cols + j];
        return a;
    }
}
