"""The Run class, the exceptions, and the P_s(k), P_t(k) helper for Boltzmann codes."""

import ctypes
import math
import os
import threading

import numpy as np

from . import _native

_lib = None
_lib_lock = threading.Lock()


def library():
    """The loaded libmodesolver.so (loaded on first use; see :func:`modesolver._native.library_candidates`)."""
    global _lib
    with _lib_lock:
        if _lib is None:
            _lib = _native.load()
        return _lib


def version():
    """The library's version string (the same as ``modesolver --version``)."""
    return library().ms_version().decode()


class ModeSolverError(Exception):
    """A failed call. ``code`` is the command line's exit code (2 input, 3 physics, 1 internal; 4 misuse of the
    interface) and ``message`` the one-line message the command line prints after "modesolver: "."""

    def __init__(self, code, message):
        super().__init__(message)
        self.code = code
        self.message = message


class InputError(ModeSolverError):
    """Bad input (code 2): deck syntax, unknown key, wrong type, invalid formula, value out of range."""


class PhysicsError(ModeSolverError):
    """Physics that cannot be computed (code 3), e.g. inflation never ends or the k range is not served."""


class UsageError(ModeSolverError):
    """Misuse of the interface (code 4), e.g. spectra asked for before a spectrum run."""


_ERRORS = {_native.ERR_INPUT: InputError, _native.ERR_PHYSICS: PhysicsError, _native.ERR_USAGE: UsageError}

#: Keyword arguments of :class:`Run` and their deck keys.
ALIASES = {
    "title": "title",
    "catalogue": "model.catalogue", "model": "model.catalogue",
    "potential": "model.potential", "kinetic": "model.kinetic", "coupling": "model.coupling",
    "palatini": "model.palatini", "phi_end": "model.phi_end",
    "phi0": "start.phi0", "dphi0": "start.dphi0", "start_efolds": "start.efolds",
    "k_pivot": "pivot.k", "efolds": "pivot.efolds",
    "w": "reheating.w", "temperature_gev": "reheating.temperature_gev", "T_reh": "reheating.temperature_gev",
    "reheat_efolds": "reheating.efolds", "dof": "reheating.dof",
    "A_s": "normalisation.a_s", "a_s": "normalisation.a_s", "ln_10_10_a_s": "normalisation.ln_10_10_a_s",
    "solve_for": "normalisation.solve_for",
    "k_min": "modes.k_min", "k_max": "modes.k_max", "count": "modes.count", "tolerance": "modes.tolerance",
}

#: Names accepted by :meth:`Run.value` (see modesolver.h).
VALUE_NAMES = ("A_s", "n_s", "r", "alpha_s", "n_t", "N_star", "k_pivot", "phi_star", "H_star", "energy_scale_gev",
               "V_scale", "N_total", "N_reh", "max_rel_error", "rhs_per_mode")


#: Pivot values with an error estimate (:meth:`Run.errors`), as summary.json's "errors" object.
ERROR_NAMES = ("A_s", "n_s", "alpha_s", "r", "n_t")


def _doubles(a):
    return a.ctypes.data_as(ctypes.POINTER(ctypes.c_double))


class Run:
    """One ModeSolver run in-process: the input is parsed once and kept, keys can be changed and the run repeated
    (what a sampler does), results come back as floats and numpy arrays.

    Give the input as a deck file (``Run("runs/plateau-demo.toml")``), as deck text (``Run(text=...)``), and/or as
    keyword arguments, which override the deck as the command line does::

        Run(potential="0.5 * m^2 * phi^2", params={"m": 1e-5}, phi0=17, efolds=55)
        Run("runs/plateau-demo.toml", params={"alpha": 2}, count=200)

    Keywords are the short names of :data:`ALIASES`; ``params`` sets model parameters; ``settings`` takes any deck
    key, e.g. ``{"reheating.w": 0.2}``. ``threads`` sets the mode workers (0, the default: all cores).

    A run is also a context manager; :meth:`close` frees it (garbage collection does too).
    """

    def __init__(self, deck=None, *, text=None, source_name=None, params=None, settings=None, threads=None, **keys):
        lib = library()
        self._lib = lib
        self._h = lib.ms_run_new()
        if not self._h:
            raise MemoryError("ms_run_new failed")
        if deck is not None and text is not None:
            raise ValueError("give a deck file or deck text, not both")
        if deck is not None:
            self._check(lib.ms_run_load_deck_file(self._h, os.fspath(deck).encode()))
        elif text is not None:
            self._check(lib.ms_run_load_deck(self._h, text.encode(), (source_name or "deck").encode()))
        for name, value in keys.items():
            if name not in ALIASES:
                raise TypeError(f"unknown keyword '{name}' (valid: {', '.join(ALIASES)}, params, settings, threads)")
            self.set(ALIASES[name], value)
        for name, value in (params or {}).items():
            self.set("model.parameters." + name, value)
        for key, value in (settings or {}).items():
            self.set(key, value)
        if threads is not None:
            self._check(lib.ms_run_set_threads(self._h, int(threads)))

    # ---- life ----
    def close(self):
        """Frees the run (idempotent)."""
        h, self._h = getattr(self, "_h", None), None
        if h:
            self._lib.ms_run_free(h)

    def __enter__(self):
        return self

    def __exit__(self, *exc):
        self.close()

    def __del__(self):
        self.close()

    def _handle(self):
        if not self._h:
            raise UsageError(_native.ERR_USAGE, "the run is closed")
        return self._h

    def _check(self, code):
        if code != _native.OK:
            message = (self._lib.ms_run_error(self._h) or b"").decode()
            raise _ERRORS.get(code, ModeSolverError)(code, message)

    # ---- input ----
    def set(self, key, value):
        """Sets the deck key ``key`` (e.g. ``"start.phi0"``, ``"model.parameters.alpha"``): a number, text, a bool
        (model.palatini), or None to remove the value. The deck is not parsed again."""
        h = self._handle()
        k = key.encode()
        if value is None:
            self._check(self._lib.ms_run_unset(h, k))
        elif isinstance(value, bool):
            self._check(self._lib.ms_run_set_text(h, k, b"true" if value else b"false"))
        elif isinstance(value, str):
            self._check(self._lib.ms_run_set_text(h, k, value.encode()))
        else:
            self._check(self._lib.ms_run_set_number(h, k, float(value)))
        return self

    def set_params(self, **params):
        """Sets model parameters by name, e.g. ``run.set_params(alpha=2.0)``."""
        for name, value in params.items():
            self.set("model.parameters." + name, value)
        return self

    # ---- running ----
    def check(self):
        """Validates the input (as ``spectrum --check``); raises :class:`InputError` with the message when bad."""
        self._check(self._lib.ms_run_check(self._handle()))
        return self

    def pivot(self):
        """Background, matching, normalisation and the exact pivot mode; returns :meth:`results`."""
        self._check(self._lib.ms_run_pivot(self._handle()))
        return self.results()

    def spectrum(self):
        """The whole pipeline on the deck's k; returns :meth:`results`."""
        self._check(self._lib.ms_run_spectrum(self._handle()))
        return self.results()

    # ---- results ----
    def value(self, name):
        """One named result (see :data:`VALUE_NAMES`) as a float."""
        out = ctypes.c_double()
        self._check(self._lib.ms_run_value(self._handle(), name.encode(), ctypes.byref(out)))
        return out.value

    def results(self):
        """All named results of the last run as a dict of floats."""
        return {name: self.value(name) for name in VALUE_NAMES}

    def errors(self):
        """The estimated absolute error of each exact pivot value of the last run, in the value's units, as a dict
        (keys :data:`ERROR_NAMES`; NaN when not estimated): read ``run.n_s`` as ``n_s +- errors()["n_s"]``."""
        out = ctypes.c_double()
        h = self._handle()
        result = {}
        for name in ERROR_NAMES:
            self._check(self._lib.ms_run_value_error(h, name.encode(), ctypes.byref(out)))
            result[name] = out.value
        return result

    @property
    def tolerance_met(self):
        """True when the last run met the requested tolerance (max_rel_error <= modes.tolerance), as summary.json's
        ``tolerance_met``; when False after :meth:`spectrum`, the run's :attr:`warnings` say so."""
        met = ctypes.c_int()
        self._check(self._lib.ms_run_tolerance_met(self._handle(), ctypes.byref(met)))
        return bool(met.value)

    def samples(self):
        """The last spectrum run's own samples: (k [1/Mpc], P_s, P_t, estimated relative error of P_s) as arrays."""
        h = self._handle()
        n = ctypes.c_size_t()
        self._check(self._lib.ms_run_spectrum_size(h, ctypes.byref(n)))
        arrays = [np.empty(n.value) for _ in range(4)]
        self._check(self._lib.ms_run_spectrum_copy(h, *(_doubles(a) for a in arrays), n.value))
        return tuple(arrays)

    def spectra_at(self, k):
        """P_s(k) and P_t(k) as arrays at the wavenumbers ``k`` [1/Mpc] (any shape, inside the run's k range),
        interpolated as the primordial table is."""
        kk = np.ascontiguousarray(k, dtype=np.float64)
        flat = kk.reshape(-1)
        ps = np.empty_like(flat)
        pt = np.empty_like(flat)
        self._check(self._lib.ms_run_spectrum_at(self._handle(), _doubles(flat), flat.size, _doubles(ps), _doubles(pt)))
        return ps.reshape(kk.shape), pt.reshape(kk.shape)

    @property
    def flags(self):
        """Slow-roll disagreement flags of the last spectrum run, one string each ("[kind] message")."""
        h = self._handle()
        return [self._lib.ms_run_flag(h, i).decode() for i in range(self._lib.ms_run_flag_count(h))]

    @property
    def warnings(self):
        """Warnings of the last run or check, one string each."""
        h = self._handle()
        return [self._lib.ms_run_warning(h, i).decode() for i in range(self._lib.ms_run_warning_count(h))]

    def __getattr__(self, name):
        if name in VALUE_NAMES:
            return self.value(name)
        raise AttributeError(name)


def primordial_spectra(k, deck=None, *, count=200, run=None, **keys):
    """P_s(k) and P_t(k) on the wavenumbers ``k`` [1/Mpc] for a Boltzmann code's Python interface.

    The modes are solved at ``count`` log-spaced wavenumbers spanning ``k`` (modes.k_min and modes.k_max are set to
    its smallest and largest values) and interpolated onto ``k``. The model comes from ``deck`` and/or keyword
    arguments as for :class:`Run`; pass an existing ``run`` instead to reuse it (its k range is set the same way).
    Returns two numpy arrays shaped like ``k``.
    """
    kk = np.asarray(k, dtype=np.float64)
    if kk.size == 0:
        raise ValueError("k is empty")
    if not np.all(np.isfinite(kk)) or np.any(kk <= 0):
        raise ValueError("k must be positive and finite (1/Mpc)")
    lo, hi = float(kk.min()), float(kk.max())
    own = run is None
    r = Run(deck, **keys) if own else run
    try:
        r.set("modes.k_min", lo)
        r.set("modes.k_max", hi)
        r.set("modes.count", 1 if lo == hi else max(int(count), 2))
        r.spectrum()
        return r.spectra_at(kk)
    finally:
        if own:
            r.close()


def log_k_grid(k_min=1e-6, k_max=5.0, per_decade=20):
    """A log-spaced k grid [1/Mpc] from ``k_min`` to ``k_max`` with about ``per_decade`` points per decade."""
    n = max(2, int(math.ceil(per_decade * math.log10(k_max / k_min))) + 1)
    return np.logspace(math.log10(k_min), math.log10(k_max), n)
