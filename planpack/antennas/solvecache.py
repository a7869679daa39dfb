"""NEC solutions kept on disk between runs.

Solving an antenna over a real soil costs nec2++ about 20 ms a frequency for
its Sommerfeld tables, and every antenna is solved on 41 band-grid points
beside its channels.  A plan edited in anything but its antennas, or a new
plan that uses antennas and soils another plan already used, would pay that
again on every ``check`` and ``build``.  This cache answers it from disk.

It is trusted no more than it must be:

- **Where**: ``nec/`` under the user's cache folder
  (:func:`planpack.workflow.cachedir.cache_root`), never beside a plan, and
  never through a symbolic link (:mod:`planpack.workflow.cachedir`).
- **Keyed by everything NEC is given**: every wire (tag, segments, ends,
  radius), the feed, the loads, the ground type and constants, the wire
  loss, the frequencies, whether a pattern was asked for; and the PyNEC
  version, this format's version and the source of the solver module.
- **Numbers only**: an entry is a NumPy ``.npz`` read without pickle, holding
  its own key, the feed impedances and the gains.  Shapes, types and
  finiteness are checked before use; anything else is a miss, solved afresh
  and rewritten.
- ``--no-cache`` turns it off for the run (:func:`disabled`).
"""

from __future__ import annotations

import contextlib
import functools
import hashlib
import io
import re
import zipfile
from importlib import metadata
from pathlib import Path

import numpy as np

KIND = "nec"
FORMAT = 1
MAX_ENTRY_BYTES = 16 * 1024 * 1024  # 250 frequencies of 91 x 7 gains are about 1.3 MB
MAX_ENTRIES = 5000
ENTRY_NAME = re.compile(r"[0-9a-f]{48}\.npz")

_enabled = True


@contextlib.contextmanager
def disabled():
    """Neither read nor write the cache inside the block (worker processes forked inside it inherit this)."""
    global _enabled
    saved, _enabled = _enabled, False
    try:
        yield
    finally:
        _enabled = saved


@functools.lru_cache(maxsize=1)
def _environment() -> str:
    try:
        pynec = metadata.version("PyNEC")
    except metadata.PackageNotFoundError:
        pynec = "absent"
    solver_src = (Path(__file__).resolve().parent / "solver.py").read_bytes()
    return f"format {FORMAT}\nPyNEC {pynec}\nsolver {hashlib.sha256(solver_src).hexdigest()}\n"


def key(description: str) -> str:
    """Cache key [hex] of a solve described in text (see :func:`planpack.antennas.solver.describe`)."""
    return hashlib.sha256((_environment() + description).encode("utf-8")).hexdigest()


def _folder():
    from planpack.workflow.cachedir import open_cache

    return open_cache(KIND) if _enabled else None


def load(entry_key: str, n_freqs: int, pattern_shape: tuple[int, int] | None
         ) -> tuple[np.ndarray, np.ndarray | None] | None:
    """Impedances (n,) and gains (n, *pattern_shape) of a cached solve, or None."""
    folder = _folder()
    if folder is None:
        return None
    with folder:
        raw = folder.read(f"{entry_key[:48]}.npz", MAX_ENTRY_BYTES)
    if raw is None:
        return None
    try:
        with np.load(io.BytesIO(raw), allow_pickle=False) as npz:
            if set(npz.files) != ({"key", "z", "g"} if pattern_shape else {"key", "z"}):
                return None
            stored, z = npz["key"], npz["z"]
            g = npz["g"] if pattern_shape else None
    except (ValueError, OSError, EOFError, KeyError, zipfile.BadZipFile):
        return None
    if stored.dtype.kind != "U" or stored.shape != () or str(stored) != entry_key:
        return None
    if z.dtype != np.complex128 or z.shape != (n_freqs,) or not np.all(np.isfinite(z)):
        return None
    if g is not None and (g.dtype != np.float64 or g.shape != (n_freqs, *pattern_shape)
                          or not np.all(np.isfinite(g))):
        return None
    return z, g


def store(entry_key: str, z: np.ndarray, g: np.ndarray | None) -> None:
    """Keep a solve; a cache that cannot be written only costs time."""
    folder = _folder()
    if folder is None:
        return
    buf = io.BytesIO()
    arrays = {"key": np.array(entry_key), "z": np.asarray(z, np.complex128)}
    if g is not None:
        arrays["g"] = np.asarray(g, np.float64)
    np.savez(buf, **arrays)
    with folder:
        if folder.write(f"{entry_key[:48]}.npz", buf.getvalue()):
            folder.prune(ENTRY_NAME, MAX_ENTRIES)


def clear() -> None:
    """Remove every entry (the benchmarks' cold start)."""
    from planpack.workflow.cachedir import open_cache

    folder = open_cache(KIND, create=False)
    if folder is None:
        return
    with folder:
        folder.prune(ENTRY_NAME, 0)
