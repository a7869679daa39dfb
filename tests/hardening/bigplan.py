"""A large, valid, invented plan: N stations around a control station and M channels.

Used by test_big_plan.py (it must read clean and stay inside the reader's bounds) and by
bench/robustness.py (how long reading and checking it takes, and how much memory).
"""

from __future__ import annotations

import math


def _address(i: int) -> str:
    digits = "ABCDEFGHIJKLMNOPQRSTUVWXYZ0123456789"
    out = ""
    while True:
        i, r = divmod(i, 36)
        out = digits[r] + out
        if i == 0:
            break
    return "BIG" + out.rjust(3, "A")


def big_plan(stations: int = 500, channels: int = 200) -> str:
    """YAML text of a hub net: one control station, stations-1 members on rings up to ~450 km out."""
    lines = [
        "# An invented plan for load tests: no real stations, organisations or addresses.",
        "planpack: 1",
        "net:",
        "  id: load-test-net",
        '  title: "Load test net (invented)"',
        '  handling: "EXERCISE ONLY"',
        "  timezone: Europe/Vienna",
        "  valid: {from: 2027-03-08, to: 2027-03-26}",
        "  solar: {ssn: 60}",
        "  net_address: BIGNET",
        "  links: hub",
        "  instructions: |",
        "    Check in with control at the top of each hour.",
        "stations:",
    ]
    lat0, lon0 = 48.2, 14.3
    for i in range(stations):
        sid = "control" if i == 0 else f"post-{i:04d}"
        if i == 0:
            lat, lon = lat0, lon0
        else:
            ring = 1 + (i - 1) // 40
            angle = 2 * math.pi * ((i - 1) % 40) / 40 + ring * 0.1
            r_km = min(35.0 * ring, 450.0)
            lat = lat0 + r_km / 111.2 * math.cos(angle)
            lon = lon0 + r_km / (111.2 * math.cos(math.radians(lat0))) * math.sin(angle)
        antenna = ("night-wire", "day-wire") if i % 3 else ("broadband",)
        lines += [f"  {sid}:",
                  f'    name: "Field post {i:04d}"' if i else '    name: "Net control"',
                  f"    address: {_address(i)}",
                  *(["    role: control"] if i == 0 else []),
                  f"    at: {{lat: {lat:.4f}, lon: {lon:.4f}}}",
                  f"    power_w: {100 if i % 2 else 50}",
                  f"    noise: {('rural', 'residential', 'quiet-rural')[i % 3]}",
                  f"    antenna: [{', '.join(antenna)}]",
                  "    ground: {soil: medium-dry, system: rods}"]
    lines.append("channels:")
    step = (29_000 - 2_000) / max(channels - 1, 1)
    for k in range(channels):
        khz = round(2_000 + k * step)
        lines.append(f"  - {{id: L{k + 1}, khz: {khz}, mode: usb" + (', note: "reserve"' if k % 10 == 0 else "") + "}")
    lines += [
        "antennas:",
        "  night-wire:", "    kind: inverted-v", "    design_khz: 3500", "    height_m: 13", "    apex_deg: 120",
        "    matching: feedpoint-coupler",
        "  day-wire:", "    kind: dipole", "    design_khz: 6500", "    height_m: 8", "    matching: feedpoint-coupler",
        "  broadband:", "    kind: folded-terminated", "    height_m: 12", "    length_m: 27", "    spacing_m: 0.9",
        "    resistor_ohm: 800", "    transformer_ratio: 16",
    ]
    return "\n".join(lines) + "\n"


def mesh_plan(stations: int = 60, channels: int = 40) -> str:
    """YAML text of an all-pairs net (``links: all``): stations spread over about 400 km, ``channels`` channels.

    With 60 stations it is the size of the prediction benchmark's largest case (1770 links).
    """
    text = big_plan(stations, channels).replace("  links: hub\n", "  links: all\n")
    return text.replace("    role: control\n", "", 1)
