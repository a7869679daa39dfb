"""Land and sea along a path, from the global land mask that a package carries.

The mask is the one of the ``global-land-mask`` package (MIT licence): the
NOAA GLOBE 30-arc-second elevation grid, ocean wherever GLOBE has no land
elevation (lakes count as land). That package loads the whole 21600 × 43200
grid (about 1 GB) on import, so this module never imports it: it streams
the package's compressed file once and keeps the count of sea pixels in
each 0.05° cell (3600 × 7200 bytes, 26 MB). That reduction takes several
seconds, so planpack ships its result (``data/sea_cells.zlib``, 0.4 MB
compressed) and reads it in a few tens of milliseconds; the tests check that
the shipped grid equals a fresh reduction of the package's mask. To rebuild
it after the package changes::

    python -c "from planpack.ionosphere import landsea; landsea.write_shipped_grid()"
"""

from __future__ import annotations

import functools
import importlib.metadata
import importlib.util
import os
import tempfile
import zipfile
import zlib
from pathlib import Path

import numpy as np

#: Distribution that carries the mask, and the file inside it.
MASK_DISTRIBUTION = "global-land-mask"
MASK_FILE = "globe_combined_mask_compressed.npz"

#: Pixels of the source grid per degree, and per side of one kept cell.
_SOURCE_PER_DEG = 120
_BLOCK = 6
#: Side of one kept cell [deg] (0.05°, 5.6 km of latitude).
CELL_DEG = _BLOCK / _SOURCE_PER_DEG
_PIXELS_PER_CELL = _BLOCK * _BLOCK

#: Mean earth radius for path geometry [km] (as geodesy uses for great circles).
EARTH_RADIUS_KM = 6371.0


class LandMaskUnavailable(RuntimeError):
    """The land mask package is not installed or its file is unreadable."""


def _mask_path() -> Path:
    spec = importlib.util.find_spec("global_land_mask")       # finds it without importing it
    if spec is None or not spec.submodule_search_locations:
        raise LandMaskUnavailable(f"the {MASK_DISTRIBUTION} package is not installed")
    path = Path(list(spec.submodule_search_locations)[0]) / MASK_FILE
    if not path.is_file():
        raise LandMaskUnavailable(f"{path} is missing from the {MASK_DISTRIBUTION} package")
    return path


def _mask_version() -> str:
    try:
        return importlib.metadata.version(MASK_DISTRIBUTION)
    except importlib.metadata.PackageNotFoundError as exc:
        raise LandMaskUnavailable(f"the {MASK_DISTRIBUTION} package is not installed") from exc


def _reduce_mask(path: Path) -> np.ndarray:
    """Count the sea pixels of every 0.05° cell, streaming the compressed file."""
    with zipfile.ZipFile(path) as archive, archive.open("mask.npy") as member:
        version = np.lib.format.read_magic(member)
        read_header = (np.lib.format.read_array_header_1_0 if version == (1, 0)
                       else np.lib.format.read_array_header_2_0)
        shape, fortran, dtype = read_header(member)
        n_rows, n_cols = shape
        if fortran or dtype != np.bool_ or shape != (180 * _SOURCE_PER_DEG, 360 * _SOURCE_PER_DEG):
            raise LandMaskUnavailable(f"unexpected land mask layout {shape} {dtype} in {path}")
        out = np.empty((n_rows // _BLOCK, n_cols // _BLOCK), np.uint8)
        rows = _BLOCK * 120
        for r in range(0, n_rows, rows):
            take = min(rows, n_rows - r)
            chunk = np.frombuffer(member.read(n_cols * take), np.uint8).reshape(take // _BLOCK, _BLOCK, n_cols)
            col_sum = chunk[:, 0].copy()                    # explicit adds: far faster than .sum on uint8
            for b in range(1, _BLOCK):
                col_sum += chunk[:, b]
            cells = col_sum.reshape(-1, n_cols // _BLOCK, _BLOCK)
            total = cells[..., 0].copy()
            for b in range(1, _BLOCK):
                total += cells[..., b]
            out[r // _BLOCK:(r + take) // _BLOCK] = total
    return out


#: The reduced grid as planpack ships it: zlib-compressed uint8 counts, row-major (3600, 7200).
SHIPPED_GRID = Path(__file__).with_name("data") / "sea_cells.zlib"
_GRID_SHAPE = (180 * _SOURCE_PER_DEG // _BLOCK, 360 * _SOURCE_PER_DEG // _BLOCK)


@functools.cache
def _shipped_grid() -> np.ndarray | None:
    try:
        raw = zlib.decompress(SHIPPED_GRID.read_bytes())
    except (OSError, zlib.error):
        return None
    if len(raw) != _GRID_SHAPE[0] * _GRID_SHAPE[1]:
        return None
    grid = np.frombuffer(raw, np.uint8).reshape(_GRID_SHAPE)
    return grid if int(grid.max(initial=0)) <= _PIXELS_PER_CELL else None


def write_shipped_grid(path: str | None = None) -> str:
    """Reduce the package's mask afresh and write it where planpack ships it (or to ``path``)."""
    target = Path(path) if path is not None else SHIPPED_GRID
    grid = _reduce_mask(_mask_path())
    target.parent.mkdir(parents=True, exist_ok=True)
    target.write_bytes(zlib.compress(np.ascontiguousarray(grid).tobytes(), 9))
    return str(target)


def sea_pixel_counts(cache_dir: str | None = None) -> np.ndarray:
    """Sea pixels (0-36) in each 0.05° cell of the GLOBE land mask.

    The grid planpack ships, else (when that file is missing) a fresh
    reduction of the package's mask (:func:`package_sea_pixel_counts`).

    Parameters
    ----------
    cache_dir : str, optional
        For the fresh reduction only: as :func:`package_sea_pixel_counts`.

    Returns
    -------
    ndarray of uint8, shape (3600, 7200)
        Row i spans latitudes (90 − 0.05(i+1), 90 − 0.05 i] [deg]; column j
        spans longitudes [−180 + 0.05 j, −180 + 0.05 (j+1)) [deg]; value:
        how many of the cell's 36 pixels are sea [-].

    Raises
    ------
    LandMaskUnavailable
        If the mask package is missing or unreadable.

    References
    ----------
    NOAA NGDC, GLOBE (Global Land One-km Base Elevation) v1.0 (1999), via
    the global-land-mask package 1.0.0 (T. Karin, MIT licence).
    """
    shipped = _shipped_grid()
    if shipped is not None:
        return shipped
    return package_sea_pixel_counts(cache_dir)


def package_sea_pixel_counts(cache_dir: str | None = None) -> np.ndarray:
    """The same grid reduced afresh from the global-land-mask package's file.

    Parameters
    ----------
    cache_dir : str, optional
        Folder to keep the reduced grid in between runs (written atomically,
        keyed by the mask package's version, never read through a link).

    Returns
    -------
    ndarray of uint8, shape (3600, 7200), as :func:`sea_pixel_counts`.

    Raises
    ------
    LandMaskUnavailable
        If the mask package is missing or unreadable.
    """
    return _sea_pixel_counts(None if cache_dir is None else str(cache_dir))


@functools.cache
def _sea_pixel_counts(cache_dir):
    cached = None
    if cache_dir is not None:
        cached = Path(cache_dir) / f"sea-cells-{_mask_version()}-{_BLOCK}.npy"
        try:
            fd = os.open(cached, os.O_RDONLY | getattr(os, "O_NOFOLLOW", 0))   # never through a link
        except OSError:
            fd = None
        if fd is not None:
            try:
                with os.fdopen(fd, "rb") as handle:
                    grid = np.load(handle, allow_pickle=False)
                if (grid.dtype == np.uint8 and grid.shape == (180 * _SOURCE_PER_DEG // _BLOCK, 360 * _SOURCE_PER_DEG // _BLOCK)
                        and int(grid.max(initial=0)) <= _PIXELS_PER_CELL):
                    grid.setflags(write=False)
                    return grid
            except (OSError, ValueError):
                pass                                   # a damaged cache is rebuilt, never trusted
    try:
        grid = _reduce_mask(_mask_path())
    except (OSError, KeyError, ValueError, zipfile.BadZipFile) as exc:
        raise LandMaskUnavailable(f"cannot read the land mask of {MASK_DISTRIBUTION}: {exc}") from exc
    grid.setflags(write=False)
    if cached is not None:
        try:
            cached.parent.mkdir(parents=True, exist_ok=True)
            fd, tmp = tempfile.mkstemp(dir=cached.parent, suffix=".npy.tmp")
            try:
                with os.fdopen(fd, "wb") as handle:
                    np.save(handle, grid, allow_pickle=False)
                os.replace(tmp, cached)
            finally:
                if os.path.exists(tmp):
                    os.unlink(tmp)
        except OSError:
            pass                                       # an unwritable cache only costs time
    return grid


def _cell_index(lat_deg, lon_deg):
    lat = np.clip(np.asarray(lat_deg, float), -90.0, 90.0)
    lon = np.asarray(lon_deg, float)
    if not (np.all(np.isfinite(lat)) and np.all(np.isfinite(lon))):
        raise ValueError("latitude and longitude must be finite")
    n_rows, n_cols = 180 * _SOURCE_PER_DEG // _BLOCK, 360 * _SOURCE_PER_DEG // _BLOCK
    i = np.clip(np.floor((90.0 - lat) / CELL_DEG).astype(int), 0, n_rows - 1)
    j = np.floor(np.mod(lon + 180.0, 360.0) / CELL_DEG).astype(int) % n_cols
    return i, j


def sea_fraction(lat_deg, lon_deg, cache_dir: str | None = None):
    """Fraction of the 0.05° cell around a point that is sea.

    Parameters
    ----------
    lat_deg, lon_deg : array_like
        Latitude [deg] (clipped to ±90) and longitude [deg] (any range).

    Returns
    -------
    ndarray
        Sea fraction of the cell [0-1].
    """
    i, j = _cell_index(lat_deg, lon_deg)
    return sea_pixel_counts(cache_dir)[i, j] / _PIXELS_PER_CELL


def is_sea(lat_deg, lon_deg, cache_dir: str | None = None):
    """Whether a point's 0.05° cell is mostly sea.

    Parameters
    ----------
    lat_deg, lon_deg : array_like
        Latitude and longitude [deg].

    Returns
    -------
    ndarray of bool
        True where at least half the cell's pixels are sea.
    """
    i, j = _cell_index(lat_deg, lon_deg)
    return sea_pixel_counts(cache_dir)[i, j] * 2 >= _PIXELS_PER_CELL


def _unit_vectors(lat_deg, lon_deg):
    lat, lon = np.radians(lat_deg), np.radians(lon_deg)
    return np.stack([np.cos(lat) * np.cos(lon), np.cos(lat) * np.sin(lon), np.sin(lat)], axis=-1)


def great_circle_points(lat1_deg, lon1_deg, lat2_deg, lon2_deg, fraction):
    """Points a given fraction of the way along the shorter great circle.

    Parameters
    ----------
    lat1_deg, lon1_deg, lat2_deg, lon2_deg : array_like
        End points [deg].
    fraction : array_like
        Fraction of the way from point 1 to point 2 [0-1], broadcast.

    Returns
    -------
    lat_deg, lon_deg : ndarray
        The points [deg], longitudes in [−180, 180).

    References
    ----------
    Spherical linear interpolation of unit vectors (K. Shoemake, SIGGRAPH
    1985); the sphere of radius 6371 km.
    """
    a = _unit_vectors(lat1_deg, lon1_deg)
    b = _unit_vectors(lat2_deg, lon2_deg)
    f = np.asarray(fraction, float)[..., None]
    omega = np.arccos(np.clip(np.sum(a * b, axis=-1), -1.0, 1.0))[..., None]
    small = omega < 1e-9
    s = np.where(small, 1.0, np.sin(omega))
    wa = np.where(small, 1.0 - f, np.sin((1.0 - f) * omega) / s)
    wb = np.where(small, f, np.sin(f * omega) / s)
    p = wa * a + wb * b
    lat = np.degrees(np.arctan2(p[..., 2], np.hypot(p[..., 0], p[..., 1])))
    lon = np.mod(np.degrees(np.arctan2(p[..., 1], p[..., 0])) + 180.0, 360.0) - 180.0
    return lat, lon


def path_sections(lat1_deg, lon1_deg, lat2_deg, lon2_deg, step_km: float = 2.0,
                  cache_dir: str | None = None):
    """Land and sea sections along the great circle between pairs of points.

    Parameters
    ----------
    lat1_deg, lon1_deg, lat2_deg, lon2_deg : array_like, shape (n,)
        Transmitter and receiver positions [deg].
    step_km : float
        Spacing of the mask samples along each path [km] (the mask's own
        cells are 0.05°, about 5.6 km).
    cache_dir : str, optional
        As for :func:`sea_pixel_counts`.

    Returns
    -------
    length_km : ndarray, shape (n, k)
        Section lengths from transmitter to receiver [km], padded with 0;
        each row sums to the path's great-circle length.
    sea : ndarray of bool, shape (n, k)
        True for a sea section (padding is False).

    Notes
    -----
    Each path is cut into ceil(d / step) equal pieces, each classified by
    the mask at its mid-point, and runs of equal class are merged. Feed the
    result to :func:`planpack.ionosphere.groundwave.millington_loss_db`
    with the sea's constants on sea sections and the land's elsewhere.
    """
    lat1, lon1, lat2, lon2 = (np.atleast_1d(np.asarray(v, float)) for v in (lat1_deg, lon1_deg, lat2_deg, lon2_deg))
    lat1, lon1, lat2, lon2 = np.broadcast_arrays(lat1, lon1, lat2, lon2)
    if not step_km > 0:
        raise ValueError(f"step_km must be > 0, got {step_km!r}")
    if not all(np.all(np.isfinite(v)) for v in (lat1, lon1, lat2, lon2)):
        raise ValueError("latitude and longitude must be finite")
    a, b = _unit_vectors(lat1, lon1), _unit_vectors(lat2, lon2)
    omega = np.arccos(np.clip(np.sum(a * b, axis=-1), -1.0, 1.0))
    dist = EARTH_RADIUS_KM * omega
    pieces = np.maximum(1, np.ceil(dist / step_km).astype(int))
    path = np.repeat(np.arange(lat1.size), pieces)
    starts = np.cumsum(pieces) - pieces
    frac = (np.arange(path.size) - starts[path] + 0.5) / pieces[path]
    om = omega[path]
    small = om < 1e-9
    s = np.where(small, 1.0, np.sin(om))
    wa = np.where(small, 1.0 - frac, np.sin((1.0 - frac) * om) / s)      # spherical interpolation
    wb = np.where(small, frac, np.sin(frac * om) / s)
    p = wa[:, None] * a[path] + wb[:, None] * b[path]
    lat = np.degrees(np.arctan2(p[:, 2], np.hypot(p[:, 0], p[:, 1])))
    lon = np.degrees(np.arctan2(p[:, 1], p[:, 0]))
    sea = is_sea(lat, lon, cache_dir)

    change = np.ones(path.size, bool)                       # a new run starts here
    change[1:] = (sea[1:] != sea[:-1]) | (path[1:] != path[:-1])
    run_start = np.flatnonzero(change)
    run_len = np.diff(np.append(run_start, path.size))
    run_path = path[run_start]
    n_runs = np.bincount(run_path, minlength=lat1.size)
    k = int(n_runs.max()) if n_runs.size else 0
    slot = np.arange(run_start.size) - (np.cumsum(n_runs) - n_runs)[run_path]
    length = np.zeros((lat1.size, k))
    sea_out = np.zeros((lat1.size, k), bool)
    length[run_path, slot] = run_len * (dist / pieces)[run_path]
    sea_out[run_path, slot] = sea[run_start]
    return length, sea_out


def coarse_land_fraction(cell_deg: float = 5.0, cache_dir: str | None = None) -> np.ndarray:
    """Land fraction of cells of a coarse latitude-longitude grid.

    Parameters
    ----------
    cell_deg : float
        Cell side [deg]; must divide 180 into a whole number of 0.05° cells.

    Returns
    -------
    ndarray, shape (180 / cell, 360 / cell)
        Land fraction [0-1]; row 0 is the northernmost band, column 0
        starts at 180° W. Area weighting within a cell is ignored (cells
        are small next to the scales it feeds).
    """
    per = int(round(cell_deg / CELL_DEG))
    if per < 1 or abs(per * CELL_DEG - cell_deg) > 1e-9 or (180 * _SOURCE_PER_DEG // _BLOCK) % per:
        raise ValueError(f"cell_deg must be a multiple of {CELL_DEG} deg dividing 180, got {cell_deg!r}")
    sea = sea_pixel_counts(cache_dir).astype(np.float64)
    n_r, n_c = sea.shape[0] // per, sea.shape[1] // per
    sea_frac = sea.reshape(n_r, per, n_c, per).mean(axis=(1, 3)) / _PIXELS_PER_CELL
    return 1.0 - sea_frac
