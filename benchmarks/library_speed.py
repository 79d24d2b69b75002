#!/usr/bin/env python3
"""Per-call cost of libmodesolver.so from Python against the command line's cold start (the figures of README's
"From C and Python" section).

Usage (from the repository root, with a Python that has numpy, e.g. Debian's /usr/bin/python3):
    /usr/bin/python3 benchmarks/library_speed.py [--reps 21] [--cold-reps 7] [--deck runs/plateau-demo.toml]
                                                 [--lib PATH] [--cli-dll PATH] [--native-cli PATH]

What it needs, built beforehand (the script builds nothing; it says which command is missing):
    dotnet publish src/ModeSolver.Native -c Release -r linux-x64 -o python/modesolver/lib       # the library
    dotnet build -c Release src/ModeSolver.Cli                                                  # the JIT command
    dotnet publish src/ModeSolver.Cli -c Release -r linux-x64 -p:PublishAot=true -o dist-native # the native command

Figures printed, for the deck (default: the E-model plateau demo, N_* from reheating, normalised to A_s):
  - library, in-process: the first call (load the library, parse the deck, first pivot run), then the median and
    the fastest of --reps calls of a pivot-only run with a parameter changed before each call (what a sampler does),
    and of a 200-k spectrum (k = 1e-5 .. 1 /Mpc) on one thread and on all cores;
  - command, cold start (a new process each time, median and fastest of --cold-reps): `background DECK` (the
    pivot-only run) and `spectrum DECK --k-count 200 --table -` (the 200-k spectrum, table on stdout, no other
    file), both from the JIT build (`dotnet ModeSolver.Cli.dll`) and from the native AOT executable;
  - the load average before and after: on a shared machine the absolute times move with it.
"""
import argparse
import os
import statistics
import subprocess
import sys
import time

HERE = os.path.dirname(os.path.abspath(__file__))
ROOT = os.path.dirname(HERE)
sys.path.insert(0, os.path.join(ROOT, "python"))

DEFAULT_LIB = os.path.join(ROOT, "python", "modesolver", "lib", "libmodesolver.so")
DEFAULT_DLL = os.path.join(ROOT, "src", "ModeSolver.Cli", "bin", "Release", "net10.0", "ModeSolver.Cli.dll")
DEFAULT_NATIVE = os.path.join(ROOT, "dist-native", "modesolver")
BUILD = {
    "lib": "dotnet publish src/ModeSolver.Native -c Release -r linux-x64 -o python/modesolver/lib",
    "dll": "dotnet build -c Release src/ModeSolver.Cli",
    "native": "dotnet publish src/ModeSolver.Cli -c Release -r linux-x64 -p:PublishAot=true -o dist-native",
}


def load_average():
    with open("/proc/loadavg", encoding="ascii") as f:
        return " ".join(f.read().split()[:3])


def timed(call, reps):
    """Wall times in seconds of ``reps`` calls of ``call``."""
    times = []
    for i in range(reps):
        t = time.perf_counter()
        call(i)
        times.append(time.perf_counter() - t)
    return times


def cold(command, reps):
    """Wall times of ``reps`` runs of ``command`` as a new process; stops at the first failure with its stderr."""
    def once(_):
        p = subprocess.run(command, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)
        if p.returncode != 0:
            sys.exit(f"library_speed: `{' '.join(command)}` failed (exit {p.returncode}): {p.stderr.strip()}")
    return timed(once, reps)


def row(name, times, unit=1e3, suffix="ms"):
    print(f"  {name:<66} median {statistics.median(times) * unit:9.2f} {suffix}   fastest {min(times) * unit:9.2f} {suffix}"
          f"   ({len(times)} calls)")
    return statistics.median(times)


def main():
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--reps", type=int, default=21, help="calls per in-process figure (default 21)")
    ap.add_argument("--cold-reps", type=int, default=7, help="processes per cold-start figure (default 7)")
    ap.add_argument("--deck", default=os.path.join(ROOT, "runs", "plateau-demo.toml"))
    ap.add_argument("--param", default="alpha", help="the model parameter changed before each pivot call (default alpha)")
    ap.add_argument("--lib", default=os.environ.get("MODESOLVER_LIB", DEFAULT_LIB))
    ap.add_argument("--cli-dll", default=DEFAULT_DLL)
    ap.add_argument("--native-cli", default=DEFAULT_NATIVE)
    a = ap.parse_args()
    for what, path in (("lib", a.lib), ("dll", a.cli_dll), ("native", a.native_cli)):
        if not os.path.exists(path):
            sys.exit(f"library_speed: {path} not found; build it with `{BUILD[what]}`")
    if a.reps < 1 or a.cold_reps < 1:
        sys.exit("library_speed: --reps and --cold-reps must be at least 1")
    os.environ["MODESOLVER_LIB"] = os.path.abspath(a.lib)

    print(f"library_speed: deck {os.path.relpath(a.deck, ROOT)}, {os.cpu_count()} cores, load average {load_average()}")
    t = time.perf_counter()
    import modesolver  # noqa: E402  (after MODESOLVER_LIB is set)
    run = modesolver.Run(a.deck, threads=1)
    first = run.pivot()
    first_call = time.perf_counter() - t
    print(f"  library {modesolver.version()}; first call (import, load the library, parse the deck, pivot run): "
          f"{first_call * 1e3:.1f} ms")
    deck_value = deck_parameter(a.deck, a.param)

    print("library from Python, per call (warm):")
    # A sampler's step: change a parameter (alternately up and back by 1e-3), rerun pivot only.
    pivot = row(f"pivot-only run, {a.param} changed before each call",
                timed(lambda i: (run.set_params(**{a.param: deck_value * (1 + 1e-3 * (i % 2))}), run.pivot()), a.reps))
    run.set_params(**{a.param: deck_value})
    run.set("modes.k_min", 1e-5).set("modes.k_max", 1.0).set("modes.count", 200)
    run.spectrum()
    samples = len(run.samples()[0])
    spec1 = row(f"200-k spectrum ({samples} modes), 1 thread", timed(lambda i: run.spectrum(), a.reps))
    run.close()
    with modesolver.Run(a.deck, threads=0, k_min=1e-5, k_max=1.0, count=200) as all_cores:
        all_cores.spectrum()
        spec_all = row(f"200-k spectrum, all {os.cpu_count()} cores", timed(lambda i: all_cores.spectrum(), a.reps))

    print("command line, cold start (a new process per call):")
    figures = {}
    for label, prefix in (("JIT (dotnet ModeSolver.Cli.dll)", ["dotnet", a.cli_dll]), ("native AOT", [a.native_cli])):
        figures[label, "background"] = row(f"{label} background",
                                           cold(prefix + ["background", a.deck, "--quiet"], a.cold_reps))
        figures[label, "spectrum"] = row(f"{label} spectrum --k-count 200 --table -",
                                         cold(prefix + ["spectrum", a.deck, "--k-count", "200", "--k-min", "1e-5",
                                                        "--k-max", "1", "--table", "-", "--quiet"], a.cold_reps))
    print("ratios (cold start / library call, medians):")
    for label in ("JIT (dotnet ModeSolver.Cli.dll)", "native AOT"):
        print(f"  {label}: background {figures[label, 'background'] / pivot:.0f}x a pivot-only call; "
              f"spectrum {figures[label, 'spectrum'] / spec1:.1f}x a 1-thread 200-k call, "
              f"{figures[label, 'spectrum'] / spec_all:.1f}x an all-core one")
    print(f"load average after: {load_average()}")


def deck_parameter(deck, name):
    """The deck's value of the model parameter ``name`` (the pivot calls move it by 1e-3 and back)."""
    import tomllib  # Python 3.11+
    with open(deck, "rb") as f:
        parameters = tomllib.load(f).get("model", {}).get("parameters", {})
    if name not in parameters:
        sys.exit(f"library_speed: {deck} has no [model.parameters] {name}; choose one with --param")
    return float(parameters[name])


if __name__ == "__main__":
    main()
