"""The one place the request optimiser asks the link budget about frequencies not yet assigned.

:func:`candidate_good_days` is the swap point: everything else in
:mod:`planpack.requests` sees only its (links, 24, k) array of fractions of
good days. Today it runs the same machinery as :func:`planpack.predictions.predict_links`
(both directions, every month and solar level, worst case kept) on a channel
set made of the candidates, with each station's gains read at each candidate
from its antennas solved across the band (``gain_table_at``: feed impedance
and pattern interpolated between solved frequencies, the matching and
feedline losses computed at the exact frequency).
"""

from __future__ import annotations

import numpy as np

from planpack import localtime
from planpack.ionosphere import ChannelSet, predict_month
from planpack.plan.models import Plan
from planpack.predictions import link_set, ssn_levels

#: Upper bound on the predictions one call returns [bytes]: both directions of each link, 24 hours,
#: every candidate, in the five per-cell arrays of a month's prediction (about 14 bytes a cell).
_CHUNK_BYTES = 96e6


class _CandidateGains:
    """A station set-up whose gain tables are read at the candidate frequencies (the band-wide solutions)."""

    def __init__(self, setup, freqs_khz: np.ndarray) -> None:
        self._setup = setup
        self._freqs = np.asarray(freqs_khz, float)
        self._cache: dict[str, np.ndarray] = {}

    def gain_table(self, station) -> np.ndarray:
        """(k, 91) gain [dBi] from the set's output at elevations 0..90 deg, per candidate."""
        if station.id not in self._cache:
            self._cache[station.id] = np.asarray(self._setup.gain_table_at(station, self._freqs), np.float32)
        return self._cache[station.id]

    def grid_gain_table(self, station) -> np.ndarray:
        return self._setup.grid_gain_table(station)

    def ground_gain(self, station) -> np.ndarray:
        """(k,) gain [dBi] credited to the ground wave, per candidate."""
        key = f"ground:{station.id}"
        if key not in self._cache:
            self._cache[key] = np.asarray(self._setup.ground_gain_at(station, self._freqs), np.float32)
        return self._cache[key]

    def grid_ground_gain(self, station) -> np.ndarray:
        return self._setup.grid_ground_gain(station)

    def vertical(self, station, kinds) -> bool:
        return self._setup.vertical(station, kinds)


def links_per_call(k: int) -> int:
    """Links predicted together for k candidates: what one call returns stays under _CHUNK_BYTES.

    Callers that hand over links in blocks of this size (or a multiple) avoid a short last call, each
    call costing a fixed share (the ionospheric maps are read once per call).
    """
    per_link = 2 * 24 * max(int(k), 1) * 14  # both directions, 24 hours, five arrays per cell
    return max(1, int(_CHUNK_BYTES // per_link))


def candidate_channels(plan: Plan, freqs_khz, mode: str) -> ChannelSet:
    """The link budget's channel set for candidate frequencies [kHz] in one mode."""
    f = np.asarray(freqs_khz, float)
    m = plan.modes[mode]
    return ChannelSet(freq_mhz=f / 1000.0, required_snr_db=np.full(f.size, m.snr_db),
                      bandwidth_hz=np.full(f.size, m.bandwidth_hz))


def candidate_good_days(plan: Plan, setup, link_indices, freqs_khz, mode: str | None = None) -> np.ndarray:
    """Worst-case fraction of good days of candidate frequencies for some of the plan's links.

    Parameters
    ----------
    plan : Plan
        The plan: stations, links, months (validity period) and solar levels.
    setup : StationAntennas
        Each station's solved antennas and matching.
    link_indices : sequence of int, shape (L,)
        Indices into ``plan.links``.
    freqs_khz : array_like, shape (k,)
        Candidate frequencies [kHz], 1500..30000.
    mode : str, optional
        Mode of the new channels (its required SNR and bandwidth); default
        the plan's request mode.

    Returns
    -------
    ndarray, float32, shape (L, 24, k)
        Fraction of good days [0-1] for each link, UTC hour and candidate:
        the worst over the plan's months and solar levels and over both
        directions of the link, as :func:`planpack.predictions.predict_links`
        folds the assigned channels.
    """
    idx = [int(i) for i in link_indices]
    f = np.asarray(freqs_khz, float)
    out = np.ones((len(idx), 24, f.size), np.float32)
    if not idx or not f.size:
        return out
    cs = candidate_channels(plan, f, mode or plan.request.mode_for(plan))
    gains = _CandidateGains(setup, f)
    scenarios = [(y, m, s) for y, m in localtime.months_touched(plan.net.valid_from, plan.net.valid_to)
                 for s in ssn_levels(plan)]
    step = links_per_call(f.size)
    for a in range(0, len(idx), step):
        part = [plan.links[i] for i in idx[a:a + step]]
        n = len(part)
        ls = link_set(plan, gains, part + [(b, a_) for a_, b in part])
        block = out[a:a + n]
        for year, month, ssn in scenarios:
            g = predict_month(ls, cs, year, month, ssn).good_days
            np.minimum(block, g[:n], out=block)   # the weaker direction counts
            np.minimum(block, g[n:], out=block)   # and the worse month and solar level
    return out
