"""A small valid plan and helpers to mutate it and find where a problem should be reported."""

from __future__ import annotations

import pytest

BASE = """\
planpack: 1
net:
  id: test-net
  title: Test net
  timezone: Europe/Berlin
  valid: {from: 2027-03-01, to: 2027-03-20}
  solar: {ssn: 60}
  net_address: TSTNET
  links: hub
stations:
  ops:
    name: Operations
    address: OPS
    role: control
    at: {lat: 52.52, lon: 13.40}
    power_w: 100
    noise: residential
    antenna: nvis
    ground: {soil: medium-dry, system: rods}
  ridge:
    name: Ridge team
    address: RIDGE
    at: {grid: JO62qm}
    power_w: 20
    noise: rural
    antenna: nvis
    ground: {soil: wet, system: counterpoise}
channels:
  - {id: C1, khz: 3310, mode: usb}
  - {id: C2, khz: 4520, mode: usb}
  - {id: C3, khz: 6950, mode: usb, hours: "06:00-20:00"}
antennas:
  nvis:
    kind: dipole
    design_khz: 4520
    height_m: 7
"""


def position(text: str, needle: str, nth: int = 1) -> tuple[int, int]:
    """1-based (line, column) of the nth occurrence of needle in text."""
    at = -1
    for _ in range(nth):
        at = text.index(needle, at + 1)
    line = text.count("\n", 0, at) + 1
    col = at - (text.rfind("\n", 0, at) + 1) + 1
    return line, col


@pytest.fixture
def write_plan(tmp_path):
    counter = iter(range(10_000))

    def _write(text: str | bytes, name: str | None = None) -> str:
        path = tmp_path / (name or f"plan{next(counter)}.yaml")
        if isinstance(text, bytes):
            path.write_bytes(text)
        else:
            path.write_text(text, encoding="utf-8")
        return str(path)

    return _write
