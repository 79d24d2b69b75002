"""ModeSolver from Python: exact inflationary predictions in-process through libmodesolver.so (ctypes + numpy).

>>> import modesolver
>>> with modesolver.Run("runs/plateau-demo.toml") as run:
...     pivot = run.pivot()                 # background, N_*, normalisation, the exact pivot mode
...     print(pivot["n_s"], "+-", run.errors()["n_s"], run.tolerance_met)
...     run.set_params(alpha=2.0)           # change a parameter and rerun: the deck is not parsed again
...     run.spectrum()                      # modes across the deck's k
...     ps, pt = run.spectra_at([1e-3, 0.05, 0.2])

For a Boltzmann code, :func:`primordial_spectra` returns P_s(k), P_t(k) on the k array it asks for. Failures raise
:class:`ModeSolverError` (:class:`InputError`, :class:`PhysicsError`, :class:`UsageError`) carrying the command
line's one-line message and exit code. The library is found through $MODESOLVER_LIB, then modesolver/lib/, then
the system loader path.
"""

from .run import (ALIASES, ERROR_NAMES, VALUE_NAMES, InputError, ModeSolverError, PhysicsError, Run, UsageError,
                  library, log_k_grid, primordial_spectra, version)

__all__ = ["ALIASES", "ERROR_NAMES", "VALUE_NAMES", "InputError", "ModeSolverError", "PhysicsError", "Run", "UsageError", "library",
           "log_k_grid", "primordial_spectra", "version"]
