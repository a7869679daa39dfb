"""Gaps: hours where no authorised channel carries the whole net to target.

A gap is the request a planner sends to the spectrum manager before the
exercise: these links, these hours, a channel between these frequencies.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from . import _inputs
from .hours import cyclic_runs
from .net import net_channel_order
from .windows import Window, serving_window

#: Default target: fraction of days the weakest link must work (plan default).
DEFAULT_TARGET = 0.9

#: Reasons, most easily remedied first.
NOT_AUTHORISED = "not_authorised"  # an assigned channel would serve, outside its authorised hours
UNSERVED = "unserved"              # some links have no authorised channel reaching the target
SPLIT = "split"                    # every link has a channel, but no single channel serves all


@dataclass(frozen=True)
class Gap:
    """A run of consecutive UTC hours (cyclic) in which the net misses its target.

    links : link indices affected, ascending. For ``unserved``, the links no
        authorised channel serves to target; for ``split`` and
        ``not_authorised``, the links below target on the hour's best
        authorised net channel (all links if none is authorised).
    utc_hours : the UTC hours [h], consecutive, possibly across midnight.
    reason : ``"not_authorised"``, ``"unserved"`` or ``"split"`` (see module).
    window_mhz : (low, high) [MHz], the frequencies that would serve the
        affected links at those hours: low = max LUF, high = min OWF over the
        affected link-hours. None when that window is empty or undefined
        (a NaN LUF/OWF): no single frequency would serve them all.
    single_frequency : window_mhz is not None.
    net_window_mhz : (low, high) [MHz] over every link of the net at those
        hours: where a new channel must lie to be the net's shared channel;
        None when empty.
    channels_outside_hours : assigned channels that would reach the target
        on every link at some of these hours but are not authorised then
        (non-empty only for ``not_authorised``).
    links_by_hour : for each entry of ``utc_hours``, the links affected in
        that hour (``links`` is their union).
    window_by_hour_mhz : for each entry of ``utc_hours``, the window
        (low, high) [MHz] for that hour's affected links, or None: when the
        whole-run window is empty these show where a request could be cut
        into a few parts.
    no_window_reason : why ``window_mhz`` is None, or only a best-effort
        window, in plain words (None when a window reaches the target).
    window_good_days : the fraction of days [0-1] the window's best frequency
        works on the weakest affected link-hour (None without a window).
    window_reaches_target : False for a best-effort window: the frequencies
        that come closest where none reaches the target.
    """

    links: tuple[int, ...]
    utc_hours: tuple[int, ...]
    reason: str
    window_mhz: tuple[float, float] | None
    single_frequency: bool
    net_window_mhz: tuple[float, float] | None
    channels_outside_hours: tuple[int, ...]
    links_by_hour: tuple[tuple[int, ...], ...]
    window_by_hour_mhz: tuple[tuple[float, float] | None, ...]
    no_window_reason: str | None = None
    window_good_days: float | None = None
    window_reaches_target: bool = False

    def to_dict(self) -> dict:
        return {
            "links": list(self.links),
            "utc_hours": list(self.utc_hours),
            "reason": self.reason,
            "window_mhz": None if self.window_mhz is None else list(self.window_mhz),
            "single_frequency": self.single_frequency,
            "net_window_mhz": None if self.net_window_mhz is None else list(self.net_window_mhz),
            "channels_outside_hours": list(self.channels_outside_hours),
            "links_by_hour": [list(x) for x in self.links_by_hour],
            "window_by_hour_mhz": [None if w is None else list(w)
                                   for w in self.window_by_hour_mhz],
            "no_window_reason": self.no_window_reason,
            "window_good_days": self.window_good_days,
            "window_reaches_target": self.window_reaches_target,
        }


def find_gaps(good_days, allowed, luf_mhz, owf_mhz, *, target: float = DEFAULT_TARGET,
              margin_db=None, grid_good_days=None, grid_mhz=None, channel_mhz=None) -> tuple[Gap, ...]:
    """Find the hours where no authorised channel reaches the target on the
    weakest link, grouped into runs with the frequency window that would
    close each.

    Parameters
    ----------
    good_days : array (links, 24, channels), fraction of good days [0–1]
    allowed : bool array (24, channels), authorised at that UTC hour
    luf_mhz : array (links, 24), lowest usable frequency [MHz]; NaN where the
        physics finds no usable frequency
    owf_mhz : array (links, 24), optimum working frequency [MHz]; NaN likewise
    target : float in (0, 1], default 0.9
        Fraction of days the weakest link must work.
    margin_db : array (links, 24, channels) [dB], optional
        Only breaks ties when picking the hour's best net channel (as in
        :func:`net_channel_order`); zeros if omitted.
    grid_good_days : array (links, 24, g), optional
        Fraction of good days on the band grid ``grid_mhz`` [0-1], with each
        station's own antennas. When given, every window is where the
        affected link-hours reach ``target`` on the grid
        (:func:`planpack.scheduling.windows.serving_window`); otherwise
        [max LUF, min OWF].
    grid_mhz : array (g,), the band grid [MHz], ascending; with ``grid_good_days``.
    channel_mhz : array (channels,), optional
        The channels' frequencies [MHz]. Where no frequency reaches the
        target and an assigned channel already lies where the band does best,
        a run of gap hours is one gap (more channels would not help), not
        cut into one request per part.

    Returns
    -------
    tuple of Gap, sorted by first UTC hour.
        Consecutive gap hours with the same reason form one gap; a run across
        midnight is one gap (e.g. hours 22, 23, 0, 1).
    """
    good = _inputs.link_cube("good_days", good_days, unit_interval=True)
    n, _, c = good.shape
    ok = _inputs.allowed_mask(allowed, c)
    luf = _inputs.link_hours("luf_mhz", luf_mhz, n, allow_nan=True)
    owf = _inputs.link_hours("owf_mhz", owf_mhz, n, allow_nan=True)
    goal = _inputs.fraction("target", target, open_low=True)
    if n == 0:
        return ()
    margin = np.zeros_like(good) if margin_db is None else margin_db
    order = net_channel_order(good, margin, ok)

    reaches = good >= goal                          # (n, 24, c)
    serves_net = reaches.all(axis=0)                # (24, c): every link to target
    reasons: list[str | None] = [None] * _inputs.HOURS
    affected = np.zeros((n, _inputs.HOURS), dtype=bool)
    outside = np.zeros((_inputs.HOURS, c), dtype=bool)
    for h in range(_inputs.HOURS):
        if (serves_net[h] & ok[h]).any():
            continue
        unserved = ~(reaches[:, h, :] & ok[h][None, :]).any(axis=1)
        best = order[h, 0]
        below_best = np.ones(n, dtype=bool) if best < 0 else ~reaches[:, h, best]
        outside[h] = serves_net[h] & ~ok[h]
        if outside[h].any():
            reasons[h], affected[:, h] = NOT_AUTHORISED, below_best
        elif unserved.any():
            reasons[h], affected[:, h] = UNSERVED, unserved
        else:
            reasons[h], affected[:, h] = SPLIT, below_best

    if grid_good_days is not None:
        grid = np.asarray(grid_good_days, float)
        fg = np.asarray(grid_mhz, float)
        if grid.shape[:2] != (n, _inputs.HOURS) or fg.ndim != 1 or grid.shape[2] != fg.size:
            raise _inputs.ScheduleInputError(
                f"grid_good_days: expected shape ({n}, 24, {np.size(fg)}); got {grid.shape}")

        def window(mask: np.ndarray, hours) -> tuple[Window | None, str | None]:
            return serving_window(grid[:, hours, :][mask], fg, goal)

        def weakest_at(hour: int, freq_mhz: float) -> float:
            """The affected link-hour's weakest fraction of days at the grid frequency ``freq_mhz``."""
            k = int(np.argmin(np.abs(fg - freq_mhz)))
            rows = grid[affected[:, hour], hour, k]
            return float(rows.min()) if rows.size else 1.0
    else:
        def window(mask: np.ndarray, hours) -> tuple[Window | None, str | None]:
            w = _window(luf[:, hours][mask], owf[:, hours][mask])
            if w is None:
                return None, "the LUF lies above the OWF on some of them"
            return Window(w[0], w[1], float(np.sqrt(w[0] * w[1])), goal), None

    chan_mhz = None if channel_mhz is None else np.asarray(channel_mhz, float).ravel()

    def span(w: Window | None):
        return None if w is None else (w.low_mhz, w.high_mhz)

    gaps = []
    for reason, run in cyclic_runs(reasons):
        for hours in (_parts(run, reason, affected, window, weakest_at, chan_mhz, ok)
                      if grid_good_days is not None else [run]):
            pairs = affected[:, hours]
            links = tuple(int(i) for i in np.flatnonzero(pairs.any(axis=1)))
            win, why = window(pairs, hours)
            every = np.ones((n, len(hours)), dtype=bool)
            gaps.append(Gap(
                links=links, utc_hours=tuple(hours), reason=str(reason),
                window_mhz=span(win), single_frequency=win is not None,
                net_window_mhz=span(window(every, hours)[0]),
                channels_outside_hours=tuple(int(k) for k in np.flatnonzero(
                    outside[hours].any(axis=0))),
                links_by_hour=tuple(tuple(int(i) for i in np.flatnonzero(affected[:, h]))
                                    for h in hours),
                window_by_hour_mhz=tuple(span(window(affected[:, [h]], [h])[0]) for h in hours),
                no_window_reason=why,
                window_good_days=None if win is None else win.weakest_good_days,
                window_reaches_target=bool(win is not None and win.reaches_target)))
    return tuple(gaps)


#: Hours join one request while a shared frequency does within this fraction of days of what each
#: part would get alone [0-1] (a design choice: a planner prefers one channel to two nearly as good).
JOIN_TOLERANCE = 0.05


def _parts(run: list[int], reason, affected, window, weakest_at, channel_mhz=None, ok=None) -> list[list[int]]:
    """Cut a run of gap hours into parts that one frequency serves: one request each.

    A run whose whole window reaches the target stays whole. Otherwise
    consecutive hours join while the window of the joined hours reaches the
    target, or (where nothing does) while its best frequency does, at every
    hour of the part, within :data:`JOIN_TOLERANCE` of what that hour's own
    best frequency would: a night that needs an evening and a pre-dawn
    channel becomes two requests.
    """
    if reason == NOT_AUTHORISED or len(run) < 2:
        return [run]
    whole, _ = window(affected[:, run], run)
    if whole is not None and whole.reaches_target:
        return [run]
    if whole is not None and channel_mhz is not None:
        inside = (channel_mhz >= whole.low_mhz) & (channel_mhz <= whole.high_mhz) & ok[run].all(axis=0)
        if inside.any():
            return [run]      # the band's best is already assigned: power or antennas, not requests
    own = {h: window(affected[:, [h]], [h])[0] for h in run}

    def fits(hours: list[int]) -> bool:
        w, _ = window(affected[:, hours], hours)
        if w is None:
            return all(own[h] is None for h in hours)
        if w.reaches_target:
            return True
        return all(own[h] is not None and weakest_at(h, w.best_mhz) >= own[h].weakest_good_days - JOIN_TOLERANCE
                   for h in hours)

    parts = [[run[0]]]
    for h in run[1:]:
        if fits(parts[-1] + [h]):
            parts[-1].append(h)
        else:
            parts.append([h])
    return parts


def frequency_window(luf_mhz, owf_mhz) -> tuple[float, float] | None:
    """The frequencies usable on every given link-hour: [max LUF, min OWF].

    Parameters
    ----------
    luf_mhz, owf_mhz : arrays of the same shape [MHz]

    Returns
    -------
    (low, high) [MHz], or None when low >= high, when the arrays are empty,
    or when any value is NaN (no usable frequency known there).

    Notes
    -----
    The OWF (lower decile of the MUF, ITU-R P.373) is used as the top rather
    than the MUF so that the window holds on nine days in ten at the top end;
    at the LUF end the margin is only just zero, so a channel right at the
    low edge still works on fewer days than one in the middle.
    """
    luf = np.asarray(luf_mhz, dtype=float).ravel()
    owf = np.asarray(owf_mhz, dtype=float).ravel()
    if luf.shape != owf.shape:
        raise _inputs.ScheduleInputError(
            f"owf_mhz: expected the shape of luf_mhz {luf.shape}; got {owf.shape}")
    return _window(luf, owf)


def _window(luf: np.ndarray, owf: np.ndarray) -> tuple[float, float] | None:
    if luf.size == 0 or np.isnan(luf).any() or np.isnan(owf).any():
        return None
    low, high = float(luf.max()), float(owf.min())
    return (low, high) if low < high else None
