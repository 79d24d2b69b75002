#!/usr/bin/env python3
"""What a cosmologist writes by hand for the scalar spectrum of one single-field model: scipy's DOP853.

Model: the E-model V = V0 (1 - exp(-sqrt(2/(3 alpha)) phi))^2 (canonical field, reduced Planck units).
Background in e-folds N = ln a:
    phi'' + (3 - e1) phi' + (3 - e1) V_phi / V = 0,   e1 = phi'^2 / 2,   H^2 = V / (3 - e1),
started at phi0 with the slow-roll velocity phi' = -V_phi/V, stopped where e1 = 1.
Each mode solves the zeta form of the Mukhanov-Sasaki equation
    zeta'' + (3 - e1 + e2) zeta' + (k/aH)^2 zeta = 0,   e2 = d ln e1 / dN = 2 phi''/phi',
from k/aH = 100 with quasi-de Sitter (nu = 3/2 Hankel, Bunch-Davies) data
    v = exp(-i k tau) (1 - i/(k tau)) / sqrt(2k),  tau = -1/((1 - e1) a H),  zeta = v / (a sqrt(2 e1)),
to k/aH = 1e-3; P_s = k^3 |zeta|^2 / (2 pi^2). The pivot k_* = aH at N_end - N_*, and V0 is rescaled so that
P_s(k_*) = A_s (P_s is proportional to V0 at fixed phi(N)); k_i = k_* (k_i / k_*[1/Mpc]).

Usage: hand_scipy.py N_STAR [--count 200] [--rtol 1e-8]   (prints k/Mpc, P_s; timing on stderr)
"""
import argparse
import sys
import time

import numpy as np
from scipy.integrate import solve_ivp
from scipy.optimize import brentq

ALPHA, V0, PHI0 = 4.0, 1.0e-10, 8.5
K_PIVOT, A_S = 0.05, 2.1e-9
K_MIN, K_MAX = 1.0e-5, 1.0
X_START, X_STOP = 100.0, 1.0e-3


def potential(phi):
    c = np.sqrt(2.0 / (3.0 * ALPHA))
    e = np.exp(-c * phi)
    return V0 * (1.0 - e) ** 2, 2.0 * V0 * c * e * (1.0 - e)


def background_rhs(n, y):
    phi, dphi = y
    v, vp = potential(phi)
    e1 = 0.5 * dphi * dphi
    return [dphi, -(3.0 - e1) * (dphi + vp / v)]


def end_of_inflation(n, y):
    return 0.5 * y[1] * y[1] - 1.0


end_of_inflation.terminal = True
end_of_inflation.direction = 1


def solve_background():
    v, vp = potential(PHI0)
    sol = solve_ivp(background_rhs, (0.0, 200.0), [PHI0, -vp / v], method="DOP853", rtol=1e-11, atol=1e-13,
                    dense_output=True, events=end_of_inflation)
    return sol, sol.t_events[0][0]


def flow(bg, n):
    """H, e1, e2 at N from the background's dense output."""
    phi, dphi = bg.sol(n)
    v, vp = potential(phi)
    e1 = 0.5 * dphi * dphi
    h = np.sqrt(v / (3.0 - e1))
    ddphi = -(3.0 - e1) * (dphi + vp / v)
    return h, e1, 2.0 * ddphi / dphi


def depth_time(bg, lnk, x, lo, hi):
    """N where k/aH = x."""
    return brentq(lambda n: lnk - n - np.log(flow(bg, n)[0]) - np.log(x), lo, hi, xtol=1e-12)


def mode_power(bg, n_end, k):
    lnk = np.log(k)
    n0 = depth_time(bg, lnk, X_START, 0.0, n_end)
    n1 = depth_time(bg, lnk, X_STOP, n0, n_end)
    h, e1, e2 = flow(bg, n0)
    a = np.exp(n0)
    tau = -1.0 / ((1.0 - e1) * a * h)
    v = np.exp(-1j * k * tau) * (1.0 - 1j / (k * tau)) / np.sqrt(2.0 * k)
    dv_dtau = np.exp(-1j * k * tau) * (-1j * k - 1.0 / tau + 1j / (k * tau * tau)) / np.sqrt(2.0 * k)
    z = a * np.sqrt(2.0 * e1)
    zeta = v / z
    dzeta = dv_dtau / (a * h) / z - zeta * (1.0 + 0.5 * e2)
    scale = X_START / abs(zeta)  # |zeta| of order 1 after horizon exit

    def rhs(n, y):
        hh, ee1, ee2 = flow(bg, n)
        x2 = np.exp(2.0 * (lnk - n)) / (hh * hh)
        f = 3.0 - ee1 + ee2
        return [y[2], y[3], -f * y[2] - x2 * y[0], -f * y[3] - x2 * y[1]]

    y0 = scale * np.array([zeta.real, zeta.imag, dzeta.real, dzeta.imag])
    sol = solve_ivp(rhs, (n0, n1), y0, method="DOP853", rtol=ARGS.rtol, atol=ARGS.rtol)
    zr, zi = sol.y[0, -1] / scale, sol.y[1, -1] / scale
    return k ** 3 * (zr * zr + zi * zi) / (2.0 * np.pi ** 2), sol.nfev


def run(n_star, count):
    t0 = time.perf_counter()
    bg, n_end = solve_background()
    n_pivot = n_end - n_star
    h_p = flow(bg, n_pivot)[0]
    k_star = np.exp(n_pivot) * h_p
    p_star, nfev_pivot = mode_power(bg, n_end, k_star)
    norm = A_S / p_star
    ks = np.geomspace(K_MIN, K_MAX, count)
    ps = np.empty(count)
    nfev = nfev_pivot
    for i, kk in enumerate(ks):
        p, nf = mode_power(bg, n_end, k_star * kk / K_PIVOT)
        ps[i] = norm * p
        nfev += nf
    return ks, ps, nfev / (count + 1), time.perf_counter() - t0


def main():
    global ARGS
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("n_star", type=float, help="N_*: e-folds before the end of inflation at which k_pivot = aH")
    parser.add_argument("--count", type=int, default=200)
    parser.add_argument("--rtol", type=float, default=1e-8)
    ARGS = parser.parse_args()
    ks, ps, per_mode, seconds = run(ARGS.n_star, ARGS.count)
    for kk, p in zip(ks, ps):
        print(f"{kk:.10e} {p:.10e}")
    print(f"{ARGS.count} modes + pivot in {seconds:.3f} s, {per_mode:.0f} right-hand sides per mode", file=sys.stderr)


ARGS = argparse.Namespace(rtol=1e-8)
if __name__ == "__main__":
    main()
