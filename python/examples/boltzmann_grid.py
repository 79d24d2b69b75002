"""P_s(k) and P_t(k) on the k grid a Boltzmann code asks for, handed on as numpy arrays.

Run from the repository root after publishing the library into the package:
    dotnet publish src/ModeSolver.Native -c Release -r linux-x64 -o python/modesolver/lib
    PYTHONPATH=python python3 python/examples/boltzmann_grid.py [DECK]

A Boltzmann code's Python interface typically takes the primordial spectra as arrays on its own k grid (log-spaced,
1e-6 to a few /Mpc); this script builds such a grid, evaluates both spectra for the demo deck, then does what a
sampler does: changes one parameter and reruns without reading the deck again.
"""

import os
import sys
import time

import numpy as np

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), ".."))
import modesolver  # noqa: E402

HERE = os.path.dirname(os.path.abspath(__file__))
deck = sys.argv[1] if len(sys.argv) > 1 else os.path.join(HERE, "..", "..", "runs", "plateau-demo.toml")

k = modesolver.log_k_grid(1e-6, 5.0, per_decade=20)       # 1/Mpc, what the Boltzmann code asks for
t0 = time.perf_counter()
with modesolver.Run(deck, threads=1) as run:
    p_s, p_t = modesolver.primordial_spectra(k, run=run, count=200)
    t1 = time.perf_counter()
    pivot = run.results()
    print(f"model: {deck}")
    err = run.errors()                                     # estimated absolute errors of the pivot values
    print(f"n_s = {pivot['n_s']:.6f} +- {err['n_s']:.1e}  r = {pivot['r']:.4e} +- {err['r']:.1e}  "
          f"A_s = {pivot['A_s']:.4e}  N_* = {pivot['N_star']:.3f}  (tolerance met: {run.tolerance_met})")
    print(f"{k.size} k from {k[0]:.1e} to {k[-1]:.1e} /Mpc in {1e3 * (t1 - t0):.1f} ms (200 modes, one thread)")
    for i in np.linspace(0, k.size - 1, 6).astype(int):
        print(f"  k = {k[i]:.3e} /Mpc   P_s = {p_s[i]:.5e}   P_t = {p_t[i]:.5e}")
    if run.flags:
        print("flags:", *run.flags, sep="\n  ")

    # What a sampler does: change a parameter, rerun, read the pivot values (the deck is not parsed again).
    for alpha in (2.0, 3.0, 6.0):
        run.set_params(alpha=alpha)
        values = run.pivot()
        print(f"alpha = {alpha:4.1f}: n_s = {values['n_s']:.6f}  r = {values['r']:.4e}")

# The arrays go to the Boltzmann code as they are, e.g. a tabulated primordial spectrum:
table = np.column_stack([k, p_s, p_t])
assert table.shape == (k.size, 3) and np.all(table[:, 1:] > 0)
