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


def authorised_utc_hours(spans_per_channel, zone: str, start: dt.date, end: dt.date) -> np.ndarray:
    """(24, c) bool: each channel is authorised for the whole UTC hour on every day of the period.

    Authorised hours are local; where the UTC offset changes inside the
    period (a clock change), an hour counts only if it is authorised under
    every offset, so no day of the period schedules a channel outside its hours.
    """
    offsets = utc_offsets_min(zone, start, end)
    cols = [np.logical_and.reduce([allowed_utc_hours(spans, off) for off in offsets]) for spans in spans_per_channel]
    return np.stack(cols, axis=1) if cols else np.zeros((24, 0), bool)


def offset_periods(zone: str, start: dt.date, end: dt.date) -> list[tuple[dt.date, dt.date, int]]:
    """The period cut at each change of the zone's UTC offset: [(first day, last day, offset [min])].

    A change is dated by the first day whose noon has the new offset: the day
    the clocks change (on that day the old offset holds only before the change).
    """
    out: list[list] = []
    day = start
    while day <= end:
        off = utc_offset_min(zone, day)
        if out and out[-1][2] == off:
            out[-1][1] = day
        else:
            out.append([day, day, off])
        day += dt.timedelta(days=1)
    return [tuple(p) for p in out]


def offset_label(minutes: int) -> str:
    """A UTC offset as people write it: 'UTC', 'UTC+1', 'UTC-3:30', 'UTC+5:45'."""
    if minutes == 0:
        return "UTC"
    sign = "+" if minutes > 0 else "-"
    h, m = divmod(abs(minutes), 60)
    return f"UTC{sign}{h}" + (f":{m:02d}" if m else "")


def iso_offset(minutes: int) -> str:
    """A UTC offset as ISO 8601 writes it: '+01:00', '-03:30'."""
    sign = "+" if minutes >= 0 else "-"
    h, m = divmod(abs(minutes), 60)
    return f"{sign}{h:02d}:{m:02d}"
