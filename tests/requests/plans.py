"""Invented plans for the request tests (stations, addresses and organisations are invented; geography is real)."""

from __future__ import annotations

import os

#: A hub net whose channels are all 6.8-11 MHz: links of 130-250 km in Bavaria and Thuringia in January.
#: Its night needs a channel near 3 MHz that it was never assigned.
HIGH_BAND_NVIS = """\
planpack: 1
net:
  id: highband-nvis
  title: Upland rescue exercise net (high channels only)
  handling: "EXERCISE ONLY"
  timezone: Europe/Berlin
  valid: {from: 2027-01-10, to: 2027-01-24}
  solar: {ssn: 70}
  links: hub
  target_good_days: 0.8
stations:
  base:
    name: Exercise control
    address: HBBASE
    role: control
    at: {lat: 49.45, lon: 11.08}
    power_w: 100
    noise: rural
    antenna: wire
    ground: {soil: medium-dry, system: rods}
  north:
    name: North team
    address: HBNRTH
    at: {lat: 51.50, lon: 11.00}
    power_w: 100
    noise: rural
    antenna: wire
    ground: {soil: medium-dry, system: rods}
  east:
    name: East team
    address: HBEAST
    at: {lat: 49.02, lon: 12.95}
    power_w: 100
    noise: rural
    antenna: wire
    ground: {soil: medium-dry, system: rods}
  south:
    name: South team
    address: HBSTH
    at: {lat: 48.14, lon: 11.58}
    power_w: 100
    noise: quiet-rural
    antenna: wire
    ground: {soil: wet, system: rods}
channels:
  - {id: H1, khz: 6815, mode: usb}
  - {id: H2, khz: 7650, mode: usb}
  - {id: H3, khz: 8450, mode: usb}
  - {id: H4, khz: 9320, mode: usb}
  - {id: H5, khz: 10150, mode: usb}
  - {id: H6, khz: 10980, mode: usb}
antennas:
  wire:
    kind: inverted-v
    design_khz: 7200
    height_m: 11
    apex_deg: 120
    matching: feedpoint-coupler
    feedline: {z0_ohm: 50, length_m: 20, loss_db_per_100m_at_10mhz: 3.5}
"""


def write(tmp_path, text: str, name: str = "net.yaml") -> str:
    path = os.path.join(str(tmp_path), name)
    with open(path, "w", encoding="utf-8") as fh:
        fh.write(text)
    return path
