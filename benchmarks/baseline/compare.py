#!/usr/bin/env python3
"""Runs modesolver and the hand-written scipy baseline (hand_scipy.py) on the same model in one go; prints the ratios.

Usage (from the repository root, with a Python that has numpy and scipy, e.g. Debian's python3-scipy):
    /usr/bin/python3 benchmarks/baseline/compare.py [--reps 21] [--no-build]

Both compute the 200-mode scalar spectrum of the E-model in emodel-200.toml (alpha = 4, normalised to A_s = 2.1e-9,
N_* from reheating). modesolver runs the deck (N_* comes from its reheating matching); the baseline takes that N_*,
solves the background and the 200 modes (+ the pivot for the normalisation) with scipy's DOP853 from k/aH = 100
(quasi-de Sitter data) at rtol = atol = 1e-6 on rescaled modes. Figures printed:
  - baseline wall time (one run) and right-hand sides per mode;
  - modesolver warm: median of SpectrumPipeline.Run in a long-lived process (ModeSolver.Benchmarks --warm-deck);
  - modesolver cold: wall time of the whole `modesolver spectrum` command (process start, JIT, table + JSON written);
  - the ratios baseline / modesolver, and the largest relative difference of P_s between the two on the 200 k.
All timings come from this one run on this machine: on a shared machine absolute times move with the load, the ratios
of figures taken minutes apart much less.
"""
import argparse
import json
import os
import subprocess
import sys
import tempfile
import time

import numpy as np
from scipy.interpolate import CubicSpline

HERE = os.path.dirname(os.path.abspath(__file__))
ROOT = os.path.dirname(os.path.dirname(HERE))
sys.path.insert(0, HERE)
import hand_scipy  # noqa: E402

DECK = os.path.join(HERE, "emodel-200.toml")
CLI = os.path.join(ROOT, "src/ModeSolver.Cli/bin/Release/net10.0/ModeSolver.Cli.dll")
BENCH = os.path.join(ROOT, "benchmarks/ModeSolver.Benchmarks/bin/Release/net10.0/ModeSolver.Benchmarks.dll")


def build():
    for proj in ("src/ModeSolver.Cli", "benchmarks/ModeSolver.Benchmarks"):
        subprocess.run(["dotnet", "build", "-c", "Release", "-v", "q", os.path.join(ROOT, proj)], check=True,
                       stdout=subprocess.DEVNULL)


def ours_cold(out_dir):
    t0 = time.perf_counter()
    subprocess.run(["dotnet", CLI, "spectrum", DECK, "--out", out_dir, "--quiet"], check=True, stdout=subprocess.DEVNULL)
    return time.perf_counter() - t0


def ours_warm(reps):
    line = subprocess.run(["dotnet", BENCH, "--warm-deck", DECK, str(reps)], check=True, capture_output=True,
                          text=True).stdout.split()
    fields = dict(zip(line[0::2], line[1::2]))
    return float(fields["warm_ms"]) * 1e-3, float(fields["rhs_per_mode"]), int(fields["modes"])


def main():
    parser = argparse.ArgumentParser(description="modesolver against the hand-written scipy baseline")
    parser.add_argument("--reps", type=int, default=21, help="repetitions of the warm modesolver run (median)")
    parser.add_argument("--no-build", action="store_true", help="use the existing Release build")
    args = parser.parse_args()
    if not args.no_build:
        build()
    with tempfile.TemporaryDirectory() as tmp:
        cold = ours_cold(tmp)
        with open(os.path.join(tmp, "summary.json")) as f:
            summary = json.load(f)
        table = np.loadtxt(os.path.join(tmp, "primordial.dat"))
    warm, rhs_ours, modes_ours = ours_warm(args.reps)
    n_star = summary["N_star"]
    hand_scipy.ARGS.rtol = 1e-6
    ks, ps, rhs_base, base = hand_scipy.run(n_star, 200)
    # modesolver's primordial table is log-spaced (251 rows here); a cubic spline in (ln k, ln P_s) reads it at the 200 k.
    spline = CubicSpline(np.log(table[:, 0]), np.log(table[:, 1]))
    diff = float(np.max(np.abs(np.exp(spline(np.log(ks))) / ps - 1.0)))
    print(f"model: E-model alpha = 4, A_s = 2.1e-9, N_* = {n_star:.4f} (from modesolver's reheating matching), 200 k in [1e-5, 1] /Mpc")
    print(f"baseline (scipy DOP853, k/aH = 100 start, rtol 1e-6): {base:8.3f} s        {rhs_base:6.0f} right-hand sides per mode")
    print(f"modesolver warm (median of {args.reps}, {modes_ours} modes):   {warm * 1e3:8.2f} ms       {rhs_ours:6.0f} right-hand sides per mode   ratio {base / warm:7.0f}x")
    print(f"modesolver cold (whole command, table + JSON): {cold:8.3f} s                                         ratio {base / cold:7.1f}x")
    print(f"largest relative difference of P_s on the 200 k: {diff:.2e}")


if __name__ == "__main__":
    main()
