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

from planpack import __version__, briefing, localtime, safety, schedule
from planpack.antennas import LOSS_WARN_DB
from planpack.ionosphere import atmospheric, geomagnetic, noise
from planpack.plan.diagnostics import Collector, Diagnostic
from planpack.plan.models import Plan
from planpack.predictions import LinkPredictions, predict_links
from planpack.requests.engine import plan_requests
from planpack.revision import plan_revision
from planpack.scheduling.windows import NO_WINDOW_SLIVER
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
    allowed = localtime.authorised_utc_hours([c.hours for c in plan.channels], net.timezone, net.valid_from,
                                             net.valid_to)  # (24, c), on every day, across a clock change

    setup = solve_station_antennas(plan, out)
    if out.has_errors:
        return CompiledPlan(_skeleton(plan, labels, allowed, offset), out.sorted())
    pred = predict_links(plan, setup)

    station_ids = [s.id for s in plan.stations]
    links = plan.links
    choices = schedule.link_choices(pred.good_days, pred.margin_db, allowed)
    net_sched = schedule.net_schedule(pred.good_days, pred.margin_db, allowed, target=net.target_good_days)
    gaps = schedule.find_gaps(pred.good_days, allowed, pred.luf_mhz, pred.owf_mhz, target=net.target_good_days,
                              margin_db=pred.margin_db, grid_good_days=pred.grid_good_days, grid_mhz=pred.grid_mhz,
                              channel_mhz=np.array([c.mhz for c in plan.channels]))
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
                "luf_below_floor": bool(pred.luf_below_floor[li, h]),
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
    data["gaps"] = [_gap(g.to_dict(), links, labels, ch_ids, out, plan) for g in gaps]

    sd = scans.to_dict()
    data["scan_lists"] = [_scan_list(st, station_ids, ch_ids) for st in sd["stations"]]
    data["scan_list_rules"] = {"useful_good_days": sd["useful_good_days"], "formula": sd["formula"]}
    for c in briefing.reconcile_scan_lists(data, plan, sd["unused_channels"]):
        out.warning("wasted-channel", f"channels[{c}]",
                    f"channels[{c}]: channel {ch_ids[c]} ({plan.channels[c].khz:g} kHz) serves no link at any hour in "
                    f"the validity period; scanning it wastes call time", _At(*plan.where(f"channels[{c}]")))

    data["antennas"] = setup.to_dicts(plan, ch_ids)
    # the fewest frequencies to ask for, when there are gaps: the site's request page shows them
    data["requests"] = plan_requests(plan, setup, pred) if cells and data["gaps"] else None
    _antenna_warnings(plan, setup, pred, out)
    _noise_warnings(plan, labels, out, _scheduled(data))
    _high_latitude_warning(plan, out)
    briefing.add_briefing(data, plan, setup, pred, gaps, out)
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
            "utc_offset": _fmt_offset(offset), **briefing.clock(net.timezone, net.valid_from, net.valid_to, offset),
            "fallback": net.fallback,
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
        "requests": None,
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


def _gap(d: dict, links, labels, ch_ids, out: Collector, plan: Plan) -> dict:
    names = [link_id(*links[i]) for i in d["links"]]
    hours = d["utc_hours"]
    utc = schedule.format_hours(hours)
    offsets = localtime.utc_offsets_min(plan.net.timezone, plan.net.valid_from, plan.net.valid_to)
    if len(offsets) > 1:  # a clock change: local times on both sides of it
        local = " or ".join(f"{schedule.format_hours(hours, localtime.local_labels(o))} {localtime.offset_label(o)}"
                            for o in offsets)
    else:
        local = schedule.format_hours(hours, labels)
    pretty = ", ".join(f"{a}–{b}" for a, b in (links[i] for i in d["links"]))
    win = d["window_mhz"]
    target_pct = f"{round(100 * plan.net.target_good_days):d} %"
    reaches = bool(d.get("window_reaches_target"))
    inside = [] if win is None else [c for c in plan.channels if win[0] <= c.mhz <= win[1]]
    if d["reason"] == schedule.NOT_AUTHORISED:
        chans = [ch_ids[c] for c in d["channels_outside_hours"]]
        extra = (f"; {_and(chans)} would serve {'it' if len(chans) == 1 else 'them'}, but "
                 f"{'is' if len(chans) == 1 else 'are'} not authorised then.")
    elif win is not None and inside and reaches:
        extra = (f"; {_and([c.id for c in inside])} lie{'s' if len(inside) == 1 else ''} in the window "
                 f"{win[0]:.2f}–{win[1]:.2f} MHz where a channel would serve, but fall{'s' if len(inside) == 1 else ''} "
                 f"short of the target there on too many days: more power, a better-matched antenna or a quieter "
                 f"receiving site would help more than another channel.")
    elif win is not None and inside:
        got = d.get("window_good_days") or 0.0
        extra = (f"; {_short_of(d, target_pct)}, and "
                 f"{_and([c.id for c in inside])} already lie{'s' if len(inside) == 1 else ''} where the band does best "
                 f"for all of them together ({win[0]:.2f}–{win[1]:.2f} MHz, about {int(100 * got)} % of days at the "
                 f"worst hour): more power, a better antenna or a quieter receiving site will help more than "
                 f"another channel.")
    elif win is not None and reaches:
        extra = (f"; a channel between {win[0]:.2f} and {win[1]:.2f} MHz would serve them on at least "
                 f"{target_pct} of days.")
    elif win is not None:
        got = d.get("window_good_days") or 0.0
        extra = (f"; {_short_of(d, target_pct)}: the best is a channel "
                 f"between {win[0]:.2f} and {win[1]:.2f} MHz, working on about {int(100 * got)} % of days, so ask for "
                 f"one there and add power, a better antenna or a quieter receiving site to reach the target.")
    else:
        why = d.get("no_window_reason") or "no single frequency would serve them all"
        extra = (f"; {why}, so no one new channel closes this gap: request channels per link, relay through "
                 f"another station or split the net.")
    when = "at every hour of the day" if len(hours) == 24 else f"at {local} local ({utc} UTC)"
    message = f"no assigned channel serves {pretty} {when}{extra} {REQUEST_HINT}"
    out.warning("channel-gap", "channels", f"channels: {message}", _At(*plan.where("channels")))
    return {
        "links": names, "utc_hours": hours, "local_hours": [labels[h] for h in hours],
        "window_mhz": None if win is None else [_r(win[0]), _r(win[1])],
        "reason": d["reason"], "net_window_mhz": None if d["net_window_mhz"] is None else [_r(x) for x in d["net_window_mhz"]],
        "channels_outside_hours": [ch_ids[c] for c in d["channels_outside_hours"]],
        "no_window_reason": d.get("no_window_reason"),
        "window_good_days": _r(d.get("window_good_days"), 3),
        "window_reaches_target": bool(d.get("window_reaches_target")),
        "window_text": _window_text(win, reaches, d.get("window_good_days"), target_pct,
                                    d.get("no_window_reason") == NO_WINDOW_SLIVER),
        "message": message,
    }


def _short_of(d: dict, target_pct: str) -> str:
    """Why a gap's window is only the best the band offers."""
    if d.get("no_window_reason") == NO_WINDOW_SLIVER:
        return (f"only a sliver of the band under 100 kHz wide reaches the target of {target_pct} of days for "
                f"all of them, too narrow to count on")
    return f"no frequency reaches the target of {target_pct} of days for all of them"


def _window_text(win, reaches: bool, good: float | None, target_pct: str, sliver: bool = False) -> str:
    """A gap's window as pages and cards print it."""
    if win is None:
        return "no single frequency closes it"
    span = f"{win[0]:.2f}–{win[1]:.2f} MHz"
    if reaches:
        return span
    short = f"{target_pct} only in a sliver under 100 kHz" if sliver else f"none reaches {target_pct}"
    return f"{short}; best {span} ({int(100 * (good or 0.0))} % of days)"


#: The last sentence of every gap warning.
REQUEST_HINT = "Run 'planpack request PLAN' for the fewest new frequencies to ask for."


def _and(items: list[str]) -> str:
    """'A', 'A and B', 'A, B and C'."""
    return items[0] if len(items) == 1 else ", ".join(items[:-1]) + " and " + items[-1]


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


#: Rise of the median noise that lightning causes at a receiving site, on the channels the schedule
#: uses, that counts as ruling the site [dB]: ten times the power of the other noise, well beyond the
#: model's own uncertainty of about 6 dB (a design choice).
ATMOSPHERIC_RULES_DB = 10.0


def _scheduled(data: dict) -> list[set[int]]:
    """Per UTC hour, the indices of the channels the schedule names: the net's first and second, each link's first."""
    index = {c["id"]: i for i, c in enumerate(data["channels"])}
    used: list[set[int]] = [set() for _ in range(24)]
    for h in data["net_schedule"]["hours"]:
        used[h["utc_hour"]] |= {index[c] for c in (h["first"], h["second"]) if c}
    for link in data["links"]:
        for h in link["hours"]:
            if h["first"]:
                used[h["utc_hour"]].add(index[h["first"]])
    return used


def _noise_warnings(plan: Plan, labels: list[str], out: Collector, used: list[set[int]]) -> None:
    """Warn, per receiving station, where ITU-R P.372 lightning noise raises the noise on the channels
    the schedule uses at some hours by :data:`ATMOSPHERIC_RULES_DB` or more.

    ``used[h]`` holds the channel indices the schedule names at UTC hour h (the net's first and second
    and each link's first). The rise is the median atmospheric noise summed with the site's man-made and
    galactic noise, against those two alone.
    """
    receivers = sorted({sid for link in plan.links for sid in link})
    if not receivers or not any(used):
        return
    months = [m for _, m in localtime.months_touched(plan.net.valid_from, plan.net.valid_to)]
    by_id = {s.id: s for s in plan.stations}
    hours = np.array([h for h in range(24) for _ in used[h]], float)
    f = np.array([plan.channels[c].mhz for h in range(24) for c in sorted(used[h])])
    for sid in receivers:
        s = by_id[sid]
        cat = noise.CATEGORIES[_NOISE_KEY[s.noise]]
        quiet = noise.combine_noise_db(noise.man_made_noise_db(f, cat.c_db, cat.d), noise.galactic_noise_db(f))
        rise = np.full(f.size, -np.inf)
        for month in months:
            atm, _, _ = atmospheric.atmospheric_noise_db(f, s.at.lat_deg, s.at.lon_deg, month, hours)
            rise = np.maximum(rise, noise.combine_noise_db(quiet, atm) - quiet)
        hot = rise >= ATMOSPHERIC_RULES_DB
        if not hot.any():
            continue
        at = sorted({int(h) for h in hours[hot]})
        k = int(np.argmax(rise))
        when = ("at every hour" if len(at) == 24 else
                f"at {schedule.format_hours(at, labels)} local ({schedule.format_hours(at)} UTC)")
        out.warning("atmospheric-noise", f"stations.{sid}.noise",
                    f"stations.{sid}.noise: lightning noise probably rules this receiving site {when}: on the "
                    f"channels scheduled then it raises the noise by up to {rise[k]:.0f} dB over the {s.noise} "
                    f"man-made and galactic noise ({f[k]:.2f} MHz at {labels[int(hours[k])]} local). The predictions "
                    f"include it (a coarse ITU-R P.372 model, about 6 dB either way): expect weaker contacts "
                    f"there and prefer the highest channel that still carries.",
                    _At(*plan.where(f"stations.{sid}.noise")))


def _high_latitude_warning(plan: Plan, out: Collector) -> None:
    """Warn once when stations lie in the auroral zone or the polar cap, whose absorption events
    the monthly-median predictions leave out."""
    linked = {sid for link in plan.links for sid in link}
    found = []
    for s in plan.stations:
        if s.id not in linked:
            continue
        m = geomagnetic.dipole_latitude_deg(s.at.lat_deg, s.at.lon_deg)
        z = geomagnetic.zone(m)
        if z is not None:
            found.append((s, m, z))
    if not found:
        return
    names = _and([f"{s.id} ({abs(m):.0f}\N{DEGREE SIGN})" for s, m, _ in found])
    zones = sorted({z for _, _, z in found}, reverse=True)
    where = " and ".join(f"the {z}" for z in zones)
    pcap = ("; polar-cap absorption, after a solar proton event, can close all of HF across the cap for days"
            if "polar cap" in zones else "")
    key = f"stations.{found[0][0].id}.at"
    out.warning("high-latitude", key,
                f"{key}: {names} {'lies' if len(found) == 1 else 'lie'} at geomagnetic latitudes (centred dipole) "
                f"in {where}. The predictions are "
                f"monthly medians and leave out auroral absorption, which on disturbed nights and mornings can "
                f"close the lower channels for hours{pcap}. Expect the good-days figures to be optimistic; keep "
                f"the highest channel that carries, a fixed schedule and another means of communication ready.",
                _At(*plan.where(key)))


_NOISE_KEY = {"city": "city", "residential": "residential", "rural": "rural", "quiet-rural": "quiet_rural"}


def _channel_list(plan: Plan, idx: list[int]) -> str:
    return ", ".join(f"{plan.channels[i].id} ({plan.channels[i].khz:g} kHz)" for i in idx)


def _antenna_warnings(plan: Plan, setup: StationAntennas, pred: LinkPredictions, out: Collector) -> None:
    """What a planner acts on about the antennas: wire ends within reach, NEC results not to be trusted,
    much of the set's power lost before the antenna a station rigs on a channel (how much and why),
    dipoles outside the NVIS window on an NVIS net, and whips alone on one."""
    nvis_net = len(plan.links) > 0 and float(np.max(pred.distance_km)) < NVIS_RANGE_KM
    ch_ids = [c.id for c in plan.channels]
    picks = {s.id: setup.best_antenna(s) for s in plan.stations}
    for ant in plan.antennas:
        result = setup.primary[ant.id]
        key = f"antennas.{ant.id}"
        at = _At(*plan.where(key))
        for w in result.warnings:
            if w.get("code") == "wire-ends-low":
                out.warning("antenna-ends-low", f"{key}.height_m", f"{key}.height_m: {w['message']}",
                            _At(*plan.where(f"{key}.height_m")))
        unsolved = [i for i in range(len(ch_ids)) if not result.losses.usable[i]]
        if unsolved:
            out.warning("antenna-unreliable", key,
                        f"{key}: NEC gives a non-physical feed resistance on {_channel_list(plan, unsolved)}, so the "
                        "figures there are not to be trusted and the link budget counts the antenna as unusable on "
                        "them; wire ends near the ground far below resonance are the usual cause.", at)
        # channels on which a station rigs this antenna (its best there) and loses much of its power on the way
        lossy: dict[int, tuple[float, str]] = {}  # channel -> (worst loss [dB], station it is at)
        rigs: set[str] = set()
        for s in plan.stations:
            if ant.id not in s.antennas:
                continue
            r = setup.by_station[(s.id, ant.id)]
            for i, p in enumerate(picks[s.id]):
                loss = float(r.system_loss_db[i])
                if p.antenna == ant.id and r.losses.usable[i] and loss > LOSS_WARN_DB:
                    rigs.add(s.id)
                    if i not in lossy or loss > lossy[i][0]:
                        lossy[i] = (loss, s.id)
        if lossy:
            idx = sorted(lossy)
            worst = max(idx, key=lambda i: lossy[i][0])
            r = setup.by_station[(lossy[worst][1], ant.id)]
            listed = ", ".join(f"{ch_ids[i]} {lossy[i][0]:.0f} dB" for i in idx)
            named = sorted(rigs)
            who = ", ".join(named[:4]) + (f" and {len(named) - 4} more" if len(named) > 4 else "")
            out.warning("antenna-loss", key,
                        f"{key}: more than {LOSS_WARN_DB:g} dB of the set's power is lost before this antenna on the "
                        f"channels where it is the best a station has ({listed}; rigged by {who}). "
                        f"{r.loss_note(worst)}", at)
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
