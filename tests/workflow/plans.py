"""Tiny plans for the workflow tests (2 stations, 3 channels, one antenna design), in an invented scenario.

The stations, their group and their addresses are invented; the places are real
(the Cairngorms, Scotland). A compile costs about a second of NEC solving, so
tests share compiled results through one cache folder.
"""

TINY = """\
# Invented test net: two posts of an invented hill-rescue group.
planpack: 1
net:
  id: tiny-net
  title: Invented hill group test net
  timezone: Europe/London
  valid: {from: 2027-05-03, to: 2027-05-30}
  solar: {ssn: 70}
  target_good_days: 0.7
  net_address: TNYNET
  links: hub
stations:
  base:
    name: Glenmore base
    address: TNYBAS
    role: control
    at: {lat: 57.1670, lon: -3.6950}
    power_w: 100
    noise: rural
    antenna: wire
    ground: {soil: wet, system: rods}
  camp:
    name: Braemar camp
    address: TNYCMP
    at: {lat: 57.0060, lon: -3.3970}
    power_w: 50
    noise: quiet-rural
    antenna: wire
    ground: {soil: medium-dry, system: counterpoise}
channels:
  - {id: T1, khz: 3260, mode: usb}
  - {id: T2, khz: 4545, mode: usb}
  - {id: T3, khz: 5410, mode: usb}
antennas:
  wire:
    kind: dipole
    design_khz: 4545
    height_m: 8
    matching: feedpoint-coupler
"""


def variant(*edits: tuple[str, str]) -> str:
    """TINY with each (old, new) text replaced once; fails loudly if ``old`` is not there."""
    text = TINY
    for old, new in edits:
        assert text.count(old) == 1, f"edit target not unique in TINY: {old!r}"
        text = text.replace(old, new)
    return text


# The same plan with its keys in another order. The order of the channels (card order) and of the
# stations (card order; the first station on an antenna sets the soil its cut is computed for) is kept.
REORDERED = """\
planpack: 1
antennas:
  wire:
    matching: feedpoint-coupler
    height_m: 8
    design_khz: 4545
    kind: dipole
channels:
  - {mode: usb, khz: 3260, id: T1}
  - {khz: 4545, id: T2, mode: usb}
  - {id: T3, mode: usb, khz: 5410}
stations:
  base:
    role: control
    address: TNYBAS
    name: Glenmore base
    at: {lon: -3.6950, lat: 57.1670}
    noise: rural
    power_w: 100
    antenna: wire
    ground: {soil: wet, system: rods}
  camp:
    ground: {system: counterpoise, soil: medium-dry}
    antenna: wire
    noise: quiet-rural
    power_w: 50
    at: {lon: -3.3970, lat: 57.0060}
    address: TNYCMP
    name: Braemar camp
net:
  links: hub
  net_address: TNYNET
  target_good_days: 0.7
  solar: {ssn: 70}
  valid: {to: 2027-05-30, from: 2027-05-03}
  timezone: Europe/London
  title: Invented hill group test net
  id: tiny-net
"""
