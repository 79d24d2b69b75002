namespace ModeSolver.Output;

/// <summary>Units of the quantities written to files; one list shared by the JSON and HDF5 writers.</summary>
public static class OutputUnits
{
    /// <summary>(quantity, unit) pairs in a fixed order. "1" means dimensionless.</summary>
    public static IReadOnlyList<KeyValuePair<string, string>> All { get; } =
    [
        new("k", "1/Mpc"),
        new("k_pivot", "1/Mpc"),
        new("P_s", "1"),
        new("P_t", "1"),
        new("A_s", "1"),
        new("n_s", "1"),
        new("n_t", "1"),
        new("alpha_s", "1"),
        new("r", "1"),
        new("N", "e-folds"),
        new("N_star", "e-folds"),
        new("N_total", "e-folds"),
        new("N_reh", "e-folds"),
        new("phi", "M_pl (reduced Planck mass, 2.435e18 GeV)"),
        new("phi_star", "M_pl"),
        new("dphi_dN", "M_pl"),
        new("H", "M_pl"),
        new("H_star", "M_pl"),
        new("H_star_GeV", "GeV"),
        new("energy_scale_GeV", "GeV"),
        new("V_scale", "1 (factor applied to the potential)"),
        new("T_reh_GeV", "GeV"),
        new("rho_end_quarter_GeV", "GeV"),
        new("r_002", "1 (r at k = 0.002 /Mpc)"),
        new("epsilon_n", "1"),
        new("time_seconds", "s"),
    ];
}
