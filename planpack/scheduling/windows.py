"""Frequency windows read off the band grid: where a new channel would serve.

The link budget gives, for every link and hour, the fraction of good days on
a log frequency grid over the whole band, computed with each station's own
antennas and matching.  A window is the contiguous run of frequencies on
which every link-hour asked about reaches the plan's target; that run is
what a planner asks the spectrum manager for.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

#: A window narrower than this is no window: a spectrum manager cannot assign
#: into it with any confidence, and the figures at its edges are the least
#: certain [MHz] (common practice, no source).
MIN_WINDOW_MHZ = 0.1

#: Why no window was found (plain words, used in messages).
NO_WINDOW_NONE_REACHES = "no frequency on the band reaches the target on every one of them"
NO_WINDOW_TOO_NARROW = "the frequencies that would serve them all span less than 100 kHz"
NO_WINDOW_NOT_PREDICTED = "no band-wide prediction is available"


@dataclass(frozen=True)
class Window:
    """A run of frequencies serving every link-hour asked about.

    low_mhz, high_mhz : edges [MHz], refined between grid points where the
        weakest link-hour's fraction of good days crosses the target
        (linear in log f).
    best_mhz : the grid frequency inside the run where the weakest
        link-hour does best [MHz].
    weakest_good_days : that weakest fraction at ``best_mhz`` [0-1].
    """

    low_mhz: float
    high_mhz: float
    best_mhz: float
    weakest_good_days: float

    @property
    def width_mhz(self) -> float:
        return self.high_mhz - self.low_mhz


def _crossing(f0: float, f1: float, g0: float, g1: float, target: float) -> float:
    """Frequency between f0 and f1 [MHz] where g crosses target, linear in log f."""
    if g1 == g0:
        return f1
    t = min(1.0, max(0.0, (target - g0) / (g1 - g0)))
    return float(np.exp(np.log(f0) + t * (np.log(f1) - np.log(f0))))


def serving_window(good_days, grid_mhz, target: float) -> tuple[Window | None, str | None]:
    """The widest run of grid frequencies on which every row reaches ``target``.

    Parameters
    ----------
    good_days : array (m, g)
        Fraction of good days [0-1] of m link-hours on the grid.
    grid_mhz : array (g,)
        Ascending grid frequencies [MHz].
    target : float
        Fraction of days each link-hour must work [0-1].

    Returns
    -------
    (Window or None, reason or None)
        The window, or None with the reason in plain words: none of the band
        serves them all, or what serves them all is under
        :data:`MIN_WINDOW_MHZ` wide.
    """
    good = np.asarray(good_days, float)
    f = np.asarray(grid_mhz, float)
    if good.ndim != 2 or good.shape[1] != f.size or good.shape[0] == 0:
        return None, NO_WINDOW_NOT_PREDICTED
    weakest = np.nan_to_num(good, nan=0.0).min(axis=0)
    ok = weakest >= target
    if not ok.any():
        return None, NO_WINDOW_NONE_REACHES
    best_run, best_width = None, -1.0
    i = 0
    while i < f.size:
        if not ok[i]:
            i += 1
            continue
        j = i
        while j + 1 < f.size and ok[j + 1]:
            j += 1
        lo = f[i] if i == 0 else _crossing(f[i - 1], f[i], weakest[i - 1], weakest[i], target)
        hi = f[j] if j == f.size - 1 else _crossing(f[j + 1], f[j], weakest[j + 1], weakest[j], target)
        if hi - lo > best_width:
            k = i + int(np.argmax(weakest[i:j + 1]))
            best_run, best_width = Window(float(lo), float(hi), float(f[k]), float(weakest[k])), hi - lo
        i = j + 1
    if best_width < MIN_WINDOW_MHZ:
        return None, NO_WINDOW_TOO_NARROW
    return best_run, None
