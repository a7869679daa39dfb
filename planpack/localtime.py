"""The plan's clock: months it touches, UTC hours as local times, authorised hours as UTC masks."""

from __future__ import annotations

import datetime as dt
import zoneinfo

import numpy as np

HOURS = np.arange(24)


def months_touched(start: dt.date, end: dt.date) -> list[tuple[int, int]]:
    """Every (year, month) the validity period touches, in order."""
    out = []
    y, m = start.year, start.month
    while (y, m) <= (end.year, end.month):
        out.append((y, m))
        y, m = (y + 1, 1) if m == 12 else (y, m + 1)
    return out


def reference_day(start: dt.date, end: dt.date) -> dt.date:
    """The middle of the validity period: the day whose UTC offset the local columns use."""
    return start + (end - start) // 2


def utc_offsets_min(zone: str, start: dt.date, end: dt.date) -> list[int]:
    """The distinct UTC offsets [min] the zone uses during the period (two when a DST change falls in it)."""
    tz = zoneinfo.ZoneInfo(zone)
    seen: list[int] = []
    day = start
    while day <= end:
        off = int(dt.datetime(day.year, day.month, day.day, 12, tzinfo=tz).utcoffset().total_seconds() // 60)
        if off not in seen:
            seen.append(off)
        day += dt.timedelta(days=1)
    return seen


def utc_offset_min(zone: str, day: dt.date) -> int:
    """UTC offset of the zone at noon on ``day`` [min]."""
    tz = zoneinfo.ZoneInfo(zone)
    return int(dt.datetime(day.year, day.month, day.day, 12, tzinfo=tz).utcoffset().total_seconds() // 60)


def hhmm(minutes: float) -> str:
    """Minutes after midnight (any real number) as 'HH:MM' on a 24-hour clock."""
    m = int(round(minutes)) % 1440
    return f"{m // 60:02d}:{m % 60:02d}"


def local_labels(offset_min: int) -> list[str]:
    """Local 'HH:MM' of each UTC hour 0-23."""
    return [hhmm(h * 60 + offset_min) for h in range(24)]


def allowed_utc_hours(spans: tuple[tuple[int, int], ...] | None, offset_min: int) -> np.ndarray:
    """(24,) bool: the UTC hours whose whole hour falls inside the authorised local spans.

    A span is (start, end) in local minutes after midnight and may wrap midnight.
    An hour counts only when the channel is authorised for all of it, so a
    schedule never puts a net on a channel for part of an hour it may not use.
    """
    if spans is None:
        return np.ones(24, bool)
    minute = np.zeros(1440, bool)
    for start, end in spans:
        if end > start:
            minute[start:end] = True
        else:
            minute[start:] = True
            minute[: end % 1440] = True
    out = np.zeros(24, bool)
    for h in range(24):
        first = (h * 60 + offset_min) % 1440
        idx = (first + np.arange(60)) % 1440
        out[h] = bool(minute[idx].all())
    return out
