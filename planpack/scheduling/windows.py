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

#: Where no frequency reaches the target, the best the band offers: the run of frequencies whose
#: weakest link-hour comes within this fraction of days of the best one [0-1] (a design choice).
BEST_EFFORT_SPAN = 0.10
#: Below this fraction of days even the band's best frequency is no window [0-1] (a design choice).
MIN_BEST_GOOD_DAYS = 0.10

#: Why no window (or only a best-effort one) was found, in plain words, used in messages.
NO_WINDOW_NONE_REACHES = "no frequency on the band reaches the target on every one of them"
NO_WINDOW_HARDLY = "no frequency on the band works on as many as 1 day in 10 for every one of them"
NO_WINDOW_TOO_NARROW = "the frequencies that would serve them all span less than 100 kHz"
NO_WINDOW_SLIVER = "only a sliver of the band, under 100 kHz wide, reaches the target on every one of them"
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
    reaches_target : False for a best-effort window: no frequency reaches
        the target, and these are the frequencies that come closest.
    """

    low_mhz: float
    high_mhz: float
    best_mhz: float
    weakest_good_days: float
    reaches_target: bool = True

    @property
    def width_mhz(self) -> float:
        return self.high_mhz - self.low_mhz


def _crossing(f0: float, f1: float, g0: float, g1: float, target: float) -> float:
    """Frequency between f0 and f1 [MHz] where g crosses target, linear in log f."""
    if g1 == g0:
        return f1
    t = min(1.0, max(0.0, (target - g0) / (g1 - g0)))
    return float(np.exp(np.log(f0) + t * (np.log(f1) - np.log(f0))))


def _runs(ok: np.ndarray) -> list[tuple[int, int]]:
    """(first, last) index of each run of True."""
    out, i = [], 0
    while i < ok.size:
        if ok[i]:
            j = i
            while j + 1 < ok.size and ok[j + 1]:
                j += 1
            out.append((i, j))
            i = j + 1
        else:
            i += 1
    return out


def _edges(f, weakest, i, j, level) -> tuple[float, float]:
    lo = f[i] if i == 0 else _crossing(f[i - 1], f[i], weakest[i - 1], weakest[i], level)
    hi = f[j] if j == f.size - 1 else _crossing(f[j + 1], f[j], weakest[j + 1], weakest[j], level)
    return float(lo), float(hi)


def serving_window(good_days, grid_mhz, target: float, best_effort: bool = True) -> tuple[Window | None, str | None]:
    """The widest run of grid frequencies on which every row reaches ``target``.

    Where no frequency reaches it, or only a sliver under
    :data:`MIN_WINDOW_MHZ` does, and ``best_effort`` is set, the run around
    the band's best frequency whose weakest row comes within
    :data:`BEST_EFFORT_SPAN` of the best (``reaches_target`` False), with
    the reason why it falls short.

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
        :data:`MIN_WINDOW_MHZ` wide. A best-effort window comes with the
        reason it is only that.
    """
    good = np.asarray(good_days, float)
    f = np.asarray(grid_mhz, float)
    if good.ndim != 2 or good.shape[1] != f.size or good.shape[0] == 0:
        return None, NO_WINDOW_NOT_PREDICTED
    weakest = np.nan_to_num(good, nan=0.0).min(axis=0)
    ok = weakest >= target
    if not ok.any():
        top = float(weakest.max())
        if not best_effort or top < MIN_BEST_GOOD_DAYS:
            return None, (NO_WINDOW_NONE_REACHES if not best_effort else NO_WINDOW_HARDLY)
        return _closest(f, weakest, NO_WINDOW_NONE_REACHES)
    best_run, best_width = None, -1.0
    for i, j in _runs(ok):
        lo, hi = _edges(f, weakest, i, j, target)
        if hi - lo > best_width:
            k = i + int(np.argmax(weakest[i:j + 1]))
            best_run, best_width = Window(lo, hi, float(f[k]), float(weakest[k])), hi - lo
    if best_width < MIN_WINDOW_MHZ:
        # The target is met only at a point of the grid, where a channel would sit on a knife's edge:
        # offer the frequencies that come closest, as where none reaches it.
        return _closest(f, weakest, NO_WINDOW_SLIVER) if best_effort else (None, NO_WINDOW_TOO_NARROW)
    return best_run, None


def _closest(f: np.ndarray, weakest: np.ndarray, reason: str) -> tuple[Window | None, str]:
    """The best-effort window: the run around the best frequency within BEST_EFFORT_SPAN of it."""
    top = float(weakest.max())
    level = top - BEST_EFFORT_SPAN
    k = int(np.argmax(weakest))
    i, j = next((a, b) for a, b in _runs(weakest >= level) if a <= k <= b)
    lo, hi = _edges(f, weakest, i, j, level)
    if hi - lo < MIN_WINDOW_MHZ:
        return None, NO_WINDOW_TOO_NARROW
    return Window(lo, hi, float(f[k]), top, reaches_target=False), reason
