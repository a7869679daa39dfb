"""The net schedule: one channel the whole net shares at each UTC hour.

At each hour the best net channel is the one whose weakest link is strongest
(max over channels of min over links of good_days; links that no choice of
channel changes at that hour, such as one dead on every channel, are left
out of the minimum so that they do not make every channel look alike).
Taking that channel hour by hour flaps between channels whose weakest links
differ by a few per cent;
every change costs the net a QSY that some station misses. The schedule
therefore maximises, over the whole day,

    sum over hours of weakest_good_days(h, channel(h))
        - change_penalty * (number of changes of channel)

with a Viterbi dynamic programme over the 24 hours. A change only happens
where it buys more than ``change_penalty`` of weakest-link good days summed
over the hours it lasts.

The day is cyclic: predictions are monthly medians, so hour 23 is followed by
hour 0 of the same prediction, and a change at midnight is as real as any
other. The programme is solved exactly for the cycle by fixing the channel
at the first served hour to each candidate in turn and charging the wrap
from the last hour back to it.

References
----------
A. J. Viterbi, "Error bounds for convolutional codes and an asymptotically
optimum decoding algorithm", IEEE Trans. Information Theory 13 (2), 1967:
the max-sum recursion over a trellis used here, with channels as states and
hours as stages.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from . import _inputs
from .choices import GOOD_DAYS_RESOLUTION, MARGIN_RESOLUTION_DB, _quantise, _ranked

#: Default cost of one change of channel, in weakest-link good days × hours
#: (a design choice, no source). With 0.05 a one-hour excursion to another
#: channel and back (two changes) must gain more than 0.10 of days on the
#: weakest link, and a lasting change must gain more than 0.05 summed over
#: the hours it lasts: rounding-level differences never move the net.
DEFAULT_CHANGE_PENALTY = 0.05
_MAX_PENALTY = 48.0  # beyond this the total gain can never pay for a change
#: Above the plan's target a point of weakest-link good days counts this much of a point below it
#: (a design choice): a change of channel that only adds reliability the net already has must buy
#: four times as much to be worth a QSY some station will miss.
ABOVE_TARGET_WEIGHT_DIVISOR = 4
_MARGIN_CLIP_DB = 1e6  # keeps margin sums far from int64 overflow


@dataclass(frozen=True)
class NetSchedule:
    """One shared net channel per UTC hour.

    All sequences have 24 entries indexed by UTC hour.

    first : channel index chosen for the net, or None when no authorised
        channel serves any link at that hour.
    second : the best-ranked other authorised channel (the fallback), or None.
    weakest_good_days : the worst link's good_days on ``first`` [0–1], or None.
    best : the hour's best net channel on its own (no change penalty), or None.
    best_good_days : the worst link's good_days on ``best`` [0–1], or None;
        ``best_good_days - weakest_good_days`` is what the steadier schedule
        gives up at that hour.
    changes_per_day : changes of ``first`` over the day, counting the
        change at midnight when the day is cyclic. Hours with no channel are
        skipped: coming back to the same channel after them is no change.
    change_penalty : the penalty used [weakest-link good days × hours].
    cyclic : whether the day was treated as repeating.
    """

    first: tuple[int | None, ...]
    second: tuple[int | None, ...]
    weakest_good_days: tuple[float | None, ...]
    best: tuple[int | None, ...]
    best_good_days: tuple[float | None, ...]
    changes_per_day: int
    change_penalty: float
    cyclic: bool

    def to_dict(self) -> dict:
        return {
            "changes_per_day": self.changes_per_day,
            "change_penalty": self.change_penalty,
            "cyclic": self.cyclic,
            "hours": [
                {"utc_hour": h, "first": self.first[h], "second": self.second[h],
                 "weakest_good_days": self.weakest_good_days[h],
                 "best": self.best[h], "best_good_days": self.best_good_days[h]}
                for h in range(_inputs.HOURS)
            ],
        }


def net_channel_order(good_days, margin_db, allowed) -> np.ndarray:
    """Rank the channels for the whole net at each UTC hour, best first.

    Order: larger weakest-link good_days (min over the links the choice
    changes at that hour; see ``_deciding_weakest``), then larger mean
    good_days over links, then larger weakest-link margin, then plan order.
    A channel is a candidate when it is authorised at that hour and serves at
    least one link (good_days > 0 somewhere); others are -1 at the end.

    Parameters
    ----------
    good_days : array (links, 24, channels), fraction of good days [0–1]
    margin_db : array (links, 24, channels), SNR margin [dB]
    allowed : bool array (24, channels), authorised at that UTC hour

    Returns
    -------
    int array (24, channels) of channel indices, -1 for non-candidates.
    """
    ok, keys = _net_keys(good_days, margin_db, allowed)
    return _ranked(ok, *keys)


def net_schedule(good_days, margin_db, allowed, *,
                 change_penalty: float = DEFAULT_CHANGE_PENALTY,
                 cyclic: bool = True, target: float | None = None) -> NetSchedule:
    """Choose one net channel per UTC hour, trading strength against changes.

    Parameters
    ----------
    good_days : array (links, 24, channels), fraction of good days [0–1]
    margin_db : array (links, 24, channels), SNR margin [dB]; ±inf allowed
    allowed : bool array (24, channels), authorised at that UTC hour; a
        channel is never chosen (first or second) outside its hours.
    change_penalty : float, default 0.05
        Cost of one change of channel [weakest-link good days × hours], >= 0.
        0 gives the hour-by-hour best channel (ties resolved towards staying).
    cyclic : bool, default True
        Treat the day as repeating (count and penalise the change at
        midnight). False treats 00–23 UTC as one open stretch, for a net
        that runs a single day.
    target : float in (0, 1], optional
        The plan's target fraction of good days. When given, weakest-link
        good days above it count a quarter (:data:`ABOVE_TARGET_WEIGHT_DIVISOR`)
        in the trade against changes: the net moves to reach the target,
        and hardly to add to what already meets it.

    Returns
    -------
    NetSchedule

    Notes
    -----
    Objective, maximised exactly over all 24-hour channel sequences:
    sum_h min_links good_days - change_penalty × changes (the minimum over
    the links the choice changes at that hour), ties broken by the
    summed mean good_days over links less the same penalty per change (this
    decides hours where some link is dead on every channel), then the summed
    weakest-link margin, then fewer changes, then plan order. Values are
    compared as integers (good days to 1e-9, margin to 1e-6 dB) so the
    result is exact and identical on every machine.
    """
    if not isinstance(cyclic, bool):
        raise _inputs.ScheduleInputError(f"cyclic: expected True or False; got {cyclic!r}")
    penalty = _inputs.non_negative("change_penalty", change_penalty)
    ok, keys = _net_keys(good_days, margin_db, allowed)
    order = _ranked(ok, *keys)
    weakest = np.asarray(good_days, dtype=float).min(axis=0)

    served = [h for h in range(_inputs.HOURS) if ok[h].any()]
    trade = list(keys)
    if target is not None:
        t = _quantise(np.float64(_inputs.fraction("target", target, open_low=True)), GOOD_DAYS_RESOLUTION)
        w = keys[0]
        trade[0] = np.minimum(w, t) + np.maximum(w - t, 0) // ABOVE_TARGET_WEIGHT_DIVISOR
    path = _viterbi(ok[served], [k[served] for k in trade],
                    _quantise(np.float64(min(penalty, _MAX_PENALTY)), GOOD_DAYS_RESOLUTION),
                    cyclic) if served else []
    first: list[int | None] = [None] * _inputs.HOURS
    for h, k in zip(served, path):
        first[h] = k
    changes = sum(1 for a, b in zip(path, path[1:]) if a != b)
    if cyclic and len(path) > 1 and path[-1] != path[0]:
        changes += 1

    second = []
    for h in range(_inputs.HOURS):
        others = [int(k) for k in order[h] if k >= 0 and k != first[h]]
        second.append(others[0] if others else None)
    best = [None if order[h, 0] < 0 else int(order[h, 0]) for h in range(_inputs.HOURS)]

    def weak(h: int, k: int | None) -> float | None:
        return None if k is None else float(weakest[h, k])

    return NetSchedule(
        first=tuple(first), second=tuple(second),
        weakest_good_days=tuple(weak(h, first[h]) for h in range(_inputs.HOURS)),
        best=tuple(best),
        best_good_days=tuple(weak(h, best[h]) for h in range(_inputs.HOURS)),
        changes_per_day=changes, change_penalty=penalty, cyclic=cyclic)


def _net_keys(good_days, margin_db, allowed):
    good = _inputs.link_cube("good_days", good_days, unit_interval=True)
    margin = _inputs.link_cube("margin_db", margin_db, allow_inf=True)
    _inputs.same_shape("margin_db", margin, "good_days", good)
    if good.shape[0] == 0:
        raise _inputs.ScheduleInputError(
            "good_days: expected at least one link for a net schedule; got shape "
            f"{good.shape}")
    ok = _inputs.allowed_mask(allowed, good.shape[2]) & (good.max(axis=0) > 0)
    q = _quantise(good, GOOD_DAYS_RESOLUTION)
    keys = (_deciding_weakest(q, ok),
            _quantise(good.mean(axis=0), GOOD_DAYS_RESOLUTION),
            _quantise(np.clip(margin.min(axis=0), -_MARGIN_CLIP_DB, _MARGIN_CLIP_DB),
                      MARGIN_RESOLUTION_DB))
    return ok, keys


def _deciding_weakest(q: np.ndarray, ok: np.ndarray) -> np.ndarray:
    """Weakest-link good_days per hour and channel, over the links the choice
    of channel can change.

    A link with the same good_days on every candidate channel at an hour
    (typically one that no channel reaches at all, good_days 0) would make
    every channel tie at its value and hide the difference the choice makes
    to everyone else. Leaving such links out of the minimum never reverses
    the plain maximin order (if min(v, a) > min(v, b) then a > b); it only
    decides between channels the plain minimum calls equal. Hours where no
    link is affected keep the plain minimum.

    q : int64 (links, 24, channels), quantised good_days; ok : bool (24, channels).
    Returns int64 (24, channels).
    """
    big = np.iinfo(np.int64).max
    hi = np.where(ok[None], q, -1).max(axis=2, keepdims=True)
    lo = np.where(ok[None], q, big).min(axis=2, keepdims=True)
    decides = hi > lo                                       # (links, 24, 1)
    some = decides.any(axis=0)                              # (24, 1)
    masked = np.where(decides | ~some[None], q, big)
    return masked.min(axis=0)


def _viterbi(ok: np.ndarray, scores: list[np.ndarray], penalty: np.int64,
             cyclic: bool) -> list[int]:
    """Best channel path over the served hours.

    Paths are compared lexicographically on (feasible, primary score -
    penalty·changes, secondary score - penalty·changes, the further scores
    in turn, -changes); equal paths go to the lowest channel indices.
    ok : bool (m, c); scores : int64 arrays (m, c), most significant first
    (at least two).

    For a cyclic day one run is made per channel fixed at the first served
    hour (row r of the state arrays), and the wrap back to it is charged at
    the end: exact, at c times the cost of an open day.
    """
    m, c = ok.shape
    scores = list(scores) + [np.zeros((m, c), dtype=np.int64)]  # -changes key
    # A change costs the penalty on both good-days keys (weakest and mean),
    # so neither can buy a change the other would not; 1 on the change count.
    cost = ([np.int64(penalty)] * 2 + [np.int64(0)] * (len(scores) - 3) + [np.int64(1)])
    rows = c if cyclic else 1
    r = np.arange(rows)
    feasible = np.broadcast_to(ok[0], (rows, c)).copy()
    if cyclic:
        feasible &= np.eye(c, dtype=bool)
    value = [np.broadcast_to(s[0], (rows, c)).astype(np.int64) for s in scores]
    back = np.zeros((m, rows, c), dtype=np.int64)
    for t in range(1, m):
        # The best predecessor for a change is the same for every next
        # channel; compare it, charged for the change, with staying put.
        p = _lex_argmax([feasible] + value)
        change = [feasible[r, p][:, None]] + [(v[r, p] - k)[:, None]
                                               for v, k in zip(value, cost)]
        keep = _lex_ge([feasible] + value, change)
        back[t] = np.where(keep, np.arange(c)[None, :], p[:, None])
        feasible = np.where(keep, feasible, change[0]) & ok[t][None, :]
        value = [np.where(keep, v, ch) + s[t][None, :]
                 for v, ch, s in zip(value, change[1:], scores)]
    if cyclic:
        wrapped = np.arange(c)[None, :] != r[:, None]
        value = [v - k * wrapped for v, k in zip(value, cost)]
    flat = int(_lex_argmax([x.reshape(1, -1) for x in [feasible] + value])[0])
    row, state = divmod(flat, c)
    path = [state]
    for t in range(m - 1, 0, -1):
        state = int(back[t, row, state])
        path.append(state)
    return path[::-1]


def _lex_argmax(keys: list[np.ndarray]) -> np.ndarray:
    """Per row, the column with the lexicographically largest keys (most
    significant first); ties go to the lowest column."""
    col = np.broadcast_to(np.arange(keys[0].shape[1]), keys[0].shape)
    sort_keys = [col] + [-k.astype(np.int64) for k in reversed(keys)]
    return np.lexsort(sort_keys, axis=1)[:, 0]


def _lex_ge(a: list[np.ndarray], b: list[np.ndarray]) -> np.ndarray:
    """Elementwise: is tuple a >= tuple b, comparing keys most significant first."""
    ge = np.zeros(np.broadcast_shapes(a[0].shape, b[0].shape), dtype=bool)
    decided = np.zeros_like(ge)
    for x, y in zip(a, b):
        x = x.astype(np.int64)
        y = y.astype(np.int64)
        ge |= ~decided & (x > y)
        decided |= x != y
    return ge | ~decided
