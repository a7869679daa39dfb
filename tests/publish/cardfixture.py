"""Synthetic compiled plans (the ``data`` of a CompiledPlan) for the card tests.

Invented demo data in the shape of planpack/output_schema.py (the tests check
it validates). It is not a prediction: the figures are made up so that the
cards meet what they must handle: a 6-station hub net with 9 channels, night
hours well below the target with a fallback each, an hour whose channels
both work on 0 % of days, an hour with no second channel, a link whose first
choice differs from the net's, a link with gap hours, a station with two
antennas (one channel each way), counterpoise and radial grounds, an SWR of
"> 50:1", and optionally a clock change inside the validity period, long
names and a long handling marking.
"""

from __future__ import annotations

import copy
import math

TARGET = 0.75
#: (id, kHz, mode)
CHANNELS = [("C1", 2216.0, "usb"), ("C2", 2870.5, "usb"), ("C3", 3311.0, "usb"), ("C4", 4522.0, "ale"),
            ("C5", 5407.0, "usb"), ("C6", 6958.0, "usb"), ("C7", 7615.0, "data"), ("C8", 8123.0, "usb"),
            ("C9", 9240.0, "usb")]
#: (id, name, address, lat, lon, antennas, ground system)
STATIONS = [
    ("ops", "Valley operations centre", "VALOPS", 47.10, 11.20, ["ops-dr"], "rods"),
    ("ridge", "Ridge relay team", "RIDGE1", 47.30, 11.70, ["team-iv", "team-whip"], "counterpoise"),
    ("river", "River crossing post", "RIVPST", 46.90, 10.80, ["team-iv"], "radials"),
    ("pass", "High pass shelter", "HPASS", 46.70, 11.45, ["team-dip"], "rods"),
    ("lake", "Lake shore camp", "LAKCMP", 47.45, 10.90, ["team-iv"], "counterpoise"),
    ("mill", "Old mill depot", "MILDEP", 47.00, 11.90, ["team-dip"], "rods"),
]


def _pct(x: float | None) -> int | None:
    """Whole percent, rounded down, as the compile side writes it."""
    return None if x is None else max(0, min(100, int(math.floor(round(x, 3) * 100 + 1e-6))))


def _net_first(u: int) -> str:
    if u < 5 or u >= 20:
        return "C2"
    if u < 8 or u >= 17:
        return "C4"
    return "C6"


SECOND = {"C2": "C1", "C4": "C3", "C6": "C5"}


def _good(u: int) -> float:
    """Invented fraction of days the net's first channel works on the weakest link at UTC hour u."""
    if u in (3, 4):
        return 0.0  # first and second at 0 %: the case the issue names
    if u < 6:
        return 0.12 + 0.02 * u
    if u < 8 or u >= 20:
        return 0.62
    return 0.93


def _local(u: int, offset_h: int) -> str:
    return f"{(u + offset_h) % 24:02d}:00"


def _hour(u: int, offsets: list[int], boost: float = 0.0, no_second_at: int | None = 5) -> dict:
    first = _net_first(u)
    second = None if u == no_second_at else SECOND[first]
    f = min(_good(u) + boost, 0.99)
    s = 0.0 if u in (3, 4) else (0.55 if u < 8 else 0.7)
    p1, p2 = _pct(f), (_pct(s) if second else None)
    weak = f < TARGET
    fb = None
    if weak:
        if second is None:
            fb = {"channel": None, "good_days_pct": None, "text": "no second channel: expect to repeat calls"}
        else:
            fb = {"channel": second, "good_days_pct": p2,
                  "text": f"try {second} (works on {p2} % of days), then expect to repeat calls"}
    return {"utc_hour": u, "first": first, "second": second, "good_days_pct": p1, "second_good_days_pct": p2,
            "weak": weak, "fallback": fb, "local_times": [_local(u, o) for o in offsets],
            "_f": f, "_s": s}


def _weak_runs(hours: list[dict], offsets: list[int], labels: list[str]) -> list[dict]:
    out, cur = [], []
    for h in hours + [{"weak": False, "utc_hour": 99}]:
        if h["weak"]:
            cur.append(h)
            continue
        if cur:
            a, b = cur[0]["utc_hour"], cur[-1]["utc_hour"] + 1
            pcts = [x["good_days_pct"] or 0 for x in cur]
            local = [f"{_local(a, o)}–{_local(b, o)}" for o in offsets]
            when = local[0] if len(offsets) == 1 else " / ".join(f"{t} {lab}" for t, lab in zip(local, labels))
            out.append({"utc_hours": [x["utc_hour"] for x in cur], "utc": f"{a:02d}:00–{b % 24:02d}:00",
                        "local": local[0], "local_by_period": local, "good_days_pct_min": min(pcts),
                        "good_days_pct_max": max(pcts),
                        "text": f"{when}: works on about 1 day in 5 or fewer ({min(pcts)}–{max(pcts)} %); "
                                "expect to repeat calls or use the second channel"})
            cur = []
    return out


def _link(lid: str, a: str, b: str, km: float, az: float, offsets: list[int], override: dict[int, str],
          gaps: set[int]) -> dict:
    hours = []
    for u in range(24):
        first = override.get(u, _net_first(u))
        f = 0.0 if u in gaps else min(_good(u) + 0.05, 0.99)
        cells = [{"channel": cid, "freq_khz": khz, "snr_db": 12.0, "margin_db": 2.0,
                  "good_days": round(f if cid == first else 0.3, 3), "good_days_pct": _pct(f if cid == first else 0.3),
                  "via": "F2", "skip": False, "allowed": True, "in_window": cid == first}
                 for cid, khz, _ in CHANNELS]
        second = SECOND.get(first)
        hours.append({"utc_hour": u, "local_time": _local(u, offsets[0]), "local_times": [_local(u, o) for o in offsets],
                      "muf_mhz": 7.1, "owf_mhz": 6.0, "luf_mhz": 2.0, "elevation_deg": 75.0, "first": first,
                      "second": second, "channels": cells, "first_good_days_pct": _pct(f),
                      "second_good_days_pct": _pct(0.3) if second else None, "weak": f < TARGET, "gap": u in gaps,
                      "window_mhz": [2.0, 6.0]})
    g = sorted(gaps)
    return {"id": lid, "from": a, "to": b, "distance_km": km, "azimuth_deg": az, "hops": 1, "hours": hours,
            "gap_utc_hours": g, "gap_utc_text": f"{g[0]:02d}:00–{g[-1] + 1:02d}:00" if g else "none",
            "gap_local_by_period": [f"{_local(g[0], o)}–{_local(g[-1] + 1, o)}" for o in offsets] if g else [],
            "weak_utc_hours": sorted(h["utc_hour"] for h in hours if h["weak"])}


def _swr_rows(classes: dict[str, str]) -> list[dict]:
    table = {"fine": (1.3, "1.3:1"), "tuner": (2.4, "2.4:1"), "poor": (50.0, "> 50:1")}  # plan.json caps SWR at 50
    return [{"channel": cid, "freq_khz": khz, "impedance_ohm": [48.0, -12.0], "swr": table[classes.get(cid, "tuner")][0],
             "swr_text": table[classes.get(cid, "tuner")][1], "swr_class": classes.get(cid, "tuner"),
             "mismatch_loss_db": 0.2, "feedline_loss_db": 0.4} for cid, khz, _ in CHANNELS]


def _antennas(station_of: dict[str, list[str]]) -> list[dict]:
    def exp(aid, d):
        return [{"station": s, "general_public_m": d, "occupational_m": round(d / 2.2, 1)} for s in station_of[aid]]
    pat = {"peak_gain_dbi": 6.0, "zenith_gain_dbi": 5.8, "fraction_above_60deg": 0.5}
    return [
        {"id": "ops-dr", "kind": "dipole-reflector", "stations": station_of["ops-dr"], "height_m": 8.0,
         "transformer_ratio": 1.0,
         "cut": {"total_m": 31.62, "leg_m": 15.81, "rule_of_thumb_total_m": 31.55, "reflector_m": 33.2,
                 "reflector_below_m": 9.95, "total_ft_in": "103 ft 8 3/4 in", "leg_ft_in": "51 ft 10 1/2 in",
                 "leg_cut_with_extra_m": 16.11, "leg_cut_with_extra_ft_in": "52 ft 10 1/4 in",
                 "reflector_cut_with_extra_m": 33.5, "reflector_cut_with_extra_ft_in": "109 ft 11 in",
                 "reflector_below_ft_in": "32 ft 7 3/4 in", "reflector_ft_in": "108 ft 11 1/4 in",
                 "rule_of_thumb_total_ft_in": "103 ft 6 in"},
         "channels": _swr_rows({"C3": "fine", "C4": "fine", "C9": "poor"}), "pattern": pat,
         "height_wavelengths": 0.12, "exposure": exp("ops-dr", 3.4), "notes": []},
        {"id": "team-iv", "kind": "inverted-v", "stations": station_of["team-iv"], "height_m": 9.0, "apex_deg": 110,
         "transformer_ratio": 1.0,
         "cut": {"total_m": 26.12, "leg_m": 13.06, "rule_of_thumb_total_m": 26.38, "reflector_m": None,
                 "reflector_below_m": None, "end_height_m": 2.35, "end_height_ft_in": "7 ft 8 1/2 in",
                 "leg_ft_in": "42 ft 10 1/4 in", "total_ft_in": "85 ft 8 1/4 in",
                 "leg_cut_with_extra_m": 13.36, "leg_cut_with_extra_ft_in": "43 ft 10 in",
                 "rule_of_thumb_total_ft_in": "86 ft 6 1/2 in"},
         "channels": _swr_rows({"C2": "fine", "C3": "fine", "C4": "fine", "C1": "poor"}), "pattern": pat,
         "height_wavelengths": 0.16, "exposure": exp("team-iv", 2.7), "notes": []},
        {"id": "team-dip", "kind": "dipole", "stations": station_of["team-dip"], "height_m": 7.0,
         "transformer_ratio": 1.0,
         "cut": {"total_m": 21.56, "leg_m": 10.78, "rule_of_thumb_total_m": 21.16, "reflector_m": None,
                 "reflector_below_m": None, "leg_ft_in": "35 ft 4 1/2 in", "total_ft_in": "70 ft 8 3/4 in",
                 "leg_cut_with_extra_m": 11.08, "leg_cut_with_extra_ft_in": "36 ft 4 1/4 in",
                 "rule_of_thumb_total_ft_in": "69 ft 5 in"},
         "channels": _swr_rows({"C5": "fine", "C6": "fine", "C1": "poor"}), "pattern": pat,
         "height_wavelengths": 0.15, "exposure": exp("team-dip", 2.2), "notes": []},
        {"id": "team-whip", "kind": "whip", "stations": station_of["team-whip"], "height_m": 1.0,
         "cut": {"total_m": 3.0, "leg_m": None, "rule_of_thumb_total_m": None, "reflector_m": None,
                 "reflector_below_m": None, "total_ft_in": "9 ft 10 in"},
         "channels": _swr_rows({}), "pattern": {"peak_gain_dbi": -3.0, "zenith_gain_dbi": -20.0,
                                                "fraction_above_60deg": 0.1},
         "height_wavelengths": None, "exposure": exp("team-whip", 1.1),
         "notes": ["Whip: poor for NVIS; use it only for ground wave to the nearest stations."]},
    ]


COMPASS = ("N", "NNE", "NE", "ENE", "E", "ESE", "SE", "SSE", "S", "SSW", "SW", "WSW", "W", "WNW", "NW", "NNW")


def _compass(deg: float) -> str:
    return COMPASS[int(((deg % 360.0) + 11.25) // 22.5) % 16]


def build_data(base_url: str | None = "https://intranet.example/nets/", *, clock_change: bool = False,
               long_names: bool = False, handling: str | None = "EXERCISE — TRAINING USE") -> dict:
    """A compiled 6-station hub net with 9 channels (see the module)."""
    offsets = [0, 1] if clock_change else [1]
    labels = ["UTC", "UTC+1"] if clock_change else ["UTC+1"]
    valid = ("2027-03-15", "2027-04-10") if clock_change else ("2027-03-01", "2027-03-20")
    station_rows = [list(r) for r in STATIONS]
    if long_names:
        station_rows[1][1] = ("Ridge relay team of the northern valley search and rescue volunteers, second shift")
        station_rows[2][2] = "RIVERPOSTALPHA9"  # 15 characters, the longest ALE address
    ctl = station_rows[0]
    station_of: dict[str, list[str]] = {}
    for sid, *_r, ants, _g in station_rows:
        for a in ants:
            station_of.setdefault(a, []).append(sid)

    net_hours = []
    for u in range(24):
        h = _hour(u, offsets)
        f, s = h.pop("_f"), h.pop("_s")
        h.update({"local_time": h["local_times"][0], "weakest_good_days": round(f, 3),
                  "second_good_days": round(s, 3) if h["second"] else None, "weakest_link": "ops--ridge",
                  "window_mhz": [2.0, 6.0],
                  "channels": [{"channel": cid, "good_days_pct": h["good_days_pct"] if cid == h["first"] else 30,
                                "allowed": True, "in_window": cid == h["first"]} for cid, *_ in CHANNELS]})
        net_hours.append(h)

    links, stations = [], []
    for i, (sid, name, addr, lat, lon, ants, gsys) in enumerate(station_rows[1:], start=1):
        override = {12: "C7", 13: "C7"} if sid == "ridge" else {}
        gaps = {21, 22} if sid == "lake" else set()
        links.append(_link(f"ops--{sid}", "ops", sid, 20.0 + 17 * i, (60.0 * i) % 360, offsets, override, gaps))
    for i, (sid, name, addr, lat, lon, ants, gsys) in enumerate(station_rows):
        hours = []
        for u in range(24):
            h = _hour(u, offsets, boost=0.0 if i == 0 else 0.04 * (i % 3))
            h.pop("_f"), h.pop("_s")
            hours.append(h)
        bearing = None if i == 0 else (60.0 * i + 180.0) % 360
        to_control = None if i == 0 else {"station": "ops", "bearing_deg": bearing, "distance_km": 20.0 + 17 * i,
                                          "compass": _compass(bearing)}
        far = ([{"station": s[0], "bearing_deg": (60.0 * k) % 360, "distance_km": 20.0 + 17 * k,
                 "compass": _compass(60.0 * k)} for k, s in enumerate(station_rows[1:], start=1)]
               if i == 0 else [to_control])
        quarter, ft = 32.29, "105 ft 11 1/4 in"
        ground = {"system": gsys, "soil": "medium-dry", "instruction": f"Full instruction for a {gsys} ground.",
                  "counterpoise_m": quarter if gsys == "counterpoise" else None,
                  "counterpoise_ft_in": ft if gsys == "counterpoise" else None,
                  "radial_m": quarter if gsys == "radials" else None, "radial_ft_in": ft if gsys == "radials" else None,
                  "radial_count": 4 if gsys == "radials" else None, "lowest_freq_khz": 2216.0,
                  "basis": "a quarter wave at the lowest channel the station uses, 234 / f[MHz] ft (common practice, "
                           "no source)"}
        ground["text"] = {"counterpoise": f"counterpoise wire {quarter:.2f} m ({ft}), a quarter wave at 2216 kHz",
                          "radials": f"at least 4 radials of {quarter:.2f} m ({ft}) each, a quarter wave at 2216 kHz",
                          "rods": "ground stake at least 1 m into moist soil, short heavy lead to the set"}[gsys]
        by_channel = []
        for cid, *_ in CHANNELS:
            pick = ants[0] if len(ants) == 1 or cid not in ("C1",) else ants[1]
            by_channel.append({"channel": cid, "antenna": pick, "gain_dbi": 3.0, "gains_dbi": {a: 3.0 for a in ants},
                               "why": "the station's only antenna" if len(ants) == 1 else "3.1 dB better at the paths' elevation"})
        runs = [{"antenna": a, "run_deg": 150.0, "run_compass": "SSE–NNW",
                 "rule": "run the wire broadside to the far stations: at right angles to the mean bearing to them "
                         "(common practice, no source)",
                 "text": "run the wire SSE–NNW (150°–330°), broadside to the far stations (mean bearing 60° / 240°)"}
                for a in ants if a != "team-whip"]
        expo = next(a for a in _antennas(station_of) if a["id"] == ants[0])["exposure"][0]
        stations.append({
            "id": sid, "name": name, "address": addr, "role": "control" if i == 0 else "member", "lat_deg": lat,
            "lon_deg": lon, "grid": "JN57nc", "power_w": 100.0, "noise": "rural", "noise_margin_db": 0.0,
            "antennas": ants, "ground": {"soil": "medium-dry", "system": gsys}, "scan_rate": 2.0,
            "sun": {"date": "2027-03-15", "sunrise_utc": "05:21", "sunset_utc": "17:09",
                    "sunrise_local": "06:21", "sunset_local": "18:09"},
            "brief": {"to_control": to_control, "far_stations": far, "hours": hours,
                      "weak_runs": _weak_runs(hours, offsets, labels), "antenna_by_channel": by_channel,
                      "wire_runs": runs, "ground": ground,
                      "control": {"station": "ops", "name": ctl[1], "address": ctl[2]}, "net_address": "ALPNET",
                      "other_members": [{"station": s[0], "name": s[1], "address": s[2]}
                                        for s in station_rows[1:] if s[0] != sid],
                      "exposure": {"general_public_m": expo["general_public_m"], "occupational_m": expo["occupational_m"],
                                   "antenna": ants[0], "clearance_m": None, "exceeds_clearance": False,
                                   "text": f"keep people at least {expo['general_public_m']:.1f} m from the antenna "
                                           "while transmitting"}},
        })

    channels = [{"id": cid, "freq_khz": khz, "mode": mode, "note": "night low" if cid == "C1" else None,
                 "hours_local": ["06:00-20:00"] if cid == "C8" else None,
                 "allowed_utc_hours": list(range(5, 19)) if cid == "C8" else list(range(24)),
                 "required_snr_db": 10.0, "bandwidth_hz": 2700.0} for cid, khz, mode in CHANNELS]
    periods = ([{"from": valid[0], "to": "2027-03-27", "utc_offset": "+00:00", "label": "UTC"},
                {"from": "2027-03-28", "to": valid[1], "utc_offset": "+01:00", "label": "UTC+1"}] if clock_change else
               [{"from": valid[0], "to": valid[1], "utc_offset": "+01:00", "label": "UTC+1"}])
    data = {
        "planpack": 1,
        "generator": {"name": "planpack", "version": "0.1.0"},
        "net": {"id": "alpine-test", "title": "Alpine valley test net", "handling": handling,
                "timezone": "Europe/London" if clock_change else "Etc/GMT-1",
                "valid": {"from": valid[0], "to": valid[1]}, "utc_offset": "+00:00" if clock_change else "+01:00",
                "utc_offset_label": "UTC" if clock_change else "UTC+1", "periods": periods,
                "clock_changes": [{"date": "2027-03-28", "from": "+00:00", "to": "+01:00"}] if clock_change else [],
                "fallback": None, "net_address": "ALPNET", "base_url": base_url,
                "instructions_md": "**Check in** at the top of each hour.\n\n- First channel first; *then* the second.\n"
                                   "- Log every contact in UTC.\n",
                "target_good_days": TARGET, "card_size": "3.5x5in", "links_rule": "hub", "control": "ops"},
        "revision": {"id": "a1b2c3d", "kind": "git", "date": "2027-03-01", "number": 14, "issue_date": "2027-03-01",
                     "label": "Rev 14 of 2027-03-01 (a1b2c3d)"},
        "assumptions": {"months": ["2027-03"], "solar": {"index": "ssn", "values": [60], "ssn_used": [60]},
                        "worst_case": "low", "models": {}, "not_modelled": [], "notes": []},
        "stations": stations,
        "channels": channels,
        "links": links,
        "net_schedule": {"changes_per_day": 4, "hours": net_hours,
                         "weak_runs": _weak_runs(net_hours, offsets, labels)},
        "gaps": [{"links": ["ops--lake"], "utc_hours": [21, 22], "local_hours": [_local(21, offsets[0]), _local(22, offsets[0])],
                  "window_mhz": [1.8, 2.1], "links_by_hour": [["ops--lake"], ["ops--lake"]],
                  "local_by_period": [f"{_local(21, o)}–{_local(23, o)}" for o in offsets], "utc_text": "21:00–23:00",
                  "message": "no assigned channel serves ops–lake 22:00–00:00 local; a channel between 1.8 and 2.1 MHz "
                             "would close it",
                  "short": f"{_local(21, offsets[0])}–{_local(23, offsets[0])}: no channel reaches LAKCMP on enough days; "
                           "relay through a station that hears them or expect to repeat calls"}],
        "scan_lists": [{"station": s[0], "groups": [{"name": "all", "channels": [c[0] for c in CHANNELS[:7]],
                                                     "scan_period_s": 3.5, "call_time_s": 5.9}],
                        "wasted": ["C9"] if s[0] == "river" else [], "added_for_schedule": [],
                        "split_suggested": False, "note": ""} for s in station_rows],
        "antennas": _antennas(station_of),
        "safety": {"cautions": [{"topic": "power-lines", "title": "Power lines",
                                 "text": "Never put up a mast where it could fall onto a power line."},
                                {"topic": "lightning", "title": "Lightning",
                                 "text": "Lower or disconnect antennas before storms."}],
                   "deferral": "Follow local codes, the equipment manuals and licensed practice first.",
                   "short": ["Power lines: keep antenna, mast and guys at least the mast height plus 3 m away.",
                             "RF: no one closer to the antenna than the distance on this card while transmitting.",
                             "Lightning: on thunder stop, disconnect the feedline and ground it outside."],
                   "short_pointer": "Full cautions: the Safety page of the net's site. Local codes, the equipment "
                                    "manuals and licensed practice come first."},
        "diagnostics": [],
    }
    return copy.deepcopy(data)
