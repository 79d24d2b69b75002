"""A minimal PEP 517 build backend for the modesolver package (pure Python, no third-party build tool).

It packs modesolver/ (and modesolver/lib/libmodesolver.so when it has been published there) into a wheel, so
that ``pip install ./python`` works without reaching a package index.
"""

import base64
import hashlib
import os
import zipfile

NAME = "modesolver"
HERE = os.path.dirname(os.path.abspath(__file__))


def _version():
    with open(os.path.join(HERE, "pyproject.toml"), encoding="utf-8") as f:
        for line in f:
            if line.startswith("version"):
                return line.split("=", 1)[1].strip().strip('"')
    raise RuntimeError("pyproject.toml has no version line")


def _files():
    root = os.path.join(HERE, NAME)
    for dirpath, dirnames, filenames in os.walk(root):
        dirnames[:] = [d for d in dirnames if d != "__pycache__"]
        for name in sorted(filenames):
            # Only the library itself: publishing also copies native files of packages it does not load.
            if name.endswith(".py") or name in ("libmodesolver.so", "modesolver.h"):
                full = os.path.join(dirpath, name)
                yield full, os.path.relpath(full, HERE).replace(os.sep, "/")


def _has_native():
    return any(arc.endswith(".so") for _, arc in _files())


def _metadata(version):
    return (f"Metadata-Version: 2.1\nName: {NAME}\nVersion: {version}\n"
            "Summary: Exact inflationary spectra (ModeSolver) in-process from Python\n"
            "Requires-Python: >=3.9\nRequires-Dist: numpy\n")


def _record_line(arc, data):
    digest = base64.urlsafe_b64encode(hashlib.sha256(data).digest()).rstrip(b"=").decode()
    return f"{arc},sha256={digest},{len(data)}"


def _write_wheel(wheel_directory, entries):
    version = _version()
    tag = "py3-none-linux_x86_64" if _has_native() else "py3-none-any"
    dist_info = f"{NAME}-{version}.dist-info"
    wheel_name = f"{NAME}-{version}-{tag}.whl"
    path = os.path.join(wheel_directory, wheel_name)
    records = []
    with zipfile.ZipFile(path, "w", zipfile.ZIP_DEFLATED) as z:
        for arc, data in entries:
            z.writestr(arc, data)
            records.append(_record_line(arc, data))
        meta = {
            f"{dist_info}/METADATA": _metadata(version).encode(),
            f"{dist_info}/WHEEL": (f"Wheel-Version: 1.0\nGenerator: modesolver-build\n"
                                   f"Root-Is-Purelib: {'false' if _has_native() else 'true'}\nTag: {tag}\n").encode(),
        }
        for arc, data in meta.items():
            z.writestr(arc, data)
            records.append(_record_line(arc, data))
        records.append(f"{dist_info}/RECORD,,")
        z.writestr(f"{dist_info}/RECORD", "\n".join(records) + "\n")
    return wheel_name


def get_requires_for_build_wheel(config_settings=None):
    return []


def get_requires_for_build_editable(config_settings=None):
    return []


def build_wheel(wheel_directory, config_settings=None, metadata_directory=None):
    entries = []
    for full, arc in _files():
        with open(full, "rb") as f:
            entries.append((arc, f.read()))
    return _write_wheel(wheel_directory, entries)


def build_editable(wheel_directory, config_settings=None, metadata_directory=None):
    """An editable install: a .pth file that puts this source tree on sys.path."""
    return _write_wheel(wheel_directory, [(f"{NAME}.pth", (HERE + "\n").encode())])
