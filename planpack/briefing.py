"""The briefing: what a team acts on, computed once from the compiled figures.

Compile calls :func:`add_briefing` after the schedule, the gaps and the
antennas are in ``plan.json``; it adds the figures and the sentences that
pages and cards print, so that every renderer shows the same words and the
same numbers and recomputes nothing:

- whole percentages beside every fraction of good days a page or card shows,
  and whether each hour is weak (below the plan's ``target_good_days``);
- the weak hours as runs, in plain words, with the fallback for each hour;
- per link, the gap hours exactly as ``gaps[]`` lists them;
- per station: bearing and distance to control, which way to run each wire,
  which antenna to rig on each channel, the ground with counterpoise or
  radial lengths, the other members' addresses, its RF exposure distance;
- scan lists reconciled with the schedule: a channel the schedule uses as a
  first or second choice is on the list and never "serves no link".

Percentages are rounded *down* to a whole percent (``floor``), from the
fraction as ``plan.json`` holds it (three decimals), so a figure never
overstates how often a channel works and ``pct < target %`` exactly when the
fraction is below the target (for targets given to the percent).
"""

from __future__ import annotations

import math
from collections.abc import Sequence

import numpy as np

from planpack import localtime
from planpack.antennas import matching
from planpack.antennas.cut import feet_inches, quarter_wave_rule_m
from planpack.antennas.pattern import GAIN_FLOOR_DBI
from planpack.ionosphere import geodesy, groundwave
from planpack.plan.diagnostics import Collector
from planpack.plan.models import Plan, Station
from planpack.scheduling.windows import serving_window
from planpack.schedule import address_words, cyclic_runs, format_hours, scanning_call_time

#: Kinds of antenna that are horizontal wires (they have a direction to run).
WIRE_KINDS = ("dipole", "inverted-v", "dipole-reflector", "folded-terminated")
COMPASS_16 = ("N", "NNE", "NE", "ENE", "E", "ESE", "SE", "SSE", "S", "SSW", "SW", "WSW", "W", "WNW", "NW", "NNW")
#: Below this concentration of the far stations' bearings (0 = all around, 1 = one direction)
#: the direction of a wire hardly matters (a design choice, no source).
SPREAD_CONCENTRATION = 0.3
RUN_RULE = ("run the wire broadside to the far stations: at right angles to the mean bearing to them, the farther "
            "ones weighing more (common practice, no source)")
GROUND_RULE = ("a quarter wave at the lowest channel the station uses, 234 / f[MHz] ft (common practice, no source); "
               "radials laid on the ground need not be resonant: more and longer is better")
RADIAL_COUNT = 4  # at least four radials (common practice, no source)


# ------------------------------------------------------------------ numbers

def pct(fraction: float | None) -> int | None:
    """Whole percent of a fraction 0-1, rounded down (see the module); None stays None."""
    if fraction is None:
        return None
    x = float(fraction)
    if x != x:
        return None
    return max(0, min(100, int(math.floor(round(x, 3) * 100 + 1e-6))))


def days_phrase(p: int | None) -> str:
    """A percentage as the words a radio operator says: 'about 1 day in 5'."""
    if p is None or p <= 0:
        return "almost no days"
    if p >= 98:
        return "nearly every day"
    if p < 50:
        return f"about 1 day in {max(2, round(100 / p))}"
    fractions = ((1, 2), (3, 5), (2, 3), (3, 4), (4, 5), (9, 10))
    k, n = min(fractions, key=lambda f: abs(100 * f[0] / f[1] - p))
    return f"about {k} day{'s' if k > 1 else ''} in {n}"


def compass(deg: float) -> str:
    """16-point compass name of a bearing [deg]."""
    return COMPASS_16[int(((deg % 360.0) + 11.25) // 22.5) % 16]


# -------------------------------------------------------------------- clock

def clock(timezone: str, valid_from, valid_to, reference_offset_min: int) -> dict:
    """The net's clock: ``{utc_offset_label, periods, clock_changes}`` (the validity period cut at each
    change of the UTC offset; see :func:`planpack.localtime.offset_periods`)."""
    parts = localtime.offset_periods(timezone, valid_from, valid_to)
    return {
        "utc_offset_label": localtime.offset_label(reference_offset_min),
        "periods": [{"from": a.isoformat(), "to": b.isoformat(), "utc_offset": localtime.iso_offset(off),
                     "label": localtime.offset_label(off)} for a, b, off in parts],
        "clock_changes": [{"date": b[0].isoformat(), "from": localtime.iso_offset(a[2]), "to": localtime.iso_offset(b[2])}
                          for a, b in zip(parts, parts[1:])],
    }


def period_offsets_min(net: dict) -> list[int]:
    """UTC offset of each period [min], from ``net.periods``."""
    out = []
    for p in net["periods"]:
        sign = -1 if p["utc_offset"].startswith("-") else 1
        h, m = p["utc_offset"][1:].split(":")
        out.append(sign * (int(h) * 60 + int(m)))
    return out


def _labels_by_period(net: dict) -> list[list[str]]:
    return [localtime.local_labels(off) for off in period_offsets_min(net)]


def _local_by_period(hours: Sequence[int], labels: list[list[str]]) -> list[str]:
    return [format_hours(hours, lab) for lab in labels]


def _local_text(hours: Sequence[int], net: dict, labels: list[list[str]]) -> str:
    """'01:00–06:00', or '00:00–05:00 UTC / 01:00–06:00 UTC+1' across a clock change."""
    parts = _local_by_period(hours, labels)
    if len(parts) == 1:
        return parts[0]
    return " / ".join(f"{t} {p['label']}" for t, p in zip(parts, net["periods"]))


# ------------------------------------------------------------------ schedule

def _fallback(second: str | None, second_pct: int | None, target_pct: int, plan_text: str | None) -> dict:
    """What to do in a weak hour: the second channel where it works at all, else the plan's own instruction."""
    tail = plan_text.rstrip(".") if plan_text else "expect to repeat calls"
    if second is None or not second_pct:
        return {"channel": None, "good_days_pct": None, "text": f"no second channel works then: {tail}"}
    if second_pct >= target_pct:
        return {"channel": second, "good_days_pct": second_pct, "text": f"use {second} (works on {second_pct} % of days)"}
    return {"channel": second, "good_days_pct": second_pct,
            "text": f"try {second} (works on {second_pct} % of days), then {tail}"}


#: Weak hours are told in runs of about the same confidence: lower bounds of the bands [%]
#: (a design choice, no source: the steps at which the words a team hears change).
WEAK_BANDS = (0, 5, 20, 40, 60)


def _band(p: int | None) -> int:
    return sum(1 for b in WEAK_BANDS if (p or 0) >= b)


def _weak_runs(rows: list[dict], net: dict, labels: list[list[str]], plan_text: str | None) -> list[dict]:
    """Consecutive weak hours of about the same confidence, each with its sentence.

    rows : the 24 hour rows of :func:`_hour_rows`.
    """
    weak = [r["weak"] for r in rows]
    pcts = [r["good_days_pct"] for r in rows]
    fallbacks = [(r["fallback"] or {}).get("channel") for r in rows]
    runs = []
    found = cyclic_runs([_band(pcts[h]) if weak[h] else None for h in range(24)])
    for _, run in sorted(found, key=lambda r: labels[0][r[1][0]]):  # in local order, as a team reads the day
        vals = [pcts[h] or 0 for h in run]
        lo, hi = min(vals), max(vals)
        mean = round(sum(vals) / len(vals))
        if all(pcts[h] is None for h in run):
            words = "no channel is authorised"
        else:
            words = f"works on {days_phrase(mean)} ({lo} %)" if lo == hi else \
                f"works on {days_phrase(mean)} ({lo}–{hi} %)"
        advice = "expect to repeat calls" + (" or use the second channel" if any(fallbacks[h] for h in run) else "")
        if plan_text:
            advice += f"; then {plan_text.rstrip('.')}"
        runs.append({
            "utc_hours": run, "utc": format_hours(run), "local": _local_by_period(run, labels)[0],
            "local_by_period": _local_by_period(run, labels),
            "good_days_pct_min": lo, "good_days_pct_max": hi,
            "text": f"{_local_text(run, net, labels)}: {words}; {advice}",
        })
    return runs


def _hour_rows(firsts, first_fracs, seconds, second_fracs, target: float, net: dict, labels, plan_text) -> list[dict]:
    """Percent, weak flag and fallback for 24 hours of (first, second) choices."""
    target_pct = pct(target)
    rows = []
    for h in range(24):
        p1 = pct(first_fracs[h]) if firsts[h] else None
        p2 = pct(second_fracs[h]) if seconds[h] else None
        weak = firsts[h] is None or first_fracs[h] is None or round(float(first_fracs[h]), 3) < target - 1e-9
        rows.append({"good_days_pct": p1, "second_good_days_pct": p2, "weak": bool(weak),
                     "fallback": _fallback(seconds[h], p2, target_pct, plan_text) if weak else None,
                     "local_times": [lab[h] for lab in labels]})
    return rows


def _window(grid_good_days, grid_mhz, target: float) -> list[float] | None:
    """The frequencies [MHz] on which every given link reaches the target at an hour, read off the band
    grid with each station's own antennas, as the gap finder reads its windows; None when there are none."""
    w, _ = serving_window(np.atleast_2d(grid_good_days), grid_mhz, target, best_effort=False)
    return None if w is None else [round(w.low_mhz, 2), round(w.high_mhz, 2)]


def _inside(freq_khz: float, win: list[float] | None) -> bool:
    return win is not None and win[0] <= freq_khz / 1000.0 <= win[1]


def _net_grid(data: dict, plan: Plan, pred) -> None:
    """Per net hour and channel: the weakest link's good days, whether authorised, whether inside the net's
    window (where a channel would reach the target on every link): the cells of the schedule's timetable."""
    allowed = {c["id"]: set(c["allowed_utc_hours"]) for c in data["channels"]}
    n = pred.good_days.shape[0]
    target = float(data["net"]["target_good_days"])
    for h, hr in enumerate(data["net_schedule"]["hours"]):
        win = None
        if n:
            win = _window(pred.grid_good_days[:, h, :], pred.grid_mhz, target)
        hr["window_mhz"] = win
        hr["channels"] = [{
            "channel": ch.id,
            "good_days_pct": pct(round(float(np.min(pred.good_days[:, h, c])), 3)) if n else None,
            "allowed": h in allowed[ch.id],
            "in_window": _inside(ch.khz, win),
        } for c, ch in enumerate(plan.channels)]


def _net_hours(data: dict, labels, plan_text: str | None) -> None:
    ns = data["net_schedule"]
    hours = ns["hours"]
    target = float(data["net"]["target_good_days"])
    rows = _hour_rows([h["first"] for h in hours], [h.get("weakest_good_days") for h in hours],
                      [h["second"] for h in hours], [h.get("second_good_days") for h in hours],
                      target, data["net"], labels, plan_text)
    for h, r in zip(hours, rows):
        h.update(r)
    ns["weak_runs"] = _weak_runs(rows, data["net"], labels, plan_text)


def _gap_links_by_hour(data: dict, gaps, link_ids: list[str], labels: list[list[str]]) -> None:
    """Give each ``gaps[]`` entry ``links_by_hour`` (the links short at each of its hours) and
    ``local_by_period`` (its hours in local time, one text per period of ``net.periods``).

    A gap's ``links`` are the union over its hours; a link can be short at
    only some of them. ``gaps`` are the scheduler's gaps, whose per-hour
    links these are (each UTC hour belongs to at most one of them).
    """
    at_hour: dict[int, set[str]] = {}
    for g in gaps:
        for h, ls in zip(g.utc_hours, g.links_by_hour):
            at_hour[int(h)] = {link_ids[i] for i in ls}
    for entry in data["gaps"]:
        entry["links_by_hour"] = [sorted(at_hour.get(h, set()) & set(entry["links"]), key=link_ids.index)
                                  for h in entry["utc_hours"]]
        entry["local_by_period"] = _local_by_period(entry["utc_hours"], labels)
        entry["utc_text"] = format_hours(entry["utc_hours"])
        entry["short"] = _gap_short(data, entry, labels)


def _gap_short(data: dict, entry: dict, labels: list[list[str]]) -> str:
    """A gap in the words of a card: its local hours, who cannot be reached (by ALE address), what to do."""
    stations = {s["id"]: s for s in data["stations"]}
    control = data["net"].get("control")
    links = {ln["id"]: ln for ln in data["links"]}
    who = []
    for lid in entry["links"]:
        a, b = links[lid]["from"], links[lid]["to"]
        ends = [x for x in (a, b) if x != control]
        text = "–".join(stations[x]["address"] for x in (ends if len(ends) == 1 else (a, b)))
        if text not in who:
            who.append(text)
    everyone = len(entry["links"]) == len(data["links"]) > 2
    if everyone:
        reach = "any station" if control is None else "any member"
    else:
        reach = ", ".join(who[:-1]) + (" or " if len(who) > 1 else "") + who[-1]
    advice = data["net"].get("fallback") or (
        "expect to repeat calls" if everyone else "relay through a station that hears them or expect to repeat calls")
    return (f"{_local_text(entry['utc_hours'], data['net'], labels)}: no channel reaches {reach} on enough days; "
            f"{advice.rstrip('.')}")


def _link_hours(data: dict, pred, ch_index: dict[str, int], labels) -> None:
    good = pred.good_days
    target = float(data["net"]["target_good_days"])
    gap_hours: dict[str, set[int]] = {ln["id"]: set() for ln in data["links"]}
    for g in data["gaps"]:
        for h, ls in zip(g["utc_hours"], g["links_by_hour"]):
            for lid in ls:
                gap_hours[lid].add(h)
    for li, ln in enumerate(data["links"]):
        weak_hours = []
        for h, hr in enumerate(ln["hours"]):
            f = None if hr["first"] is None else round(float(good[li, h, ch_index[hr["first"]]]), 3)
            s = None if hr["second"] is None else round(float(good[li, h, ch_index[hr["second"]]]), 3)
            hr["first_good_days_pct"] = pct(f)
            hr["second_good_days_pct"] = pct(s)
            hr["weak"] = bool(f is None or f < target - 1e-9)
            hr["gap"] = h in gap_hours[ln["id"]]
            hr["local_times"] = [lab[h] for lab in labels]
            win = _window(pred.grid_good_days[li, h], pred.grid_mhz, target)
            hr["window_mhz"] = win
            for cell in hr.get("channels", []):
                cell["good_days_pct"] = pct(cell["good_days"])
                cell["in_window"] = _inside(cell["freq_khz"], win)
            if hr["weak"]:
                weak_hours.append(h)
        ln["gap_utc_hours"] = sorted(gap_hours[ln["id"]])
        ln["gap_utc_text"] = format_hours(ln["gap_utc_hours"]) if ln["gap_utc_hours"] else "none"
        ln["gap_local_by_period"] = _local_by_period(ln["gap_utc_hours"], labels) if ln["gap_utc_hours"] else []
        ln["weak_utc_hours"] = weak_hours


# ------------------------------------------------------------ scan lists

def reconcile_scan_lists(data: dict, plan: Plan, unused: Sequence[int]) -> list[int]:
    """Put every channel the schedule uses (first or second) on the scan list of the stations it serves.

    The scan lists keep a channel that works on at least half the days on
    some link; the schedule may still name a weaker one as a first or second
    choice in a bad hour. A station must scan every channel its card tells it
    to use, so such a channel joins the list (and the call time is worked out
    again), and it is no longer "wasted". Returns the channel indices, of
    ``unused``, that nothing uses at all.
    """
    ch_ids = [c.id for c in plan.channels]
    index = {c: i for i, c in enumerate(ch_ids)}
    net_used = [(h["utc_hour"], c) for h in data["net_schedule"]["hours"] for c in _net_choices(h)]
    used_net = {c for _, c in net_used}
    used_by: dict[str, dict[str, set[int]]] = {s.id: {} for s in plan.stations}  # station -> channel -> UTC hours
    for hour, c in net_used:
        for s in plan.stations:
            used_by[s.id].setdefault(c, set()).add(hour)
    for ln in data["links"]:
        for hr in ln["hours"]:
            for c in (hr.get("first"), hr.get("second")):
                if c:
                    for sid in (ln["from"], ln["to"]):
                        used_by[sid].setdefault(c, set()).add(hr["utc_hour"])
    stations = {s.id: s for s in plan.stations}
    for sl in data["scan_lists"]:
        s = stations[sl["station"]]
        full = sl["groups"][0]
        added = [c for c in ch_ids if c in used_by[s.id] and c not in full["channels"]]
        sl["added_for_schedule"] = added
        if not added:
            continue
        for g in sl["groups"]:
            hours = set(range(24)) if g.get("utc_hours") is None else set(g["utc_hours"])
            extra = [c for c in added if used_by[s.id][c] & hours]
            if not extra:
                continue
            g["channels"] = sorted(set(g["channels"]) | set(extra), key=index.__getitem__)
            call = scanning_call_time(len(g["channels"]), s.scan_rate, address_word_count=address_words(s.address))
            g["scan_period_s"] = round(call.scan_period_s, 1)
            g["call_time_s"] = round(call.total_s, 1)
        sl["wasted"] = [c for c in sl["wasted"] if c not in added]
        why = ", ".join(f"{c} ({format_hours(sorted(used_by[s.id][c]))} UTC)" for c in added)
        sl["note"] = ((sl.get("note") or "") + ("; " if sl.get("note") else "")
                      + f"also scans {why}: the schedule names {'it' if len(added) == 1 else 'them'} as a first or "
                        f"second choice then, though on fewer than half the days")
    used_links = {c for ln in data["links"] for hr in ln["hours"] for c in (hr.get("first"), hr.get("second")) if c}
    return [c for c in unused if ch_ids[c] not in used_net | used_links]


def _net_choices(h: dict) -> list[str]:
    """The channels a net hour names: its first, and its second where it works on some days."""
    out = [h["first"]] if h.get("first") else []
    if h.get("second") and (pct(h.get("second_good_days")) or 0) > 0:
        out.append(h["second"])
    return out


# --------------------------------------------------------------- stations

def antenna_gains_dbi(setup, station: Station) -> dict[str, np.ndarray]:
    """Per antenna of the station: (c, 91) gain from the set's output [dBi] (antenna gain less the
    matching and feedline loss), at elevations 0-90° in 1° steps.

    The one place that reads the per-antenna tables: the same tables, less the
    same losses, that the link budget uses.
    """
    return {a: np.asarray(setup.by_station[(station.id, a)].system_gain_table_dbi) for a in station.antennas}


#: Stands for a path the ground wave carries, among the elevation angles of a station's paths.
GROUND_WAVE = -1.0


def antenna_by_channel(plan: Plan, setup, station: Station, elevations_deg: np.ndarray,
                       used: dict[str, list[float]] | None = None) -> list[dict]:
    """Which of the station's antennas to rig on each channel.

    elevations_deg : (k,) elevation angles of the station's paths [deg], over its links and hours;
    used : per channel id, the elevation angles [deg] at the hours the schedule uses it on the
        station's links (these decide where they exist), or :data:`GROUND_WAVE` where the ground
        wave carries the path on that channel.
    The antenna with the higher mean gain (in dB) over those uses wins; ties go to plan order. For
    a ground-wave use an antenna counts with the gain the link budget credits to the ground wave: a
    whip's, and nothing (the pattern's floor) for a horizontal wire, whose ground wave dies out.
    """
    gains = antenna_gains_dbi(setup, station)
    ids = list(station.antennas)
    kinds = {a.id: a.kind for a in plan.antennas}
    out = []
    for c, ch in enumerate(plan.channels):
        angles = np.asarray((used or {}).get(ch.id) or elevations_deg, float)
        angles = angles[np.isfinite(angles)]
        if angles.size == 0:
            angles = np.array([80.0])  # no sky path known: near-vertical (NVIS), a design choice
        ground = angles == GROUND_WAVE
        idx = np.clip(np.rint(angles[~ground]).astype(int), 0, 90)

        def ground_gain(a: str) -> float:
            if kinds[a] != "whip":
                return GAIN_FLOOR_DBI
            return float(min(np.max(gains[a][c]), groundwave.SHORT_MONOPOLE_GAIN_DBI))

        mean = {a: float(np.mean(np.concatenate([gains[a][c, idx], np.full(int(ground.sum()), ground_gain(a))])))
                for a in ids}
        best = max(ids, key=lambda a: (round(mean[a], 6), -ids.index(a)))
        if idx.size:
            lo, hi = int(idx.min()), int(idx.max())
            span = f"at the paths' elevation ({lo}°)" if lo == hi else f"at the paths' elevation ({lo}–{hi}°)"
            span += " and for the ground wave" if ground.any() else ""
        else:
            span = "for the ground wave"
        if len(ids) == 1:
            why = "the station's only antenna"
        else:
            runner = max((a for a in ids if a != best), key=lambda a: mean[a])
            if ground.any() and kinds[best] == "whip" and kinds[runner] != "whip":
                some = "the paths" if ground.all() else "some of the paths"
                why = f"the ground wave carries {some} on this channel, and {runner}, a horizontal wire, hardly launches it"
            else:
                why = f"{mean[best] - mean[runner]:.1f} dB better than {runner} {span}"
        out.append({"channel": ch.id, "antenna": best, "gain_dbi": round(mean[best], 1),
                    "gains_dbi": {a: round(mean[a], 1) for a in ids}, "why": why})
    return out


def _axial_mean_deg(bearings: Sequence[float], weights: Sequence[float]) -> tuple[float | None, float]:
    """Mean of directions taken as axes (b and b+180 the same) [deg, 0-180), and its concentration 0-1."""
    if not bearings:
        return None, 0.0
    th = np.radians(2.0 * np.asarray(bearings, float))
    w = np.asarray(weights, float)
    w = w / w.sum() if w.sum() > 0 else np.full(len(th), 1.0 / len(th))
    z = complex(float(np.sum(w * np.cos(th))), float(np.sum(w * np.sin(th))))
    return (math.degrees(math.atan2(z.imag, z.real)) / 2.0) % 180.0, abs(z)


def _run_compass(run_deg: float) -> str:
    a = run_deg % 180.0
    return f"{compass(a)}–{compass(a + 180.0)}"


def wire_runs(plan: Plan, station: Station, far: list[tuple[float, float]]) -> list[dict]:
    """For each horizontal wire antenna of the station: the direction to run it.

    far : (bearing [deg], distance [km]) to each station at the other end of its links.
    """
    kinds = {a.id: a.kind for a in plan.antennas}
    wires = [a for a in station.antennas if kinds[a] in WIRE_KINDS]
    if not wires:
        return []
    mean, conc = _axial_mean_deg([b for b, _ in far], [d for _, d in far])
    out = []
    for a in wires:
        if mean is None or conc < SPREAD_CONCENTRATION:
            out.append({"antenna": a, "run_deg": None, "run_compass": None, "rule": RUN_RULE,
                        "text": "the far stations lie all around: any direction will do; keep the wire straight and level"})
            continue
        run = (mean + 90.0) % 180.0
        out.append({"antenna": a, "run_deg": round(run, 0), "run_compass": _run_compass(run), "rule": RUN_RULE,
                    "text": f"run the wire {_run_compass(run)} ({run:.0f}°–{run + 180:.0f}°), broadside to the far "
                            f"stations (mean bearing {mean:.0f}° / {mean + 180:.0f}°)"})
    return out


def ground(plan: Plan, station: Station, used_khz: list[float], instruction: str) -> dict:
    """The station's ground with counterpoise or radial lengths from its lowest channel."""
    system = station.ground.system
    lowest = min(used_khz) if used_khz else min(c.khz for c in plan.channels)
    quarter = round(quarter_wave_rule_m(lowest), 2)
    out = {"system": system, "soil": station.ground.soil, "instruction": instruction,
           "counterpoise_m": None, "counterpoise_ft_in": None, "radial_m": None, "radial_ft_in": None,
           "radial_count": None, "lowest_freq_khz": lowest, "basis": GROUND_RULE}
    if system == "counterpoise":
        out["counterpoise_m"], out["counterpoise_ft_in"] = quarter, feet_inches(quarter)
        out["text"] = f"counterpoise wire {quarter:.2f} m ({feet_inches(quarter)}), a quarter wave at {lowest:g} kHz"
    elif system == "radials":
        out["radial_m"], out["radial_ft_in"], out["radial_count"] = quarter, feet_inches(quarter), RADIAL_COUNT
        out["text"] = (f"at least {RADIAL_COUNT} radials of {quarter:.2f} m ({feet_inches(quarter)}) each, "
                       f"a quarter wave at {lowest:g} kHz")
    elif system == "rods":
        out["text"] = "ground stake at least 1 m into moist soil, short heavy lead to the set"
    else:
        out["text"] = "no RF ground declared: add a stake or a counterpoise"
    return out


def _to(a: Station, b: Station) -> tuple[float, float]:
    d, az, _ = geodesy.inverse(a.at.lat_deg, a.at.lon_deg, b.at.lat_deg, b.at.lon_deg)
    return float(az) % 360.0, float(d)


def _station_brief(plan: Plan, setup, pred, data: dict, s: Station, labels, ch_index, out: Collector) -> dict:
    control = plan.control
    links = [(li, a, b) for li, (a, b) in enumerate(plan.links) if s.id in (a, b)]
    far_ids = [b if a == s.id else a for _, a, b in links]
    far = [_to(s, plan.station(f)) for f in far_ids]
    to_control = None
    if control is not None and control.id != s.id:
        brg, dist = _to(s, control)
        to_control = {"station": control.id, "bearing_deg": round(brg, 0), "distance_km": round(dist, 1),
                      "compass": compass(brg)}
    # the schedule's channels for this station: the net's, with this station's own links' figures
    good = pred.good_days
    li_idx = [li for li, _, _ in links]
    hours = []
    target = float(data["net"]["target_good_days"])
    nh = data["net_schedule"]["hours"]

    def worst(c: str | None, h: int) -> float | None:
        if c is None or not li_idx:
            return None
        return round(float(np.min(good[li_idx, h, ch_index[c]])), 3)

    firsts = [h["first"] for h in nh]
    seconds = [h["second"] for h in nh]
    rows = _hour_rows(firsts, [worst(c, h) for h, c in enumerate(firsts)], seconds,
                      [worst(c, h) for h, c in enumerate(seconds)], target, data["net"], labels, plan.net.fallback)
    for h, r in enumerate(rows):
        hours.append({"utc_hour": h, "first": firsts[h], "second": seconds[h], **r})
    weak_runs = _weak_runs(rows, data["net"], labels, plan.net.fallback)
    # antennas: elevation of the station's paths where the schedule uses each channel, or the ground
    # wave where it carries the path on that channel
    elev = pred.elevation_deg[li_idx] if li_idx else np.zeros((0, 24))

    def angle(li: int, h: int, c: str) -> float:
        return GROUND_WAVE if pred.via_name(li, h, ch_index[c]) == "ground" else float(pred.elevation_deg[li, h])

    used: dict[str, list[float]] = {}
    for h, hr in enumerate(nh):
        for c in (hr["first"], hr["second"]):
            if c:
                used.setdefault(c, []).extend(angle(li, h, c) for li in li_idx)
    for li in li_idx:
        for h, hr in enumerate(data["links"][li]["hours"]):
            for c in (hr["first"], hr["second"]):
                if c:
                    used.setdefault(c, []).append(angle(li, h, c))
    by_channel = antenna_by_channel(plan, setup, s, elev.ravel(), used)
    used_khz = [c.khz for c in plan.channels if c.id in used]
    st = next(x for x in data["stations"] if x["id"] == s.id)
    members = [x for x in plan.stations if x.id != s.id and x.role != "control"]
    return {
        "to_control": to_control,
        "far_stations": [{"station": f, "bearing_deg": round(b, 0), "distance_km": round(d, 1), "compass": compass(b)}
                         for f, (b, d) in zip(far_ids, far)],
        "hours": hours,
        "weak_runs": weak_runs,
        "antenna_by_channel": by_channel,
        "wire_runs": wire_runs(plan, s, far),
        "ground": ground(plan, s, used_khz, st["ground"]["instruction"]),
        "control": None if control is None else {"station": control.id, "name": control.name, "address": control.address},
        "net_address": data["net"].get("net_address"),
        "other_members": [{"station": m.id, "name": m.name, "address": m.address} for m in members],
        "exposure": _exposure(data, s, out, plan),
    }


def _exposure(data: dict, s: Station, out: Collector, plan: Plan) -> dict | None:
    """The station's largest RF exposure distance over its antennas, against the plan's clearance."""
    rows = [(a["id"], e) for a in data["antennas"] for e in a.get("exposure", []) if e["station"] == s.id]
    if not rows:
        return None
    aid, e = max(rows, key=lambda r: (r[1]["general_public_m"], r[0]))
    occ = max(r[1]["occupational_m"] for r in rows)
    clearance = s.clearance_m
    exceeds = clearance is not None and e["general_public_m"] > clearance
    if exceeds:
        line, col = plan.where(f"stations.{s.id}.clearance_m")
        out.add("warning", "exposure-clearance", f"stations.{s.id}.clearance_m",
                f"stations.{s.id}.clearance_m: people can be kept {clearance:g} m from the antennas, but antenna {aid} "
                f"at {s.power_w:g} W needs {e['general_public_m']:.1f} m for the general public (far-field estimate, "
                f"47 CFR 1.1310 Table 1 limits); lower the power, move the antenna or keep people further away",
                line, col)
    return {"general_public_m": e["general_public_m"], "occupational_m": occ, "antenna": aid,
            "clearance_m": clearance, "exceeds_clearance": exceeds,
            "text": f"keep people at least {e['general_public_m']:.1f} m from the antenna while transmitting"}


# --------------------------------------------------------------------- entry

def add_briefing(data: dict, plan: Plan, setup, pred, gaps, out: Collector) -> None:
    """Add the briefing figures and sentences to a compiled plan's ``data`` (in place).

    Needs ``data`` with its links, net schedule, gaps, scan lists and antennas
    filled in, the solved antennas ``setup``, the predictions ``pred`` and the
    scheduler's ``gaps`` (:func:`planpack.schedule.find_gaps`).
    """
    labels = _labels_by_period(data["net"])
    ch_index = {c.id: i for i, c in enumerate(plan.channels)}
    _gap_links_by_hour(data, gaps, [ln["id"] for ln in data["links"]], labels)
    _net_hours(data, labels, plan.net.fallback)
    _net_grid(data, plan, pred)
    _link_hours(data, pred, ch_index, labels)
    for st, s in zip(data["stations"], plan.stations):
        st["brief"] = _station_brief(plan, setup, pred, data, s, labels, ch_index, out)
    picks = {st["id"]: [r["antenna"] for r in st["brief"]["antenna_by_channel"]] for st in data["stations"]}
    for a in data["antennas"]:
        for i, c in enumerate(a.get("channels", [])):
            c.setdefault("swr_text", swr_text(c["swr"]))
            # which stations rig this antenna on the channel: the brief's choice, so pages agree
            c["rig_at"] = [sid for sid in a.get("stations", []) if picks.get(sid) and picks[sid][i] == a["id"]]
        cut = a.get("cut") or {}
        for key, value in list(cut.items()):  # every length in feet and inches too, in one place
            if key.endswith("_m") and isinstance(value, (int, float)) and not isinstance(value, bool):
                cut.setdefault(key[:-2] + "_ft_in", feet_inches(float(value)))


def swr_text(swr: float | None) -> str:
    """SWR as printed: '1.4:1', '12:1', '> 50:1' (the antenna package's words; None reads 'not solved')."""
    return matching.swr_text(float("nan") if swr is None else swr)
