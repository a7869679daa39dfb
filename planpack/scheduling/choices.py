"""First and second choice of channel for each link at each UTC hour."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from . import _inputs

#: Margins are compared at this resolution [dB], so that rounding noise in the
#: physics never decides between two channels (ties then go to plan order).
MARGIN_RESOLUTION_DB = 1e-6
#: Fractions of good days are compared at this resolution.
GOOD_DAYS_RESOLUTION = 1e-9


def rank_channels(good_days, margin_db, allowed) -> np.ndarray:
    """Rank every channel for each link and hour, best first.

    Order: more good days first, then larger margin, then plan order (lower
    channel index). The sort is stable and exact (values are compared after
    rounding to ``GOOD_DAYS_RESOLUTION`` and ``MARGIN_RESOLUTION_DB``), so
    the same arrays always give the same ranking.

    Parameters
    ----------
    good_days : array (links, 24, channels)
        Fraction of days the channel works on the link at that UTC hour [0–1].
    margin_db : array (links, 24, channels)
        Median SNR margin over the required SNR [dB]; ±inf allowed.
    allowed : bool array (24, channels)
        The channel is authorised at that UTC hour.

    Returns
    -------
    int array (links, 24, channels)
        Channel indices in rank order. Channels that can never be a choice
        (not authorised at that hour, or no good days) are replaced by -1 and
        sit at the end.
    """
    good = _inputs.link_cube("good_days", good_days, unit_interval=True)
    margin = _inputs.link_cube("margin_db", margin_db, allow_inf=True)
    _inputs.same_shape("margin_db", margin, "good_days", good)
    ok = _inputs.allowed_mask(allowed, good.shape[2])[None, :, :] & (good > 0)
    return _ranked(ok, _quantise(good, GOOD_DAYS_RESOLUTION),
                   _quantise(margin, MARGIN_RESOLUTION_DB))


@dataclass(frozen=True)
class LinkChoices:
    """First and second choice per link and UTC hour.

    ``first[link][utc_hour]`` and ``second[link][utc_hour]`` are channel
    indices in plan order, or None when no (second) channel qualifies.
    """

    first: tuple[tuple[int | None, ...], ...]
    second: tuple[tuple[int | None, ...], ...]

    def to_dict(self) -> dict:
        return {"first": [list(row) for row in self.first],
                "second": [list(row) for row in self.second]}


def link_choices(good_days, margin_db, allowed) -> LinkChoices:
    """First and second choice of channel for each link at each UTC hour.

    Ranked as in :func:`rank_channels`. A channel that is not authorised at
    that hour, or has no good days (good_days == 0), is never a choice.

    Parameters
    ----------
    good_days : array (links, 24, channels), fraction of good days [0–1]
    margin_db : array (links, 24, channels), SNR margin [dB]
    allowed : bool array (24, channels), authorised at that UTC hour

    Returns
    -------
    LinkChoices
        ``first`` and ``second``: per link, 24 channel indices or None.
    """
    order = rank_channels(good_days, margin_db, allowed)
    second = order[..., 1] if order.shape[2] > 1 else np.full(order.shape[:2], -1)
    return LinkChoices(first=_rows(order[..., 0]), second=_rows(second))


def _ranked(ok: np.ndarray, *keys_desc: np.ndarray) -> np.ndarray:
    """Indices along the last axis sorted by ok, then each key descending,
    then index ascending; entries that are not ok become -1."""
    shape = np.broadcast_shapes(ok.shape, *(k.shape for k in keys_desc))
    index = np.broadcast_to(np.arange(shape[-1]), shape)
    # np.lexsort sorts by the last key first.
    sort_keys = [index] + [np.broadcast_to(-k, shape) for k in reversed(keys_desc)]
    sort_keys.append(np.broadcast_to(~ok, shape))
    order = np.lexsort(sort_keys, axis=-1)
    return np.where(np.take_along_axis(np.broadcast_to(ok, shape), order, axis=-1), order, -1)


def _quantise(x: np.ndarray, step: float) -> np.ndarray:
    """Round to integer multiples of ``step``; ±inf become the int64 extremes."""
    big = 2.0 ** 62
    return np.clip(np.round(x / step), -big, big).astype(np.int64)


def _rows(idx: np.ndarray) -> tuple[tuple[int | None, ...], ...]:
    return tuple(tuple(None if k < 0 else int(k) for k in row) for row in idx)
