"""Checks on the arrays the scheduler is handed.

The scheduler is called by the compiler with plain numpy arrays. A wrong
shape or a NaN here is a programming error upstream, but it must still say
which argument, what was expected and what arrived, rather than surface as an
IndexError three calls deep.
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

HOURS = 24


class ScheduleInputError(ValueError):
    """An input array or parameter handed to the scheduler is malformed."""


def _fail(name: str, expected: str, got: str) -> ScheduleInputError:
    return ScheduleInputError(f"{name}: expected {expected}; got {got}")


def link_cube(name: str, value, *, unit_interval: bool = False, allow_inf: bool = False,
              allow_nan: bool = False) -> np.ndarray:
    """Return ``value`` as a float array of shape (links, 24, channels)."""
    arr = np.asarray(value, dtype=float)
    if arr.ndim != 3 or arr.shape[1] != HOURS or arr.shape[2] == 0:
        raise _fail(name, "an array of shape (links, 24, channels) with at least one channel",
                    f"shape {arr.shape}")
    _check_values(name, arr, unit_interval=unit_interval, allow_inf=allow_inf,
                  allow_nan=allow_nan)
    return arr


def link_hours(name: str, value, n_links: int, *, allow_nan: bool = False) -> np.ndarray:
    """Return ``value`` as a float array of shape (links, 24) [MHz]."""
    arr = np.asarray(value, dtype=float)
    if arr.shape != (n_links, HOURS):
        raise _fail(name, f"an array of shape ({n_links}, 24)", f"shape {arr.shape}")
    _check_values(name, arr, allow_nan=allow_nan, allow_inf=False)
    return arr


def same_shape(name: str, arr: np.ndarray, ref_name: str, ref: np.ndarray) -> None:
    if arr.shape != ref.shape:
        raise _fail(name, f"the shape of {ref_name} {ref.shape}", f"shape {arr.shape}")


def allowed_mask(value, n_channels: int) -> np.ndarray:
    """Return the authorisation mask as a bool array of shape (24, channels)."""
    arr = np.asarray(value)
    if arr.shape != (HOURS, n_channels):
        raise _fail("allowed", f"a bool array of shape (24, {n_channels})", f"shape {arr.shape}")
    if arr.dtype != bool:
        if not np.isin(arr, (0, 1)).all():
            raise _fail("allowed", "booleans (or 0/1)", f"values of dtype {arr.dtype}")
        arr = arr.astype(bool)
    return arr


def channel_vector(name: str, value, n_channels: int) -> np.ndarray:
    arr = np.asarray(value, dtype=float)
    if arr.shape != (n_channels,):
        raise _fail(name, f"an array of shape ({n_channels},)", f"shape {arr.shape}")
    _check_values(name, arr)
    if (arr <= 0).any():
        raise _fail(name, "positive frequencies [MHz]", f"{float(arr[arr <= 0][0])!r}")
    return arr


def number(name: str, value, *, low: float = 0.0, high: float = np.inf,
           low_open: bool = False) -> float:
    """A finite number in [low, high] (or (low, high] with ``low_open``)."""
    interval = f"{'(' if low_open else '['}{low:g}, {high:g}]"
    expected = f"a number in {interval}" if np.isfinite(high) else (
        f"a finite number {'>' if low_open else '>='} {low:g}")
    try:
        x = float(value)
    except (TypeError, ValueError):
        raise _fail(name, expected, _show(value)) from None
    if not np.isfinite(x) or x < low or x > high or (low_open and x == low):
        raise _fail(name, expected, _show(value))
    return x


def fraction(name: str, value, *, open_low: bool = False) -> float:
    return number(name, value, high=1.0, low_open=open_low)


def non_negative(name: str, value) -> float:
    return number(name, value)


def positive(name: str, value) -> float:
    return number(name, value, low_open=True)


def count(name: str, value, *, minimum: int = 1) -> int:
    if isinstance(value, bool) or not isinstance(value, (int, np.integer)) or value < minimum:
        raise _fail(name, f"a whole number >= {minimum}", _show(value))
    return int(value)


def per_station(name: str, value, n_stations: int) -> list:
    """A sequence with one entry per station, or a scalar broadcast to all."""
    if isinstance(value, (str, bytes)) or not isinstance(value, (Sequence, np.ndarray)):
        return [value] * n_stations
    items = list(value)
    if len(items) != n_stations:
        raise _fail(name, f"one value per station ({n_stations})", f"{len(items)} values")
    return items


def station_link_lists(value, n_links: int) -> list[tuple[int, ...]]:
    """Station incidence: for each station, the indices of the links it is on."""
    if isinstance(value, (str, bytes)) or not isinstance(value, (Sequence, np.ndarray)):
        raise _fail("station_links", "a list with, per station, a list of link indices",
                    _show(value))
    out = []
    for s, links in enumerate(value):
        if isinstance(links, (str, bytes)) or not isinstance(links, (Sequence, np.ndarray)):
            raise _fail(f"station_links[{s}]", "a list of link indices", _show(links))
        idx = []
        for j, link in enumerate(links):
            if (isinstance(link, bool) or not isinstance(link, (int, np.integer))
                    or not 0 <= link < n_links):
                raise _fail(f"station_links[{s}][{j}]",
                            f"a link index in 0..{n_links - 1}", _show(link))
            idx.append(int(link))
        out.append(tuple(sorted(set(idx))))
    return out


def _check_values(name: str, arr: np.ndarray, *, unit_interval: bool = False,
                  allow_inf: bool = False, allow_nan: bool = False) -> None:
    nan = np.isnan(arr)
    if nan.any() and not allow_nan:
        raise _fail(name, "numbers, no NaN", f"NaN at index {_first(nan)}")
    inf = np.isinf(arr)
    if inf.any() and not allow_inf:
        raise _fail(name, "finite numbers", f"{float(arr[inf][0])} at index {_first(inf)}")
    if unit_interval:
        bad = ~nan & ((arr < 0) | (arr > 1))
        if bad.any():
            raise _fail(name, "fractions in [0, 1]",
                        f"{float(arr[bad][0])!r} at index {_first(bad)}")


def _show(value) -> str:
    """repr of a value, with numpy scalars shown as plain Python numbers."""
    return repr(value.item() if isinstance(value, np.generic) else value)


def _first(mask: np.ndarray) -> tuple[int, ...]:
    return tuple(int(i) for i in np.argwhere(mask)[0])
