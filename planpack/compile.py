"""Plan -> CompiledPlan: the one place that runs the analyses, in order.

1. antennas: NEC-2 solutions per (design, station ground, channel set);
2. predictions: every link, both directions, every hour and channel, for
   each month and solar level, combined into the worst case;
3. the schedule: per-link choices, the shared net channel, gaps, scan lists;
4. the plain data of ``plan.json`` and the warnings ``check`` prints.

A pure function of the plan: no files are written and no clock is read.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from planpack import __version__, localtime, safety, schedule
from planpack.plan.diagnostics import Collector, Diagnostic
from planpack.plan.models import Plan
from planpack.predictions import LinkPredictions, predict_links
from planpack.revision import plan_revision
from planpack.stationsetup import StationAntennas, solve_station_antennas

NVIS_RANGE_KM = 600.0  # links all shorter than this make an NVIS net (common practice, no source)


@dataclass(frozen=True)
class CompiledPlan:
    """The compiled plan: ``data`` is exactly what ``plan.json`` holds; ``diagnostics`` the analysis warnings."""

    data: dict
    diagnostics: list[Diagnostic] = field(default_factory=list)
    # the arrays behind ``data``, for benchmarks and tools that want numbers, not JSON
    arrays: LinkPredictions | None = field(default=None, compare=False, repr=False)


def _r(x, nd: int = 2):
    """Round for stable JSON; None for NaN."""
    if x is None:
        return None
    x = float(x)
    if x != x:
        return None
    return round(x, nd) + 0.0  # + 0.0 turns -0.0 into 0.0


def link_id(a: str, b: str) -> str:
    return f"{a}--{b}"


def compile_plan(plan: Plan, *, cells: bool = True) -> CompiledPlan:
    """Run every analysis of ``plan`` and return its CompiledPlan.

    ``cells=False`` leaves out the per-channel records of each link hour
    (``links[].hours[].channels``): ``check`` needs only the warnings, and on a
    large plan those records are most of the memory.
    """
    out = Collector(plan.source)
    net = plan.net
    offset = localtime.utc_offset_min(net.timezone, localtime.reference_day(net.valid_from, net.valid_to))
    labels = localtime.local_labels(offset)
    allowed = np.stack([localtime.allowed_utc_hours(c.hours, offset) for c in plan.channels], axis=1)  # (24, c)

    setup = solve_station_antennas(plan, out)
    if out.has_errors:
        return CompiledPlan(_skeleton(plan, labels, allowed, offset), out.sorted())
    pred = predict_links(plan, setup)

    station_ids = [s.id for s in plan.stations]
    links = plan.links
    choices = schedule.link_choices(pred.good_days, pred.margin_db, allowed)
    net_sched = schedule.net_schedule(pred.good_days, pred.margin_db, allowed)
    gaps = schedule.find_gaps(pred.good_days, allowed, pred.luf_mhz, pred.owf_mhz, target=net.target_good_days,
                              margin_db=pred.margin_db)
    station_links = [tuple(i for i, (a, b) in enumerate(links) if sid in (a, b)) for sid in station_ids]
    daylight = _daylight(pred.sun_utc_h)
    scans = schedule.scan_lists(pred.good_days, allowed, np.array([c.mhz for c in plan.channels]), station_links,
                                [s.scan_rate for s in plan.stations],
                                address_word_count=[schedule.address_words(s.address) for s in plan.stations],
                                daylight=daylight)

    ch_ids = [c.id for c in plan.channels]

    def cid(i):
        return None if i is None else ch_ids[i]

    data = _skeleton(plan, labels, allowed, offset)
    data["assumptions"] = {**data["assumptions"], **pred.assumptions}
    for s, sun in zip(data["stations"], pred.sun_utc_h):
        s["sun"] = _sun(sun, offset, pred.sun_date)

    data["links"] = []
    for li, (a, b) in enumerate(links):
        hours = []
        for h in range(24):
            records = [{
                "channel": ch_ids[c], "freq_khz": plan.channels[c].khz,
                "snr_db": _r(pred.snr_db[li, h, c], 1), "margin_db": _r(pred.margin_db[li, h, c], 1),
                "good_days": _r(pred.good_days[li, h, c], 3), "via": pred.via_name(li, h, c),
                "skip": bool(pred.skip[li, h, c]), "allowed": bool(allowed[h, c]),
            } for c in range(len(ch_ids))] if cells else []
            hours.append({
                "utc_hour": h, "local_time": labels[h],
                "muf_mhz": _r(pred.muf_mhz[li, h]), "owf_mhz": _r(pred.owf_mhz[li, h]), "luf_mhz": _r(pred.luf_mhz[li, h]),
                "elevation_deg": _r(pred.elevation_deg[li, h], 1),
                "first": cid(choices.first[li][h]), "second": cid(choices.second[li][h]),
                "channels": records,
            })
        data["links"].append({
            "id": link_id(a, b), "from": a, "to": b,
            "distance_km": _r(pred.distance_km[li], 1), "azimuth_deg": _r(pred.azimuth_deg[li], 1),
            "hops": int(pred.n_hops[li]), "hours": hours,
        })

    nd = net_sched.to_dict()
    weakest_link = _weakest_links(pred.good_days, [h["first"] for h in nd["hours"]])
    data["net_schedule"] = {
        "changes_per_day": nd["changes_per_day"], "change_penalty": nd["change_penalty"], "cyclic": nd["cyclic"],
        "hours": [{
            "utc_hour": h["utc_hour"], "local_time": labels[h["utc_hour"]],
            "first": cid(h["first"]), "second": cid(h["second"]),
            "weakest_good_days": _r(h["weakest_good_days"] or 0.0, 3),
            "second_good_days": _r(_weakest(pred.good_days, h["second"], h["utc_hour"]), 3),
            "weakest_link": None if weakest_link[h["utc_hour"]] is None else link_id(*links[weakest_link[h["utc_hour"]]]),
            "best": cid(h["best"]), "best_good_days": _r(h["best_good_days"] or 0.0, 3),
        } for h in nd["hours"]],
    }
    data["gaps"] = [_gap(part, links, labels, ch_ids, out, plan) for g in gaps for part in _split_gap(g.to_dict())]

    sd = scans.to_dict()
    data["scan_lists"] = [_scan_list(st, station_ids, ch_ids) for st in sd["stations"]]
    data["scan_list_rules"] = {"useful_good_days": sd["useful_good_days"], "formula": sd["formula"]}
    for c in sd["unused_channels"]:
        out.warning("wasted-channel", f"channels[{c}]",
                    f"channels[{c}]: channel {ch_ids[c]} ({plan.channels[c].khz:g} kHz) serves no link at any hour in "
                    f"the validity period; scanning it wastes call time", _At(*plan.where(f"channels[{c}]")))

    data["antennas"] = setup.to_dicts(plan, ch_ids)
    _antenna_warnings(plan, setup, pred, out)
    data["diagnostics"] = [d.to_dict() for d in out.sorted()]
    return CompiledPlan(data, out.sorted(), pred)


@dataclass(frozen=True)
class _At:
    line: int
    col: int


def _skeleton(plan: Plan, labels: list[str], allowed: np.ndarray, offset: int) -> dict:
    """The parts of plan.json that need no analysis."""
    net = plan.net
    control = plan.control
    offsets = localtime.utc_offsets_min(net.timezone, net.valid_from, net.valid_to)
    notes = []
    if len(offsets) > 1:
        notes.append(f"the UTC offset of {net.timezone} changes during the validity period; local times use the offset "
                     f"on {localtime.reference_day(net.valid_from, net.valid_to).isoformat()} (UTC{_fmt_offset(offsets[0])} / "
                     f"UTC{_fmt_offset(offsets[1])}); the UTC column is always right")
    return {
        "planpack": 1,
        "generator": {"name": "planpack", "version": __version__},
        "net": {
            "id": net.id, "title": net.title, "handling": net.handling, "timezone": net.timezone,
            "utc_offset": _fmt_offset(offset),
            "valid": {"from": net.valid_from.isoformat(), "to": net.valid_to.isoformat()},
            "net_address": net.net_address, "base_url": net.base_url, "instructions_md": net.instructions,
            "target_good_days": net.target_good_days, "card_size": net.card_size,
            "links_rule": net.links if isinstance(net.links, str) else "list",
            "control": control.id if control else None,
        },
        "revision": plan_revision(plan.source, plan.sha256).to_dict(),
        "assumptions": {
            "months": [f"{y:04d}-{m:02d}" for y, m in localtime.months_touched(net.valid_from, net.valid_to)],
            "solar": {"index": net.solar.index, "values": list(net.solar.values)},
            "worst_case": "each figure is the worst case over the months and solar levels listed",
            "notes": notes,
        },
        "stations": [{
            "id": s.id, "name": s.name, "address": s.address, "role": s.role,
            "lat_deg": s.at.lat_deg, "lon_deg": s.at.lon_deg, "grid": s.at.grid, "power_w": s.power_w,
            "noise": s.noise, "noise_margin_db": s.noise_margin_db, "antennas": list(s.antennas),
            "ground": {"soil": s.ground.soil, "system": s.ground.system,
                       "instruction": safety.GROUNDING[s.ground.system]},
            "scan_rate": s.scan_rate,
            "sun": {"date": "", "sunrise_utc": None, "sunset_utc": None, "sunrise_local": None, "sunset_local": None},
        } for s in plan.stations],
        "channels": [{
            "id": c.id, "freq_khz": c.khz, "mode": c.mode, "note": c.note,
            "hours_local": None if c.hours is None else [f"{localtime.hhmm(a)}-{localtime.hhmm(b) if b != 1440 else '24:00'}" for a, b in c.hours],
            "allowed_utc_hours": [h for h in range(24) if allowed[h, i]],
            "required_snr_db": plan.modes[c.mode].snr_db, "bandwidth_hz": plan.modes[c.mode].bandwidth_hz,
        } for i, c in enumerate(plan.channels)],
        "modes": {m: plan.modes[m].to_dict() for m in sorted({c.mode for c in plan.channels})},
        "links": [],
        "net_schedule": {"changes_per_day": 0, "hours": [
            {"utc_hour": h, "local_time": labels[h], "first": None, "second": None, "weakest_good_days": 0.0} for h in range(24)]},
        "gaps": [],
        "scan_lists": [],
        "antennas": [],
        "safety": safety.cautions(),
        "diagnostics": [],
    }


def _fmt_offset(minutes: int) -> str:
    sign = "+" if minutes >= 0 else "-"
    m = abs(minutes)
    return f"{sign}{m // 60:02d}:{m % 60:02d}"


def _sun(sun: tuple, offset: int, date: str) -> dict:
    rise, set_ = sun
    return {
        "date": date,
        "sunrise_utc": None if rise is None else localtime.hhmm(rise * 60),
        "sunset_utc": None if set_ is None else localtime.hhmm(set_ * 60),
        "sunrise_local": None if rise is None else localtime.hhmm(rise * 60 + offset),
        "sunset_local": None if set_ is None else localtime.hhmm(set_ * 60 + offset),
    }


def _daylight(sun_utc_h: list[tuple]) -> np.ndarray:
    """(stations, 24) bool: the sun is up at the middle of the UTC hour."""
    out = np.zeros((len(sun_utc_h), 24), bool)
    mid = np.arange(24) + 0.5
    for i, (rise, set_) in enumerate(sun_utc_h):
        if rise is None and set_ is None:
            continue  # polar night (or day); leave it to the split's own rule
        rise = 0.0 if rise is None else rise
        set_ = 24.0 if set_ is None else set_
        out[i] = (mid >= rise) & (mid < set_) if rise < set_ else (mid >= rise) | (mid < set_)
    return out


def _weakest(good: np.ndarray, channel: int | None, hour: int) -> float:
    if channel is None or good.shape[0] == 0:
        return 0.0
    return float(good[:, hour, channel].min())


def _weakest_links(good: np.ndarray, firsts: list[int | None]) -> list[int | None]:
    out = []
    for h, c in enumerate(firsts):
        out.append(None if c is None or good.shape[0] == 0 else int(np.argmin(good[:, h, c])))
    return out


def _split_gap(d: dict) -> list[dict]:
    """Cut a gap into runs of hours that one frequency window serves: one request per run.

    The scheduler groups hours by the reason of the gap; a night-and-day gap
    has no single window, but a night window and a day window: the request a
    planner sends is one channel for each.
    """
    if d["window_mhz"] is not None or d["reason"] == schedule.NOT_AUTHORISED or len(d["utc_hours"]) < 2:
        return [d]
    parts: list[dict] = []
    cur: dict | None = None
    for h, hour_links, w in zip(d["utc_hours"], d["links_by_hour"], d["window_by_hour_mhz"]):
        joined = None
        if cur is not None and w is not None and cur["window_mhz"] is not None:
            lo, hi = max(cur["window_mhz"][0], w[0]), min(cur["window_mhz"][1], w[1])
            joined = [lo, hi] if lo <= hi else None
        if cur is not None and (joined is not None or (w is None and cur["window_mhz"] is None)):
            cur["utc_hours"].append(h)
            cur["links"] = sorted(set(cur["links"]) | set(hour_links))
            cur["window_mhz"] = joined
        else:
            cur = {**d, "utc_hours": [h], "links": sorted(hour_links), "window_mhz": None if w is None else list(w)}
            parts.append(cur)
    return parts


def _gap(d: dict, links, labels, ch_ids, out: Collector, plan: Plan) -> dict:
    names = [link_id(*links[i]) for i in d["links"]]
    hours = d["utc_hours"]
    local = schedule.format_hours(hours, labels)
    utc = schedule.format_hours(hours)
    pretty = ", ".join(f"{a}–{b}" for a, b in (links[i] for i in d["links"]))
    win = d["window_mhz"]
    inside = [] if win is None else [c for c in plan.channels if win[0] <= c.mhz <= win[1]]
    if d["reason"] == schedule.NOT_AUTHORISED:
        extra = "; " + ", ".join(ch_ids[c] for c in d["channels_outside_hours"]) + " would, but is not authorised then"
    elif win is not None and inside:
        extra = (f"; {', '.join(c.id for c in inside)} lie{'s' if len(inside) == 1 else ''} in the usable window "
                 f"{win[0]:.1f}-{win[1]:.1f} MHz but fall{'s' if len(inside) == 1 else ''} short of the target on too many days: "
                 f"more power, a better-matched antenna or a quieter receiving site would help more than another channel")
    elif win is not None:
        extra = f"; a channel between {win[0]:.1f} and {win[1]:.1f} MHz would"
    else:
        extra = "; no single frequency would serve them all at those hours: request channels per link or split the net"
    message = (f"no assigned channel serves {pretty} {local} local ({utc} UTC){extra}; "
               "'planpack request PLAN' proposes the fewest new frequencies to ask for")
    out.warning("channel-gap", "channels", f"channels: {message}", _At(*plan.where("channels")))
    return {
        "links": names, "utc_hours": hours, "local_hours": [labels[h] for h in hours],
        "window_mhz": None if win is None else [_r(win[0]), _r(win[1])],
        "reason": d["reason"], "net_window_mhz": None if d["net_window_mhz"] is None else [_r(x) for x in d["net_window_mhz"]],
        "channels_outside_hours": [ch_ids[c] for c in d["channels_outside_hours"]],
        "message": message,
    }


def _scan_list(st: dict, station_ids: list[str], ch_ids: list[str]) -> dict:
    def group(name, channels, call):
        return {"name": name, "channels": [ch_ids[c] for c in channels],
                "scan_period_s": _r(call["scan_period_s"] if call else 0.0, 1),
                "call_time_s": _r(call["total_s"] if call else 0.0, 1),
                "utc_hours": None}

    groups = [group("all", st["channels"], st["call"])]
    split = st["split"]
    suggested = bool(split and split["suggested"])
    if split:
        for part in ("day", "night"):
            g = group(part, split[part]["channels"], split[part]["call"])
            g["utc_hours"] = split[part]["utc_hours"]
            groups.append(g)
    note = ""
    if suggested:
        note = (f"load a day group and a night group: the longer one scans in {groups[1]['scan_period_s']:g} s "
                f"or {groups[2]['scan_period_s']:g} s instead of {groups[0]['scan_period_s']:g} s")
    return {"station": station_ids[st["station"]], "groups": groups, "wasted": [ch_ids[c] for c in st["wasted"]],
            "split_suggested": suggested, "note": note, "scan_rate": st["scan_rate_chps"]}


def _swr_text(swr: float) -> str:
    return f"{swr:.1f}:1" if swr < 10 else f"{swr:.0f}:1"


def _antenna_warnings(plan: Plan, setup: StationAntennas, pred: LinkPredictions, out: Collector) -> None:
    """SWR above 3:1 on a channel, dipoles outside the NVIS window on an NVIS net, whips alone on one."""
    nvis_net = len(plan.links) > 0 and float(np.max(pred.distance_km)) < NVIS_RANGE_KM
    for ant in plan.antennas:
        result = setup.primary[ant.id]
        at = _At(*plan.where(f"antennas.{ant.id}"))
        loss, matched = setup.loss(ant.id, result)
        if ant.kind != "whip":
            device = {"set-tuner": "the set's tuner", "wide-tuner": "the wide-range tuner",
                      "feedpoint-coupler": "the feed-point coupler"}[ant.matching]
            poor = [i for i, c in enumerate(plan.channels) if not matched[i] or result.swr[i] > 3.0]
            if poor:
                ids = [plan.channels[i].id for i in poor]
                listed = ", ".join(f"{plan.channels[i].id} {_swr_text(result.swr[i])}" for i in poor)
                lost = [i for i in poor if not matched[i]]
                tail = ""
                if lost:
                    tail = (f"; {device} cannot match {', '.join(plan.channels[i].id for i in lost)}: "
                            f"{min(loss[i] for i in lost):.0f}-{max(loss[i] for i in lost):.0f} dB of the power is lost there")
                kept = [i for i in poor if matched[i]]
                if kept:
                    tail += (f"; {device} matches {', '.join(plan.channels[i].id for i in kept)} "
                             f"with {max(loss[i] for i in kept):.1f} dB loss at most")
                out.warning("swr-high", f"antennas.{ant.id}",
                            f"antennas.{ant.id}: SWR above 3:1 on {len(ids)} of {len(plan.channels)} channels ({listed}){tail}", at)
        nv = result.nvis_window or {}
        if nvis_net and nv.get("applies") and nv.get("inside") is False:
            out.warning("nvis-height", f"antennas.{ant.id}.height_m",
                        f"antennas.{ant.id}.height_m: {ant.height_m:g} m is {nv['height_wavelengths']:.2f} wavelength at "
                        f"{nv['freq_khz']:g} kHz, outside the usual NVIS window of {nv['low_wavelengths']:g}-"
                        f"{nv['high_wavelengths']:g} wavelength ({nv['low_height_m']:.1f}-{nv['high_height_m']:.1f} m) "
                        f"for a net whose links are all under {NVIS_RANGE_KM:g} km", _At(*plan.where(f"antennas.{ant.id}.height_m")))
    if nvis_net:
        kinds = {a.id: a.kind for a in plan.antennas}
        for s in plan.stations:
            if all(kinds[a] == "whip" for a in s.antennas):
                out.warning("nvis-whip", f"stations.{s.id}.antenna",
                            f"stations.{s.id}.antenna: a whip alone on an NVIS net radiates little straight up; "
                            f"add a horizontal wire (dipole or inverted-V) for the short links",
                            _At(*plan.where(f"stations.{s.id}.antenna")))
