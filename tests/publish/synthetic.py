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


def _local(h: int, offset: int = 1) -> str:
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
                   station_name: str = INJECTION, handling: str | None = "EXERCISE ONLY") -> dict:
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
    return copy.deepcopy(data)


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
