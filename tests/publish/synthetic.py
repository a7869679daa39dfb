"""A synthetic compiled plan (the ``data`` dict) for rendering tests.

Invented figures shaped like the compiled-plan contract: smooth day/night
curves, channels that work when they sit inside the window, no physics. It
validates against planpack.output_schema, which the tests check. One station
name is a script-injection attempt, so every page shows how it is escaped.
"""

from __future__ import annotations

import copy
import math

INJECTION = "<script>alert(1)</script>"

CHANNELS = [
    ("K1", 2410.0, "usb", "night low", None),
    ("K2", 3650.0, "usb", None, None),
    ("K3", 5120.0, "ale", "day & night", None),
    ("K4", 7010.0, "usb", None, ["07:00-19:00"]),
]


def _local(h: int, offset: int = 1) -> str:  # offset [h]
    return f"{(h + offset) % 24:02d}:00"


def _window(h: int, scale: float = 1.0) -> tuple[float, float, float | None]:
    """Invented MUF, OWF, LUF for UTC hour h [MHz]: high by day, low at night."""
    day = max(0.0, math.cos((h - 11) / 24 * 2 * math.pi))
    muf = round((3.0 + 5.0 * day) * scale, 2)
    owf = round(muf * 0.85, 2)
    luf = round(1.8 + 2.2 * day, 2) if h % 7 else None
    return muf, owf, luf


def _allowed(hours_local: list[str] | None, h: int) -> bool:
    if hours_local is None:
        return True
    local = (h + 1) % 24
    return 7 <= local < 19


def _link(lid: str, a: str, b: str, km: float, scale: float, gap_hours: set[int]) -> dict:
    hours = []
    for h in range(24):
        muf, owf, luf = _window(h, scale)
        cells = []
        for cid, khz, _mode, _note, hl in CHANNELS:
            f = khz / 1000
            inside = (luf or 1.5) < f < muf
            good = 0.0 if h in gap_hours else (0.95 if inside else 0.2)
            if inside and f > owf:
                good = 0.7 if h not in gap_hours else 0.0
            cells.append({"channel": cid, "freq_khz": khz, "snr_db": round(10 + 20 * good, 1),
                          "margin_db": round(-5 + 20 * good, 1), "good_days": good,
                          "via": "F2" if inside else None, "skip": False, "allowed": _allowed(hl, h)})
        usable = sorted((c for c in cells if c["allowed"] and c["good_days"] >= 0.5),
                        key=lambda c: (-c["good_days"], c["freq_khz"]))
        first = usable[0]["channel"] if usable else None
        second = usable[1]["channel"] if len(usable) > 1 else None
        hours.append({"utc_hour": h, "local_time": _local(h), "muf_mhz": muf, "owf_mhz": owf, "luf_mhz": luf,
                      "elevation_deg": 78.0, "first": first, "second": second, "channels": cells})
    return {"id": lid, "from": a, "to": b, "distance_km": km, "azimuth_deg": 123.4, "hops": 1, "hours": hours}


def synthetic_data(net_id: str = "test-net", *, title: str = "Lakeside exercise net",
                   valid_from: str = "2027-03-08", valid_to: str = "2027-03-26",
                   station_name: str = INJECTION, handling: str | None = "EXERCISE ONLY",
                   clock_change: bool = False) -> dict:
    stations = [
        {"id": "ops", "name": "Operations cell", "address": "OPSX", "role": "control", "lat_deg": 47.3769,
         "lon_deg": 8.5417, "grid": "JN47pj", "power_w": 100.0, "noise": "residential", "noise_margin_db": 0.0,
         "antennas": ["main-dipole"], "ground": {"soil": "medium-dry", "system": "rods"}, "scan_rate": 2.0,
         "sun": {"date": "2027-03-17", "sunrise_utc": "05:31", "sunset_utc": "17:29",
                 "sunrise_local": "06:31", "sunset_local": "18:29"}},
        {"id": "ridge", "name": station_name, "address": "RIDGEX", "role": "member", "lat_deg": 46.8,
         "lon_deg": 9.83, "grid": "JN46wt", "power_w": 20.0, "noise": "rural", "noise_margin_db": 0.0,
         "antennas": ["field-invv"], "ground": {"soil": "very-dry", "system": "counterpoise"}, "scan_rate": 2.0,
         "sun": {"date": "2027-03-17", "sunrise_utc": "05:26", "sunset_utc": "17:24",
                 "sunrise_local": "06:26", "sunset_local": "18:24"}},
        {"id": "lake", "name": "Lake shore post", "address": "LAKEX", "role": "member", "lat_deg": 46.01,
         "lon_deg": 8.96, "grid": "JN46le", "power_w": 50.0, "noise": "quiet-rural", "noise_margin_db": 3.0,
         "antennas": ["field-invv"], "ground": {"soil": "wet", "system": "radials"}, "scan_rate": 2.0,
         "sun": {"date": "2027-03-17", "sunrise_utc": "05:30", "sunset_utc": "17:28",
                 "sunrise_local": "06:30", "sunset_local": "18:28"}},
    ]
    links = [_link("ops--ridge", "ops", "ridge", 123.4, 1.0, set()),
             _link("ops--lake", "ops", "lake", 155.0, 0.9, {2, 3})]
    net_hours = []
    for h in range(24):
        a, b = links[0]["hours"][h], links[1]["hours"][h]
        both = a["first"] if b["first"] is not None else None
        net_hours.append({"utc_hour": h, "local_time": _local(h), "first": both,
                          "second": a["second"] if both else None,
                          "weakest_good_days": 0.9 if both else 0.0, "second_good_days": 0.6 if both else 0.0,
                          "weakest_link": "ops--lake"})
    channels = [{"id": cid, "freq_khz": khz, "mode": mode, "note": note, "hours_local": hl,
                 "allowed_utc_hours": [h for h in range(24) if _allowed(hl, h)],
                 "required_snr_db": 10.0, "bandwidth_hz": 2700.0} for cid, khz, mode, note, hl in CHANNELS]

    def antenna(aid: str, kind: str, st: list[str], height: float, cut: dict | None) -> dict:
        rows = []
        for i, (cid, khz, *_rest) in enumerate(CHANNELS):
            swr = [3.8, 1.3, 2.4, 6.5][i] if kind == "dipole" else [2.2, 1.6, 1.2, 3.4][i]
            cls = "fine" if swr <= 2 else ("tuner" if swr <= 3 else "poor")
            rows.append({"channel": cid, "freq_khz": khz, "impedance_ohm": [round(50 * swr, 1), 12.5], "swr": swr,
                         "swr_class": cls, "mismatch_loss_db": round(0.1 * swr, 2), "feedline_loss_db": 0.4})
        pattern = [{"channel": cid, "gain_dbi": [round(-20 + 27 * math.sin(math.radians(e)) ** (0.5 + i * 0.3), 2)
                                                  for e in range(91)]}
                   for i, (cid, *_r) in enumerate(CHANNELS[:3])]
        return {"id": aid, "kind": kind, "stations": st, "height_m": height, "cut": cut, "channels": rows,
                "pattern": {"peak_gain_dbi": 7.0, "zenith_gain_dbi": 6.8, "fraction_above_60deg": 0.42},
                "elevation_pattern": pattern, "height_wavelengths": 0.12,
                "nvis": {"ok": True}, "balun": "1:1 current balun at the feed point",
                "exposure": [{"station": s, "general_public_m": 2.5, "occupational_m": 1.1} for s in st],
                "notes": ["Trim both legs equally, 2 cm at a time, watching the SWR."]}

    antennas = [
        antenna("main-dipole", "dipole", ["ops"], 8.0,
                {"total_m": 41.06, "leg_m": 20.53, "rule_of_thumb_total_m": 39.1, "reflector_m": None,
                 "reflector_below_m": None, "total_ft_in": "134 ft 8 1/2 in", "leg_ft_in": "67 ft 4 1/4 in",
                 "rule_of_thumb_total_ft_in": "128 ft 3 1/2 in", "leg_cut_m": 20.68, "leg_cut_ft_in": "67 ft 10 1/4 in"}),
        antenna("field-invv", "inverted-v", ["ridge", "lake"], 9.0,
                {"total_m": 28.4, "leg_m": 14.2, "rule_of_thumb_total_m": 27.9, "reflector_m": None,
                 "reflector_below_m": None, "end_height_m": 2.1}),
    ]
    data = {
        "planpack": 1,
        "generator": {"name": "planpack", "version": "0.1.0"},
        "net": {"id": net_id, "title": title, "handling": handling, "timezone": "Europe/Zurich",
                "valid": {"from": valid_from, "to": valid_to}, "net_address": "LAKNET",
                "base_url": "https://intranet.example/nets/",
                "instructions_md": "**Check in** every odd hour.\n\n- first channel, then second\n- <b>raw</b> stays text\n"
                                   "\n[bad](javascript:alert(1)) and ![img](https://tracker.example/x.png)\n",
                "target_good_days": 0.9, "card_size": "3.5x5in", "links_rule": "hub", "control": "ops"},
        "revision": {"id": "c-1a2b3c4d5e6f", "kind": "content", "date": None},
        "assumptions": {"months": ["2027-03"], "solar": {"index": "ssn", "values": [40, 90], "ssn_used": [40, 90]},
                        "worst_case": "the lower solar index", "models": {"ionosphere": "invented for tests"},
                        "not_modelled": ["sporadic E"], "notes": ["Synthetic figures for rendering tests."]},
        "stations": stations,
        "channels": channels,
        "links": links,
        "net_schedule": {"changes_per_day": 4, "hours": net_hours},
        "gaps": [{"links": ["ops--lake"], "utc_hours": [2, 3], "local_hours": ["03:00", "04:00"],
                  "window_mhz": [2.1, 2.6], "message": "no assigned channel serves ops--lake at 03:00-04:00 local; "
                                                       "a channel between 2.1 and 2.6 MHz would close it"}],
        "scan_lists": [{"station": s["id"],
                        "groups": [{"name": "all", "channels": ["K1", "K2", "K3"], "scan_period_s": 1.5, "call_time_s": 4.2}],
                        "wasted": ["K4"], "split_suggested": False, "note": "K4 never serves this station"}
                       for s in stations],
        "antennas": antennas,
        "safety": {"cautions": [{"topic": "power lines", "text": "Keep every mast and wire well clear of power lines."},
                                {"topic": "lightning", "text": "Disconnect and ground the feedline when storms approach."}],
                   "deferral": "These notes do not replace local codes, the equipment's manuals or licensed practice."},
        "diagnostics": [{"file": "plans/test.yaml", "line": 12, "column": 5, "severity": "warning",
                         "code": "channel-gap", "key": "links.ops--lake",
                         "message": "no channel serves ops--lake at 03:00-04:00 local"}],
    }
    _add_brief(data, clock_change)
    return copy.deepcopy(data)


def _pct(x: float | None) -> int | None:
    return None if x is None else int(math.floor(round(x, 3) * 100 + 1e-6))


def _hour_fields(first, f, second, s, target: float, locals_: list[str]) -> dict:
    weak = first is None or f < target
    p1, p2 = (_pct(f) if first else None), (_pct(s) if second else None)
    fb = None
    if weak:
        fb = ({"channel": second, "good_days_pct": p2, "text": f"try {second} (works on {p2} % of days), then expect to repeat calls"}
              if second and p2 else {"channel": None, "good_days_pct": None, "text": "no second channel works then: expect to repeat calls"})
    return {"good_days_pct": p1, "second_good_days_pct": p2, "weak": weak, "fallback": fb, "local_times": locals_}


def _runs(rows: list[dict], offsets: list[int]) -> list[dict]:
    """Weak runs, one per block of consecutive weak hours (no banding: enough for rendering)."""
    weak = [h for h in range(24) if rows[h]["weak"]]
    runs, cur = [], []
    for h in weak:
        if cur and h == cur[-1] + 1:
            cur.append(h)
        else:
            if cur:
                runs.append(cur)
            cur = [h]
    if cur:
        runs.append(cur)
    out = []
    for run in runs:
        pcts = [rows[h]["good_days_pct"] or 0 for h in run]
        local = [f"{_local(run[0], o)}–{_local(run[-1] + 1, o)}" for o in offsets]
        out.append({"utc_hours": run, "utc": f"{run[0]:02d}:00–{(run[-1] + 1) % 24:02d}:00", "local": local[0],
                    "local_by_period": local, "good_days_pct_min": min(pcts), "good_days_pct_max": max(pcts),
                    "text": f"{' / '.join(local)}: works on almost no days ({min(pcts)}–{max(pcts)} %); "
                            "expect to repeat calls or use the second channel"})
    return out


def _add_brief(data: dict, clock_change: bool) -> None:
    """The briefing fields of the contract (docs/plan-json.md), shaped by hand from the invented figures."""
    offsets = [60, 120] if clock_change else [60]
    net = data["net"]
    net.update({"utc_offset": "+01:00", "utc_offset_label": "UTC+1", "fallback": None,
                "periods": ([{"from": net["valid"]["from"], "to": "2027-03-27", "utc_offset": "+01:00", "label": "UTC+1"},
                             {"from": "2027-03-28", "to": net["valid"]["to"], "utc_offset": "+02:00", "label": "UTC+2"}]
                            if clock_change else
                            [{"from": net["valid"]["from"], "to": net["valid"]["to"], "utc_offset": "+01:00", "label": "UTC+1"}]),
                "clock_changes": [{"date": "2027-03-28", "from": "+01:00", "to": "+02:00"}] if clock_change else []})
    rev = data["revision"]
    rev.update({"number": None, "issue_date": None, "label": f"Issue {rev['id']}, undated"})
    target = net["target_good_days"]
    locs = lambda h: [_local(h, o // 60) for o in offsets]  # noqa: E731
    for h in data["net_schedule"]["hours"]:
        h.update(_hour_fields(h["first"], h["weakest_good_days"], h["second"], h["second_good_days"], target,
                              locs(h["utc_hour"])))
    data["net_schedule"]["weak_runs"] = _runs(data["net_schedule"]["hours"], [o // 60 for o in offsets])
    for h in data["net_schedule"]["hours"]:
        hrs = [ln["hours"][h["utc_hour"]] for ln in data["links"]]
        lufs = [x["luf_mhz"] for x in hrs]
        win = None if None in lufs or max(lufs) >= min(x["owf_mhz"] for x in hrs) else [max(lufs), min(x["owf_mhz"] for x in hrs)]
        h["window_mhz"] = win
        h["channels"] = [{"channel": c["id"],
                          "good_days_pct": _pct(min(x["channels"][i]["good_days"] for x in hrs)),
                          "allowed": h["utc_hour"] in c["allowed_utc_hours"],
                          "in_window": win is not None and win[0] <= c["freq_khz"] / 1000 <= win[1]}
                         for i, c in enumerate(data["channels"])]
    for g in data["gaps"]:
        g["links_by_hour"] = [list(g["links"]) for _ in g["utc_hours"]]
        g["utc_text"] = f"{g['utc_hours'][0]:02d}:00–{(g['utc_hours'][-1] + 1) % 24:02d}:00"
        g["short"] = "03:00–05:00: no channel reaches LAKEX on enough days; relay through control or expect to repeat calls"
        g["local_by_period"] = [f"{_local(g['utc_hours'][0], o // 60)}–{_local(g['utc_hours'][-1] + 1, o // 60)}"
                                for o in offsets]
    gap_hours = {ln["id"]: sorted({h for g in data["gaps"] if ln["id"] in g["links"] for h in g["utc_hours"]})
                 for ln in data["links"]}
    for ln in data["links"]:
        for hr in ln["hours"]:
            cells = {c["channel"]: c for c in hr["channels"]}
            win = None if hr["luf_mhz"] is None else [hr["luf_mhz"], hr["owf_mhz"]]
            hr["window_mhz"] = win
            for c in hr["channels"]:
                c["good_days_pct"] = _pct(c["good_days"])
                c["in_window"] = win is not None and win[0] <= c["freq_khz"] / 1000 <= win[1]
            f = cells[hr["first"]]["good_days"] if hr["first"] else None
            hr["first_good_days_pct"] = _pct(f)
            hr["second_good_days_pct"] = _pct(cells[hr["second"]]["good_days"]) if hr["second"] else None
            hr["weak"] = f is None or f < target
            hr["gap"] = hr["utc_hour"] in gap_hours[ln["id"]]
            hr["local_times"] = locs(hr["utc_hour"])
        ln["gap_utc_hours"] = gap_hours[ln["id"]]
        g = gap_hours[ln["id"]]
        ln["gap_utc_text"] = f"{g[0]:02d}:00–{(g[-1] + 1) % 24:02d}:00" if g else "none"
        ln["gap_local_by_period"] = ([f"{_local(g[0], o // 60)}–{_local(g[-1] + 1, o // 60)}" for o in offsets]
                                     if g else [])
        ln["weak_utc_hours"] = [hr["utc_hour"] for hr in ln["hours"] if hr["weak"]]
    for sl in data["scan_lists"]:
        sl["added_for_schedule"] = []
    for a in data["antennas"]:
        for c in a["channels"]:
            c["swr_text"] = f"{c['swr']:.1f}:1" if c["swr"] < 10 else f"{c['swr']:.0f}:1"
    data["safety"]["short"] = ["Power lines: keep clear.", "RF: keep the distance on this card.",
                               "Lightning: stop and disconnect."]
    data["safety"]["short_pointer"] = "Full cautions: the Safety page."
    control = data["stations"][0]
    for s in data["stations"]:
        others = [m for m in data["stations"] if m["id"] != s["id"] and m["role"] != "control"]
        far = [] if s is control else [{"station": "ops", "bearing_deg": 300.0, "distance_km": 123.4, "compass": "WNW"}]
        rows = [{"utc_hour": h["utc_hour"], "first": h["first"], "second": h["second"],
                 **{k: h[k] for k in ("good_days_pct", "second_good_days_pct", "weak", "fallback", "local_times")}}
                for h in data["net_schedule"]["hours"]]
        two = len(s["antennas"]) > 1
        s["brief"] = {
            "to_control": None if s is control else far[0], "far_stations": far, "hours": rows,
            "weak_runs": data["net_schedule"]["weak_runs"],
            "antenna_by_channel": [{"channel": c["id"], "antenna": s["antennas"][i % len(s["antennas"])], "gain_dbi": 1.5,
                                    "gains_dbi": {a: 1.5 for a in s["antennas"]},
                                    "why": "2.0 dB better at the paths' elevation (70–80°)" if two else "the station's only antenna"}
                                   for i, c in enumerate(data["channels"])],
            "wire_runs": [{"antenna": a, "run_deg": 30.0, "run_compass": "NNE–SSW",
                           "rule": "broadside to the far stations (common practice, no source)",
                           "text": "run the wire NNE–SSW (30°–210°), broadside to the far stations"} for a in s["antennas"]],
            "ground": {"system": s["ground"]["system"], "soil": s["ground"]["soil"], "instruction": "Bond the set to ground.",
                       "text": "counterpoise wire 13.26 m (43 ft 6 in)" if s["ground"]["system"] == "counterpoise" else "stake",
                       "counterpoise_m": 13.26 if s["ground"]["system"] == "counterpoise" else None,
                       "counterpoise_ft_in": "43 ft 6 in" if s["ground"]["system"] == "counterpoise" else None,
                       "radial_m": None, "radial_ft_in": None, "radial_count": None, "lowest_freq_khz": 2410.0,
                       "basis": "quarter wave (common practice, no source)"},
            "control": {"station": control["id"], "name": control["name"], "address": control["address"]},
            "net_address": net["net_address"],
            "other_members": [{"station": m["id"], "name": m["name"], "address": m["address"]} for m in others],
            "exposure": {"general_public_m": 2.5, "occupational_m": 1.1, "antenna": s["antennas"][0], "clearance_m": None,
                         "exceeds_clearance": False, "text": "keep people at least 2.5 m from the antenna while transmitting"},
        }


#: A small invented net over a clock change (Europe/London leaves UTC for UTC+1 on 2027-03-28, the EU
#: summer-time rule) whose only channels are too high for the night: it has gaps on every link, weak
#: hours, a member with a whip and a dipole, and a member that says people can be kept only 0.5 m from
#: its antennas at 400 W. Used by the briefing tests and the one-source cross-check of site, cards and
#: plan.json.
GAPPY_PLAN = """\
planpack: 1
net:
  id: moor-gaps
  title: Moorland rescue practice net
  timezone: Europe/London
  valid: {from: 2027-03-15, to: 2027-04-10}
  solar: {ssn: 50}
  net_address: MOORNET
  links: hub
  target_good_days: 0.8
  fallback: call control by land line
stations:
  base:
    name: Moor base
    address: MRBASE
    role: control
    at: {lat: 54.45, lon: -2.97}
    power_w: 100
    noise: rural
    antenna: base-dipole
    ground: {soil: medium-dry, system: rods}
  fell-team-with-a-long-name:
    name: Fell team at the far upper beck sheepfold
    address: MRFELL
    at: {lat: 54.95, lon: -2.35}
    power_w: 50
    noise: quiet-rural
    antenna: [team-whip, team-dipole]
    ground: {soil: very-dry, system: radials}
  dale:
    name: Dale post
    address: MRDALE
    at: {lat: 54.05, lon: -2.10}
    power_w: 400
    noise: residential
    antenna: team-dipole
    ground: {soil: wet, system: counterpoise}
    clearance_m: 0.5
channels:
  - {id: M1, khz: 5380, mode: usb}
  - {id: M2, khz: 7090, mode: usb}
  - {id: M3, khz: 10130, mode: usb, hours: "08:00-18:00"}
antennas:
  base-dipole:
    kind: dipole
    design_khz: 5380
    height_m: 8
    matching: wide-tuner
  team-dipole:
    kind: inverted-v
    design_khz: 6200
    height_m: 9
    apex_deg: 120
    matching: wide-tuner
  team-whip:
    kind: whip
    length_m: 3
    height_m: 1
"""


def synthetic_request(data: dict, text: str = INJECTION) -> dict:
    """``data`` with a frequency request in the contract's shape (planpack.requests.contract), invented:
    one proposal closing the ops--lake gap at 02-04 UTC, one merge, and one hour nothing serves. ``text``
    goes into every free-text field, so pages show how it is escaped."""
    labels = [_local(h) for h in range(24)]
    d = copy.deepcopy(data)
    d["requests"] = {
        "planpack_request": 1,
        "net": {"id": d["net"]["id"], "title": d["net"]["title"], "handling": d["net"]["handling"],
                "timezone": d["net"]["timezone"], "utc_offset": "+01:00"},
        "revision": dict(d["revision"]), "target_good_days": 0.9, "target_good_days_pct": 90,
        "mode": {"id": "usb", "snr_db": 10.0, "bandwidth_hz": 2700.0},
        "scenarios": [{"month": "2027-03", "ssn": 40.0}, {"month": "2027-03", "ssn": 90.0}],
        "candidates": {"bands_khz": [[1600.0, 30000.0]], "exclude_khz": [[2600.0, 2625.0]], "step_khz": 25.0,
                       "count": 1111, "distress_guard_khz": 10.0, "assigned_spacing_khz": 3.0,
                       "builtin_exclusions": [{"khz": [2172.0, 2192.0], "why": "radiotelephony distress and calling",
                                               "source": "RR 5.108-5.111, App. 15"}]},
        "channels": [{"id": c["id"], "khz": c["freq_khz"]} for c in d["channels"]],
        "proposals": [{"id": "R1", "khz": 2675.0, "window_khz": [2650.0, 2725.0],
                       "serves": [{"link": "ops--lake", "utc_hours": [2, 3], "local_hours": [labels[2], labels[3]]}],
                       "pairs": 2, "worst_good_days": 0.912, "worst_good_days_pct": 91,
                       "net_channel_utc_hours": [2, 3]},
                      {"id": "R2", "khz": 3125.0, "window_khz": [3125.0, 3125.0],
                       "serves": [{"link": "ops--ridge", "utc_hours": [5], "local_hours": [labels[5]]},
                                  {"link": "ops--lake", "utc_hours": [5], "local_hours": [labels[5]]}],
                       "pairs": 2, "worst_good_days": 0.934, "worst_good_days_pct": 93, "net_channel_utc_hours": []}],
        "merges": [{"proposals": ["R1", "R2"], "khz": 2900.0, "window_khz": [2875.0, 2925.0],
                    "worst_good_days": 0.857, "worst_good_days_pct": 85, "message": f"R1 and R2 could be one {text}"}],
        "before": {"gap_hours": 3, "unserved_pairs": 3, "utc_hours": [2, 3, 4]},
        "after": {"gap_hours": 1, "unserved_pairs": 1, "left_out_pairs": 0, "utc_hours": [4]},
        "unservable": [{"link": "ops--lake", "utc_hours": [4], "local_hours": [labels[4]], "reason": "short_of_target",
                        "message": f"at best 88.6 % of days {text}", "best_good_days": 0.886,
                        "best_good_days_pct": 88}],
        "left_out": [],
        "solver": {"name": "HiGHS", "interface": "scipy.optimize.milp", "scipy": "1", "status": "optimal",
                   "optimal": True, "frequencies": 2, "mode": "fewest", "max_new": None, "time_limit_s": 60.0,
                   "objective": "fewest frequencies", "stages": [{"name": "fewest", "status": "optimal",
                                                                  "optimal": True}]},
        "summary": f"Ask for 2 new frequencies {text}",
        "assumptions": [f"invented for rendering tests {text}"],
        "local_time_labels": labels,
    }
    return d
