namespace ModeSolver.Estimates;

/// <summary>A slow-roll estimate of the spectra at one k.</summary>
/// <param name="Order">"potential", "hubble-1" or "hubble-2".</param>
/// <param name="Ps">Scalar power P_s.</param>
/// <param name="Pt">Tensor power P_t (both polarisations).</param>
/// <param name="Ns">Scalar index n_s.</param>
/// <param name="R">Tensor-to-scalar ratio r.</param>
/// <param name="Nt">Tensor index n_t.</param>
/// <param name="AlphaS">Running alpha_s = d n_s / d ln k.</param>
public sealed record SlowRollPrediction(string Order, double Ps, double Pt, double Ns, double R, double Nt, double AlphaS);

/// <summary>Potential slow-roll parameters in the canonical field chi (d chi / d phi = sqrt(K)).</summary>
/// <param name="Phi">Field value (user's field).</param>
/// <param name="EpsilonV">(V_chi / V)^2 / 2.</param>
/// <param name="EtaV">V_chichi / V.</param>
/// <param name="Xi2V">V_chi V_chichichi / V^2.</param>
public sealed record PotentialSlowRollParameters(double Phi, double EpsilonV, double EtaV, double Xi2V);

/// <summary>The three slow-roll estimates at one k, with the time of horizon exit.</summary>
/// <param name="N">E-folds since the start at which k = aH.</param>
/// <param name="EFoldsBeforeEnd">NEnd - N.</param>
/// <param name="KBackground">k in background units.</param>
/// <param name="Parameters">Potential slow-roll parameters at phi(N).</param>
/// <param name="Potential">Potential form (first order).</param>
/// <param name="FirstOrder">Hubble-flow, first order.</param>
/// <param name="SecondOrder">Hubble-flow, second order.</param>
public sealed record SlowRollSet(double N, double EFoldsBeforeEnd, double KBackground, PotentialSlowRollParameters Parameters,
    SlowRollPrediction Potential, SlowRollPrediction FirstOrder, SlowRollPrediction SecondOrder);
