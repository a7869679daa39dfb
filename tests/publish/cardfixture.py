"""A synthetic compiled plan (the `.data` of a CompiledPlan) for the card tests.

Invented demo data in the shape of planpack/output_schema.py; the tests check
it validates against that schema. It is not a prediction: the channel choices
are made up so that a link differs from the net at some hours, one gap exists,
one antenna carries its own feet-and-inches string and one station has two
antennas.
"""

from __future__ import annotations

import copy

CHANNELS = [
    ("C1", 2216.0, "usb", "night"), ("C2", 3311.5, "usb", None), ("C3", 4522.0, "usb", None),
    ("C4", 5407.0, "ale", None), ("C5", 6958.0, "usb", None), ("C6", 8123.0, "data", None),
]
SECOND = {"C1": "C2", "C2": "C1", "C3": "C4", "C5": None, "C6": "C5"}


def _net_first(utc: int) -> str:
    if utc < 5 or utc >= 19:
        return "C1"
    if utc < 8 or utc >= 16:
        return "C3"
    return "C5"


def _local(utc: int) -> str:
    return f"{(utc + 1) % 24:02d}:00"  # UTC+1, a fixed zone for the fixture


def _link(lid: str, a: str, b: str, km: float, override: dict[int, str | None]) -> dict:
    hours = []
    for u in range(24):
        first = override.get(u, _net_first(u))
        cells = [{"channel": cid, "freq_khz": khz, "snr_db": 12.0, "margin_db": 2.0,
                  "good_days": 0.95 if cid == first else 0.4, "via": "F2", "skip": False, "allowed": True}
                 for cid, khz, _, _ in CHANNELS]
        hours.append({"utc_hour": u, "local_time": _local(u), "muf_mhz": 7.1, "owf_mhz": 6.0, "luf_mhz": 2.0,
                      "elevation_deg": 75.0, "first": first, "second": SECOND[first] if first else None,
                      "channels": cells})
    return {"id": lid, "from": a, "to": b, "distance_km": km, "azimuth_deg": 120.0, "hops": 1, "hours": hours}


def _antenna_channels(classes: dict[str, str]) -> list[dict]:
    swr = {"fine": 1.3, "tuner": 2.4, "poor": 5.8}
    return [{"channel": cid, "freq_khz": khz, "impedance_ohm": [48.0, -12.0], "swr": swr[classes.get(cid, "tuner")],
             "swr_class": classes.get(cid, "tuner"), "mismatch_loss_db": 0.2, "feedline_loss_db": 0.4}
            for cid, khz, _, _ in CHANNELS]


def _station(sid, name, addr, role, ants, system="rods"):
    return {"id": sid, "name": name, "address": addr, "role": role, "lat_deg": 47.1, "lon_deg": 11.2,
            "grid": "JN57nc", "power_w": 100.0, "noise": "rural", "noise_margin_db": 0.0, "antennas": ants,
            "ground": {"soil": "medium-dry", "system": system}, "scan_rate": 2.0,
            "sun": {"date": "2027-03-15", "sunrise_utc": "05:21", "sunset_utc": "17:09",
                    "sunrise_local": "06:21", "sunset_local": "18:09"}}


def build_data(base_url: str | None = "https://intranet.example/nets/") -> dict:
    stations = [_station("ops", "Valley operations", "VALOPS", "control", ["ops-dr"]),
                _station("ridge", "Ridge relay team", "RIDGE1", "member", ["team-iv", "team-whip"], "counterpoise"),
                _station("river", "River crossing post", "RIVPST", "member", ["team-iv"])]
    channels = [{"id": cid, "freq_khz": khz, "mode": mode, "note": note,
                 "hours_local": ["06:00-20:00"] if cid == "C6" else None,
                 "allowed_utc_hours": list(range(5, 19)) if cid == "C6" else list(range(24)),
                 "required_snr_db": 10.0, "bandwidth_hz": 2700.0} for cid, khz, mode, note in CHANNELS]
    links = [_link("ops--ridge", "ops", "ridge", 42.0, {3: "C2", 4: "C2", 12: "C6"}),
             _link("ops--river", "ops", "river", 18.5, {})]
    hours = [{"utc_hour": u, "local_time": _local(u), "first": _net_first(u), "second": SECOND[_net_first(u)],
              "weakest_good_days": 0.93, "second_good_days": 0.7, "weakest_link": "ops--ridge"} for u in range(24)]
    antennas = [
        {"id": "ops-dr", "kind": "dipole-reflector", "stations": ["ops"], "height_m": 8.0,
         "cut": {"total_m": 31.62, "leg_m": 15.81, "rule_of_thumb_total_m": 31.55, "reflector_m": 33.2,
                 "reflector_below_m": 9.95, "total_ft_in": "103 ft 8 3/4 in"},
         "channels": _antenna_channels({"C2": "fine", "C3": "fine", "C6": "poor"}),
         "pattern": {"peak_gain_dbi": 7.1, "zenith_gain_dbi": 7.0, "fraction_above_60deg": 0.6},
         "height_wavelengths": 0.12, "exposure": [{"station": "ops", "general_public_m": 3.4, "occupational_m": 1.5}],
         "notes": []},
        {"id": "team-iv", "kind": "inverted-v", "stations": ["ridge", "river"], "height_m": 9.0, "apex_deg": 110,
         "cut": {"total_m": 26.12, "leg_m": 13.06, "rule_of_thumb_total_m": 26.38, "reflector_m": None,
                 "reflector_below_m": None, "end_height_m": 1.5},
         "channels": _antenna_channels({"C3": "fine", "C4": "fine", "C1": "poor"}),
         "pattern": {"peak_gain_dbi": 5.2, "zenith_gain_dbi": 5.0, "fraction_above_60deg": 0.55},
         "height_wavelengths": 0.16,
         "exposure": [{"station": "ridge", "general_public_m": 2.7, "occupational_m": 1.2},
                      {"station": "river", "general_public_m": 2.9, "occupational_m": 1.3}], "notes": []},
        {"id": "team-whip", "kind": "whip", "stations": ["ridge"], "height_m": 1.0, "cut": None,
         "channels": _antenna_channels({}),
         "pattern": {"peak_gain_dbi": -3.0, "zenith_gain_dbi": -20.0, "fraction_above_60deg": 0.1},
         "height_wavelengths": None, "exposure": [{"station": "ridge", "general_public_m": 1.1, "occupational_m": 0.5}],
         "notes": ["Whip: poor for NVIS; use it only for ground wave to the nearest stations."]},
    ]
    return copy.deepcopy({
        "planpack": 1,
        "generator": {"name": "planpack", "version": "0.1.0"},
        "net": {"id": "alpine-test", "title": "Alpine valley test net", "handling": "EXERCISE — TRAINING USE",
                "timezone": "Etc/GMT-1", "valid": {"from": "2027-03-01", "to": "2027-03-20"},
                "net_address": "ALPNET", "base_url": base_url,
                "instructions_md": "**Check in** at the top of each hour.\n\n- First channel first; *then* the second.\n"
                                   "- Log every contact in UTC.\n\n1. One\n2. Two\n",
                "target_good_days": 0.9, "card_size": "3.5x5in", "links_rule": "hub", "control": "ops"},
        "revision": {"id": "c-1a2b3c4d5e6f", "kind": "content", "date": None},
        "assumptions": {"months": ["2027-03"], "solar": {"index": "ssn", "values": [60], "ssn_used": [60]},
                        "worst_case": "low", "models": {}, "not_modelled": [], "notes": []},
        "stations": stations,
        "channels": channels,
        "links": links,
        "net_schedule": {"changes_per_day": 4, "hours": hours},
        "gaps": [{"links": ["ops--ridge"], "utc_hours": [2], "local_hours": ["03:00"], "window_mhz": [1.8, 2.1],
                  "message": "No assigned channel serves ops--ridge at 03:00 local."}],
        "scan_lists": [{"station": s, "groups": [{"name": "all", "channels": ["C1", "C2", "C3", "C4", "C5"],
                                                  "scan_period_s": 2.5, "call_time_s": 5.4}],
                        "wasted": ["C6"] if s == "river" else [], "split_suggested": False, "note": ""}
                       for s in ("ops", "ridge", "river")],
        "antennas": antennas,
        "safety": {"cautions": [{"topic": "power lines", "text": "Never put up a mast where it could fall onto a power line."},
                                {"topic": "lightning", "text": "Lower or disconnect antennas before storms."}],
                   "deferral": "Follow local codes, the equipment manuals and licensed practice first."},
        "diagnostics": [],
    })
