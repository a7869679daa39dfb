"""Maidenhead locators (the IARU grid) to and from latitude and longitude.

A locator is a field (two letters A-R, 20° × 10°), a square (two digits,
2° × 1°), a subsquare (two letters A-X, 5' × 2.5') and an extended square
(two digits, 30" × 15"). References: IARU Region 1 VHF Managers' Handbook,
"The Maidenhead Locator System".
"""

from __future__ import annotations

import re

_LOCATOR = re.compile(r"[A-Ra-r]{2}([0-9]{2}([A-Xa-x]{2}([0-9]{2})?)?)?\Z")


def is_locator(text: str) -> bool:
    """True for a 4, 6 or 8 character locator."""
    return len(text) in (4, 6, 8) and bool(_LOCATOR.match(text))


def to_latlon(text: str) -> tuple[float, float]:
    """Centre of the locator's square [deg]: (latitude, longitude)."""
    if not is_locator(text):
        raise ValueError(f"not a Maidenhead locator: {text!r}")
    t = text.upper()
    lon = (ord(t[0]) - 65) * 20.0 - 180.0
    lat = (ord(t[1]) - 65) * 10.0 - 90.0
    lon_step, lat_step = 20.0, 10.0
    pairs = [(t[i], t[i + 1]) for i in range(2, len(t), 2)]
    bases = [10, 24, 10]
    for (a, b), base in zip(pairs, bases):
        lon_step /= base
        lat_step /= base
        if a.isdigit():
            lon += int(a) * lon_step
            lat += int(b) * lat_step
        else:
            lon += (ord(a) - 65) * lon_step
            lat += (ord(b) - 65) * lat_step
    return lat + lat_step / 2.0, lon + lon_step / 2.0


def from_latlon(lat: float, lon: float, chars: int = 6) -> str:
    """The locator of a point, 4, 6 or 8 characters (subsquare letters in lower case)."""
    if chars not in (4, 6, 8):
        raise ValueError("chars must be 4, 6 or 8")
    lon = min(max(lon + 180.0, 0.0), 360.0 - 1e-9)
    lat = min(max(lat + 90.0, 0.0), 180.0 - 1e-9)
    out = [chr(65 + int(lon // 20)), chr(65 + int(lat // 10))]
    lon %= 20
    lat %= 10
    out += [str(int(lon // 2)), str(int(lat // 1))]
    lon %= 2
    lat %= 1
    if chars >= 6:
        out += [chr(97 + int(lon // (2 / 24))), chr(97 + int(lat // (1 / 24)))]
        lon %= 2 / 24
        lat %= 1 / 24
    if chars == 8:
        out += [str(int(lon // (2 / 240))), str(int(lat // (1 / 240)))]
    return "".join(out)
