"""ALE scan lists per station and the 2G scanning-call time they imply.

A station's scan list holds the channels that serve some link of that station
at some hour. Every channel on the list costs every caller time: in 2G ALE
(MIL-STD-188-141, appendix A) a called station scans its list, so a caller
must keep calling on one channel for at least one full scan of the called
station's list before the called station is sure to land there.

Timing, from memory (MIL-STD-188-141 appendix A, not checked against the
text here):

- the ALE waveform is 8-ary FSK at 125 symbols/s: 8 ms per symbol, 3 bits;
- an ALE word is 24 bits, Golay (24,12) coded to 48 bits plus one stuff bit
  = 49 bits, sent three times (redundancy) = 147 bits = 49 symbols, so a
  redundant word lasts T_rw = 49 × 8 ms = 392 ms;
- an address is packed 3 characters to a word (up to 15 characters);
- the call is a scanning call (the called address repeated for at least one
  scan period of the called station) followed by a leading call (the called
  address again and the caller's address).

Formula used here (units: seconds):

    T_scan = N / R                          N channels, R scan rate [channels/s]
    T_sc   = ceil(T_scan / (A·T_rw)) · A·T_rw   whole repetitions of an A-word address
    T_lc   = L · T_rw                       L leading-call words (default 2·A + 1)
    T_call = T_sc + T_lc
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from . import _inputs

SYMBOL_S = 0.008                    #: 8-FSK symbol at 125 baud [s] (from memory)
BITS_PER_SYMBOL = 3                 #: 8 tones carry 3 bits (from memory)
CODED_WORD_BITS = 49                #: 24-bit word, Golay to 48 bits + 1 stuff bit (from memory)
WORD_REPEATS = 3                    #: triple redundancy (from memory)
#: Redundant word time T_rw [s]: 49 bits × 3 / 3 bits per symbol × 8 ms = 0.392 s.
REDUNDANT_WORD_S = CODED_WORD_BITS * WORD_REPEATS / BITS_PER_SYMBOL * SYMBOL_S
CHARACTERS_PER_WORD = 3             #: (from memory)
MAX_ADDRESS_CHARACTERS = 15         #: longest basic 2G address (from memory)

#: A channel serves a link at an hour when it works on at least this fraction
#: of days: more days than not, the monthly-median sense of "works"
#: (a design choice, no source). Below it, an ALE sound or call on that
#: channel fails more often than it succeeds and scanning it is mostly lost time.
DEFAULT_USEFUL_GOOD_DAYS = 0.5

#: A day/night split is suggested when the larger group's scan period is at
#: most this fraction of the full list's. The criterion is on the scan period
#: (N / R), the part of the call the list decides: the leading call is the
#: same whatever the list, so no split could ever halve the whole call time
#: (each group has at least half the channels, and 2·(N/2R + T_lc) > N/R + T_lc).
#: Both call times are reported so the planner sees the real saving.
SPLIT_GAIN = 0.5

FORMULA = ("T_call = ceil((N / R) / (A * T_rw)) * A * T_rw + L * T_rw; "
           "N channels, R scan rate [channels/s], A address words, "
           "L leading-call words, T_rw = 0.392 s (MIL-STD-188-141 app. A, from memory)")


def address_words(address: str) -> int:
    """Number of ALE words a 2G address takes: ceil(characters / 3).

    Parameters
    ----------
    address : str, 1–15 characters (from memory: 3 characters per word, at
        most 15 characters for a basic address).
    """
    if not isinstance(address, str) or not 1 <= len(address) <= MAX_ADDRESS_CHARACTERS:
        raise _inputs.ScheduleInputError(
            f"address: expected 1–{MAX_ADDRESS_CHARACTERS} characters; got {address!r}")
    return math.ceil(len(address) / CHARACTERS_PER_WORD)


@dataclass(frozen=True)
class CallTime:
    """2G scanning-call time for a scan list (see module formula).

    channels : N, channels on the list
    scan_period_s : T_scan = N / R [s]
    scanning_call_s : T_sc [s]
    leading_call_s : T_lc [s]
    total_s : T_call = T_sc + T_lc [s]
    """

    channels: int
    scan_period_s: float
    scanning_call_s: float
    leading_call_s: float
    total_s: float

    def to_dict(self) -> dict:
        return {"channels": self.channels, "scan_period_s": self.scan_period_s,
                "scanning_call_s": self.scanning_call_s,
                "leading_call_s": self.leading_call_s, "total_s": self.total_s}


def scanning_call_time(n_channels: int, scan_rate_chps: float, *, address_word_count: int = 1,
                       leading_call_words: int | None = None) -> CallTime:
    """Time a caller needs to reach a station that scans ``n_channels``.

    Parameters
    ----------
    n_channels : int >= 1, channels on the called station's scan list
    scan_rate_chps : float > 0, its scan rate [channels/s]
    address_word_count : int >= 1, words in the called station's address
        (see :func:`address_words`); default 1 (up to 3 characters)
    leading_call_words : int >= 1, optional
        Redundant words in the leading call; default 2·A + 1 (the called
        address twice and a one-word caller address; from memory).

    Returns
    -------
    CallTime [s]

    References
    ----------
    MIL-STD-188-141 appendix A (2G ALE): scanning call at least one scan
    period of the called station, then the leading call. Values from memory.
    """
    n = _inputs.count("n_channels", n_channels)
    rate = _inputs.positive("scan_rate_chps", scan_rate_chps)
    words = _inputs.count("address_word_count", address_word_count)
    lead = 2 * words + 1 if leading_call_words is None else _inputs.count(
        "leading_call_words", leading_call_words)
    scan_period = n / rate
    repetition = words * REDUNDANT_WORD_S
    # Round the repetition count to 9 digits first so that a scan period that
    # is an exact multiple of the repetition (in decimal) does not gain one.
    scanning = math.ceil(round(scan_period / repetition, 9)) * repetition
    leading = lead * REDUNDANT_WORD_S
    # Reported to the microsecond: finer digits are float noise, not timing.
    return CallTime(channels=n, scan_period_s=round(scan_period, 6),
                    scanning_call_s=round(scanning, 6), leading_call_s=round(leading, 6),
                    total_s=round(scanning + leading, 6))


@dataclass(frozen=True)
class ScanGroup:
    """One scan group of a day/night split.

    name : "day" or "night"
    channels : channel indices, plan order
    utc_hours : UTC hours [h] in which this group is loaded
    call : CallTime for this group, or None if the group is empty
    """

    name: str
    channels: tuple[int, ...]
    utc_hours: tuple[int, ...]
    call: CallTime | None

    def to_dict(self) -> dict:
        return {"name": self.name, "channels": list(self.channels),
                "utc_hours": list(self.utc_hours),
                "call": None if self.call is None else self.call.to_dict()}


@dataclass(frozen=True)
class ScanSplit:
    """A day group and a night group; ``suggested`` when the larger group's
    scan period is at most half the full list's (``SPLIT_GAIN``; see there
    why the criterion is on the scan period, not the whole call)."""

    suggested: bool
    day: ScanGroup
    night: ScanGroup

    def to_dict(self) -> dict:
        return {"suggested": self.suggested, "day": self.day.to_dict(),
                "night": self.night.to_dict()}


@dataclass(frozen=True)
class StationScanList:
    """The scan list of one station.

    station : station index (order of ``station_links``)
    channels : channels that serve some link of the station at some
        authorised hour, in plan order
    hours_served : for each entry of ``channels``, the UTC hours it serves
    wasted : channels that serve no link of the station: loading them would be
        wasted scan time
    call : CallTime of the full list, or None if the list is empty
    split : day/night groups (None when the list has fewer than 2 channels)
    """

    station: int
    channels: tuple[int, ...]
    hours_served: tuple[tuple[int, ...], ...]
    wasted: tuple[int, ...]
    scan_rate_chps: float
    call: CallTime | None
    split: ScanSplit | None

    def to_dict(self) -> dict:
        return {"station": self.station, "channels": list(self.channels),
                "hours_served": [list(h) for h in self.hours_served],
                "wasted": list(self.wasted), "scan_rate_chps": self.scan_rate_chps,
                "call": None if self.call is None else self.call.to_dict(),
                "split": None if self.split is None else self.split.to_dict()}


@dataclass(frozen=True)
class ScanPlan:
    """Scan lists for every station.

    unused_channels : channels that serve no link of any station at any hour
        (wasted scan time wherever they are loaded).
    """

    stations: tuple[StationScanList, ...]
    unused_channels: tuple[int, ...]
    useful_good_days: float

    def to_dict(self) -> dict:
        return {"useful_good_days": self.useful_good_days, "formula": FORMULA,
                "stations": [s.to_dict() for s in self.stations],
                "unused_channels": list(self.unused_channels)}


def scan_lists(good_days, allowed, freq_mhz, station_links, scan_rate_chps, *,
               useful_good_days: float = DEFAULT_USEFUL_GOOD_DAYS,
               address_word_count=1, leading_call_words=None,
               daylight=None) -> ScanPlan:
    """Build each station's ALE scan list, its call time and a day/night split.

    Parameters
    ----------
    good_days : array (links, 24, channels), fraction of good days [0–1]
    allowed : bool array (24, channels), authorised at that UTC hour; a
        channel only counts as serving at its authorised hours
    freq_mhz : array (channels,), channel frequencies [MHz]; names the groups
        of a split found from the predictions (the higher group is "day")
    station_links : sequence, per station, of the link indices it is on
    scan_rate_chps : float or sequence per station, scan rate [channels/s]
    useful_good_days : float in (0, 1], default 0.5
        A channel serves a link at an hour when good_days >= this.
    address_word_count : int or sequence per station, words in the station's
        own address (what its callers send); default 1
    leading_call_words : int, sequence per station or None (see
        :func:`scanning_call_time`)
    daylight : bool array (24,) or (stations, 24), optional
        True where it is day at the station, by UTC hour. Given, the day group
        is the channels serving in daylight hours and the night group those
        serving in the other hours. Omitted, the split is the two cyclic
        blocks of hours that make the larger group smallest (then the two
        groups smallest together, then the earliest start).

    Returns
    -------
    ScanPlan
    """
    good = _inputs.link_cube("good_days", good_days, unit_interval=True)
    n, _, c = good.shape
    ok = _inputs.allowed_mask(allowed, c)
    freq = _inputs.channel_vector("freq_mhz", freq_mhz, c)
    stations = _inputs.station_link_lists(station_links, n)
    s_count = len(stations)
    rates = _inputs.per_station("scan_rate_chps", scan_rate_chps, s_count)
    words = _inputs.per_station("address_word_count", address_word_count, s_count)
    leads = _inputs.per_station("leading_call_words", leading_call_words, s_count)
    useful = _inputs.fraction("useful_good_days", useful_good_days, open_low=True)
    day_mask = _daylight(daylight, s_count)

    serves_link = (good >= useful) & ok[None, :, :]          # (n, 24, c)
    result = []
    for s, links in enumerate(stations):
        rate = _inputs.positive(f"scan_rate_chps[{s}]", rates[s])

        def call(k: int, s=s, rate=rate) -> CallTime | None:
            if k == 0:
                return None
            return scanning_call_time(k, rate, address_word_count=words[s],
                                      leading_call_words=leads[s])

        serves = serves_link[list(links)].any(axis=0).T if links else np.zeros((c, 24), bool)
        channels = tuple(int(k) for k in np.flatnonzero(serves.any(axis=1)))
        full = call(len(channels))
        split = None
        if len(channels) >= 2:
            part = _best_partition(serves[list(channels)]) if day_mask is None else day_mask[s]
            split = _split(serves, channels, part, freq, call, full, named=day_mask is not None)
        result.append(StationScanList(
            station=s, channels=channels,
            hours_served=tuple(tuple(int(h) for h in np.flatnonzero(serves[k]))
                               for k in channels),
            wasted=tuple(k for k in range(c) if k not in channels),
            scan_rate_chps=rate, call=full, split=split))
    used = serves_link.any(axis=(0, 1))
    return ScanPlan(stations=tuple(result),
                    unused_channels=tuple(int(k) for k in np.flatnonzero(~used)),
                    useful_good_days=useful)


def _daylight(daylight, s_count: int) -> np.ndarray | None:
    if daylight is None:
        return None
    arr = np.asarray(daylight)
    if arr.shape == (24,):
        arr = np.broadcast_to(arr, (s_count, 24))
    if arr.shape != (s_count, 24) or not np.isin(arr, (0, 1)).all():
        raise _inputs.ScheduleInputError(
            f"daylight: expected booleans of shape (24,) or ({s_count}, 24); "
            f"got shape {arr.shape}")
    return arr.astype(bool)


def _best_partition(serves: np.ndarray) -> np.ndarray:
    """The cyclic block of hours A (complement B) minimising, lexicographically,
    (larger group, both groups together, start hour, length), where a
    group holds the channels serving some hour of its block.

    serves : bool (channels, 24). Returns bool (24,), True in block A.
    """
    starts, lengths = np.meshgrid(np.arange(24), np.arange(1, 24), indexing="ij")
    starts, lengths = starts.ravel(), lengths.ravel()
    block = ((np.arange(24)[None, :] - starts[:, None]) % 24) < lengths[:, None]  # (552, 24)
    s = serves.T.astype(np.int64)                                                # (24, k)
    in_a = ((block.astype(np.int64) @ s) > 0).sum(axis=1)
    in_b = (((~block).astype(np.int64) @ s) > 0).sum(axis=1)
    best = np.lexsort((lengths, starts, in_a + in_b, np.maximum(in_a, in_b)))[0]
    return block[best]


def _split(serves, channels, part, freq, call, full, *, named: bool) -> ScanSplit:
    hours_a = tuple(int(h) for h in np.flatnonzero(part))
    hours_b = tuple(int(h) for h in np.flatnonzero(~part))
    group_a = tuple(k for k in channels if serves[k, list(hours_a)].any()) if hours_a else ()
    group_b = tuple(k for k in channels if serves[k, list(hours_b)].any()) if hours_b else ()
    if not named and _mean_freq(freq, group_b) > _mean_freq(freq, group_a):
        # Found from the predictions: the group of higher channels is the day
        # group (common practice, no source: NVIS needs higher channels by day).
        hours_a, hours_b, group_a, group_b = hours_b, hours_a, group_b, group_a
    day = ScanGroup("day", group_a, hours_a, call(len(group_a)))
    night = ScanGroup("night", group_b, hours_b, call(len(group_b)))
    larger = max(len(group_a), len(group_b))
    return ScanSplit(suggested=larger <= SPLIT_GAIN * full.channels, day=day, night=night)


def _mean_freq(freq: np.ndarray, group: tuple[int, ...]) -> float:
    return float(freq[list(group)].mean()) if group else -math.inf
