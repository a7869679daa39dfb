"""The plan.json fields the field cards read, in one place.

The cards recompute nothing: every figure and every sentence comes from the
compiled plan (``CompiledPlan.data``, described in ``docs/plan-json.md`` and
``planpack/output_schema.py``). This module only looks fields up, so the
list of what a card depends on is written once:

- ``revision.label``; ``net.periods``, ``net.clock_changes``,
  ``net.utc_offset_label``, ``net.target_good_days``;
- a station card's timetable: ``stations[].brief.hours`` (this station's
  view of the net schedule: the net's channels, the worst of its own links'
  figures) and ``brief.weak_runs``; the net card: ``net_schedule.hours`` and
  ``net_schedule.weak_runs``; per hour ``local_times``, ``good_days_pct``,
  ``weak``, ``second``, ``second_good_days_pct``, ``fallback``;
- ``links[].hours[].weak`` and ``links[].gap_utc_hours`` (net card columns);
- ``stations[].brief``: ``to_control``, ``control``, ``net_address``,
  ``other_members``, ``antenna_by_channel``, ``wire_runs``, ``ground``,
  ``exposure``; ``safety.short`` and ``safety.short_pointer``;
- ``antennas[].cut`` (metres and ``*_ft_in``), ``antennas[].channels[].swr_text``.
"""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass

MONTHS = ("Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec")


# ---------------------------------------------------------------- stations and channels

def station_by_id(data: dict, sid: str) -> dict:
    return next(s for s in data["stations"] if s["id"] == sid)


def control_station(data: dict) -> dict | None:
    cid = data["net"].get("control")
    if cid:
        return next((s for s in data["stations"] if s["id"] == cid), None)
    return next((s for s in data["stations"] if s["role"] == "control"), None)


def channel_map(data: dict) -> dict[str, dict]:
    return {c["id"]: c for c in data["channels"]}


def station_antennas(data: dict, station: dict) -> list[dict]:
    by_id = {a["id"]: a for a in data["antennas"]}
    return [by_id[a] for a in station["antennas"] if a in by_id]


def brief(station: dict) -> dict:
    return station.get("brief") or {}


def other_members(station: dict) -> list[dict]:
    """Every member but this station and control: {station, name, address}."""
    return list(brief(station).get("other_members") or [])


def net_address(data: dict) -> str | None:
    return data["net"].get("net_address")


# ---------------------------------------------------------------- dates, periods and the clock

def short_date(iso: str, year: bool = True) -> str:
    """'2027-03-28' -> '28 Mar 2027' (or '28 Mar'): the month by name, so no reader swaps day and month."""
    d = dt.date.fromisoformat(iso)
    return f"{d.day} {MONTHS[d.month - 1]}" + (f" {d.year}" if year else "")


def date_span(a: str, b: str, year: bool = True) -> str:
    """'2027-03-08', '2027-03-26' -> '8–26 Mar 2027'; across months or years the parts are repeated."""
    da, db = dt.date.fromisoformat(a), dt.date.fromisoformat(b)
    y = f" {db.year}" if year else ""
    if da == db:
        return short_date(a, year)
    if (da.year, da.month) == (db.year, db.month):
        return f"{da.day}–{db.day} {MONTHS[db.month - 1]}{y}"
    if da.year == db.year:
        return f"{short_date(a, False)}–{short_date(b, False)}{y}"
    return f"{short_date(a)}–{short_date(b)}"


@dataclass(frozen=True)
class Period:
    start: str  # YYYY-MM-DD
    end: str
    label: str  # "UTC+1"

    @property
    def dates(self) -> str:
        """The period's dates without the year ('8–27 Mar'): the year is in the line above the table."""
        return date_span(self.start, self.end, year=False)


def periods(data: dict) -> list[Period]:
    """The validity period cut at each change of the UTC offset (one period when the clock does not change)."""
    return [Period(p["from"], p["to"], p["label"]) for p in data["net"]["periods"]]


def offset_label(data: dict) -> str:
    """The UTC offset as printed ("UTC+1"); across a clock change each period's ("UTC / UTC+1")."""
    ps = periods(data)
    if len(ps) > 1:
        return " / ".join(dict.fromkeys(p.label for p in ps))
    return data["net"]["utc_offset_label"]


def clock_changes(data: dict) -> list[dict]:
    return list(data["net"].get("clock_changes") or [])


def local_times(hour: dict, n_periods: int) -> list[str]:
    """One local HH:MM per period for a schedule hour (the same order as :func:`periods`)."""
    got = hour.get("local_times") or []
    if len(got) == n_periods:
        return list(got)
    raise ValueError(f"hour {hour.get('utc_hour')}: {len(got)} local times for {n_periods} periods")


# ---------------------------------------------------------------- the hours a card prints

def station_hours(data: dict, station: dict) -> list[dict]:
    """This station's view of the net schedule (the net's channels, its own links' figures)."""
    return brief(station).get("hours") or data["net_schedule"]["hours"]


def station_weak_runs(data: dict, station: dict) -> list[dict]:
    b = brief(station)
    return list(b["weak_runs"] if "weak_runs" in b else data["net_schedule"].get("weak_runs") or [])


def net_weak_runs(data: dict) -> list[dict]:
    return list(data["net_schedule"].get("weak_runs") or [])


def target_pct(data: dict) -> int:
    """The plan's target as a whole percent, for the legend (a label only; ``weak`` decides)."""
    return int(round(data["net"]["target_good_days"] * 100))


@dataclass(frozen=True)
class Fallback:
    channel: str | None
    pct: int | None
    text: str | None


def fallback(hour: dict) -> Fallback | None:
    """What to do if the hour's channel fails: the weak hour's fallback, else the second channel when it works at all."""
    f = hour.get("fallback")
    if isinstance(f, dict):
        return Fallback(f.get("channel"), f.get("good_days_pct"), f.get("text"))
    if hour.get("second") is not None and (hour.get("second_good_days_pct") or 0) > 0:
        return Fallback(hour["second"], hour.get("second_good_days_pct"), None)
    return None  # no second channel, or one that works on no day: nothing worth switching to


def link_gap_hours(link: dict) -> set[int]:
    return set(link.get("gap_utc_hours") or [])


def gap_text(gap: dict) -> str:
    """The gap in plain words: the compile side's short sentence when it writes one, else its message."""
    return gap.get("short") or gap.get("text") or gap.get("message") or ""


# ---------------------------------------------------------------- the station's brief

def antenna_by_channel(station: dict) -> list[dict]:
    return list(brief(station).get("antenna_by_channel") or [])


def wire_runs(station: dict) -> dict[str, dict]:
    return {w["antenna"]: w for w in brief(station).get("wire_runs") or []}


def to_control(station: dict) -> dict | None:
    return brief(station).get("to_control")


def ground(station: dict) -> dict:
    """The station's ground: the brief's (with radial or counterpoise lengths) over the plan's own fields."""
    g = dict(station.get("ground") or {})
    g.update(brief(station).get("ground") or {})
    return g


def exposure(station: dict) -> dict | None:
    return brief(station).get("exposure")


# ---------------------------------------------------------------- revision, safety, SWR

def revision_label(data: dict) -> str:
    return data["revision"]["label"]


def swr_text(cell: dict) -> str:
    """SWR as the antenna side wrote it ("1.4:1", "> 50:1")."""
    return cell["swr_text"]


def safety_short(data: dict) -> tuple[list[str], str]:
    """(lines, pointer) of the cautions in short, for the front card."""
    s = data.get("safety") or {}
    return list(s.get("short") or []), s.get("short_pointer") or "Full cautions: the Safety page of the net's site."
