"""Loading libmodesolver.so and declaring its C functions (modesolver.h) for ctypes."""

import ctypes
import os

_HERE = os.path.dirname(os.path.abspath(__file__))

#: Result codes of modesolver.h.
OK, ERR_INTERNAL, ERR_INPUT, ERR_PHYSICS, ERR_USAGE = 0, 1, 2, 3, 4


def library_candidates():
    """Where the library is looked for, in order: $MODESOLVER_LIB, the package's lib/ folder, the loader's path."""
    env = os.environ.get("MODESOLVER_LIB")
    if env:
        yield env
    yield os.path.join(_HERE, "lib", "libmodesolver.so")
    yield "libmodesolver.so"


def load(path=None):
    """Loads the library (``path``, or the first of :func:`library_candidates` that loads) and declares its functions."""
    errors = []
    for candidate in [path] if path else library_candidates():
        if os.sep in candidate and not os.path.exists(candidate):
            errors.append(f"{candidate}: no such file")
            continue
        try:
            lib = ctypes.CDLL(candidate)
        except OSError as e:
            errors.append(f"{candidate}: {e}")
            continue
        _declare(lib)
        return lib
    raise OSError("libmodesolver.so not found (build it with `dotnet publish src/ModeSolver.Native -c Release "
                  "-r linux-x64 -o python/modesolver/lib`, or set MODESOLVER_LIB): " + "; ".join(errors))


def _declare(lib):
    run = ctypes.c_void_p
    cstr = ctypes.c_char_p
    dptr = ctypes.POINTER(ctypes.c_double)
    size = ctypes.c_size_t
    i = ctypes.c_int
    table = {
        "ms_version": (cstr, []),
        "ms_run_new": (run, []),
        "ms_run_free": (None, [run]),
        "ms_run_error": (cstr, [run]),
        "ms_run_load_deck": (i, [run, cstr, cstr]),
        "ms_run_load_deck_file": (i, [run, cstr]),
        "ms_run_set_number": (i, [run, cstr, ctypes.c_double]),
        "ms_run_set_text": (i, [run, cstr, cstr]),
        "ms_run_unset": (i, [run, cstr]),
        "ms_run_set_threads": (i, [run, i]),
        "ms_run_check": (i, [run]),
        "ms_run_pivot": (i, [run]),
        "ms_run_spectrum": (i, [run]),
        "ms_run_value": (i, [run, cstr, dptr]),
        "ms_run_value_error": (i, [run, cstr, dptr]),
        "ms_run_tolerance_met": (i, [run, ctypes.POINTER(i)]),
        "ms_run_spectrum_size": (i, [run, ctypes.POINTER(size)]),
        "ms_run_spectrum_copy": (i, [run, dptr, dptr, dptr, dptr, size]),
        "ms_run_spectrum_at": (i, [run, dptr, size, dptr, dptr]),
        "ms_run_flag_count": (size, [run]),
        "ms_run_flag": (cstr, [run, size]),
        "ms_run_warning_count": (size, [run]),
        "ms_run_warning": (cstr, [run, size]),
    }
    for name, (restype, argtypes) in table.items():
        f = getattr(lib, name)
        f.restype = restype
        f.argtypes = argtypes
