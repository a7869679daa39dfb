"""Wire geometry for each antenna kind, ready for the NEC-2 solver.

Coordinates in metres, z up, ground at z = 0, wires along x.  Builders take
the lengths already decided (trimmed or given) and only lay out wires; they
never solve.

Segmentation follows the usual NEC-2 guidance of segments no longer than
about 0.05 wavelength, and never longer than 0.1 wavelength (NEC-2 user's
guide, part III): at most 1/40 of the design wavelength, at most 1/20 of
the wavelength of the highest assigned channel, and at most 1/10 of the
wavelength at the top of the band grid.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

C_M_PER_S = 299_792_458.0
MAX_SEGMENTS_PER_WIRE = 161
MAX_SEGMENT_M = 1.0
# Inverted-v apex feed wire [m]: short, so the legs meet almost at a point.
INVERTED_V_FEED_M = 0.3
# Lowest height any wire end may reach [m]: inverted-v ends carry high RF
# voltage and must stay out of reach (common practice, no source).
MIN_END_HEIGHT_M = 2.0
# Below this a wire is too close to the ground to model or to hang [m].
MIN_WIRE_HEIGHT_M = 0.3
# Lowest height of a dipole-reflector's reflector wire [m] (common practice,
# no source: low enough to walk under it is not wanted near the ground).
MIN_REFLECTOR_HEIGHT_M = 1.0


@dataclass(frozen=True)
class Wire:
    tag: int
    segments: int
    start: tuple[float, float, float]
    end: tuple[float, float, float]
    radius_m: float


@dataclass(frozen=True)
class Model:
    """A NEC wire model: wires, the fed segment and resistive loads."""

    wires: tuple[Wire, ...]
    feed: tuple[int, int]                       # (tag, segment), 1-based
    loads: tuple[tuple[int, int, float], ...] = ()  # (tag, segment, resistance [ohm])

    @property
    def segment_count(self) -> int:
        return sum(w.segments for w in self.wires)

    def lowest_z_m(self) -> float:
        return min(min(w.start[2], w.end[2]) for w in self.wires)


def wavelength_m(freq_khz: float) -> float:
    """Free-space wavelength [m] at a frequency [kHz]."""
    return C_M_PER_S / (freq_khz * 1e3)


def segment_length_m(design_khz: float | None, top_khz: float | None = None,
                     band_top_khz: float | None = None) -> float:
    """Target segment length [m] (see module docstring).

    At most 1/40 of the design wavelength, at most 1/20 of the wavelength
    at ``top_khz``, the highest assigned frequency solved (30 MHz when not
    given), at most 1/10 of the wavelength at ``band_top_khz``, the top of
    the band grid solved beside the channels (NEC-2's limit; the grid's
    upper end carries no NVIS net), and at most 1 m.  Trimming passes the
    design frequency as ``top_khz``, so the cut length does not depend on
    the channels.
    """
    seg = min(wavelength_m(top_khz if top_khz is not None else 30_000.0) / 20.0,
              MAX_SEGMENT_M)
    if band_top_khz is not None:
        seg = min(seg, wavelength_m(band_top_khz) / 10.0)
    if design_khz is not None:
        seg = min(seg, wavelength_m(design_khz) / 40.0)
    return seg


def _segments(length_m: float, seg_m: float, odd: bool = False, minimum: int = 1) -> int:
    n = max(minimum, math.ceil(length_m / seg_m - 1e-9))
    n = min(n, MAX_SEGMENTS_PER_WIRE)
    if odd and n % 2 == 0:
        n += 1
    return n


def dipole(total_m: float, height_m: float, radius_m: float, seg_m: float) -> Model:
    """Horizontal centre-fed dipole along x at ``height_m``."""
    n = _segments(total_m, seg_m, odd=True, minimum=11)
    w = Wire(1, n, (-total_m / 2, 0.0, height_m), (total_m / 2, 0.0, height_m), radius_m)
    return Model((w,), feed=(1, (n + 1) // 2))


def dipole_with_reflector(total_m: float, height_m: float, radius_m: float, seg_m: float,
                          reflector_m: float, reflector_height_m: float) -> Model:
    """Dipole with a parallel unfed reflector wire below it."""
    d = dipole(total_m, height_m, radius_m, seg_m)
    n = _segments(reflector_m, seg_m, odd=True, minimum=11)
    r = Wire(2, n, (-reflector_m / 2, 0.0, reflector_height_m),
             (reflector_m / 2, 0.0, reflector_height_m), radius_m)
    return Model(d.wires + (r,), feed=d.feed)


def inverted_v_end_height_m(total_m: float, apex_height_m: float, apex_deg: float,
                            seg_m: float) -> float:
    """Height of the leg ends above ground [m] (see :func:`inverted_v`)."""
    feed_m = min(INVERTED_V_FEED_M, 0.1 * total_m)
    leg = (total_m - feed_m) / 2.0
    return apex_height_m - leg * math.cos(math.radians(apex_deg / 2.0))


def inverted_v(total_m: float, apex_height_m: float, apex_deg: float, radius_m: float,
               seg_m: float) -> Model:
    """Inverted-V: a one-segment feed wire at the apex and two sloping legs.

    The feed wire (one segment of INVERTED_V_FEED_M) avoids feeding at a
    bend; ``total_m`` counts it, so the wire cut is ``total_m`` as for a
    flat dipole.
    """
    feed_m = min(INVERTED_V_FEED_M, 0.1 * total_m)
    leg = (total_m - feed_m) / 2.0
    half = math.radians(apex_deg / 2.0)
    dx, dz = leg * math.sin(half), leg * math.cos(half)
    a, b = (-feed_m / 2, 0.0, apex_height_m), (feed_m / 2, 0.0, apex_height_m)
    n = _segments(leg, seg_m, minimum=6)
    wires = (
        Wire(1, 1, a, b, radius_m),
        Wire(2, n, b, (b[0] + dx, 0.0, apex_height_m - dz), radius_m),
        Wire(3, n, a, (a[0] - dx, 0.0, apex_height_m - dz), radius_m),
    )
    return Model(wires, feed=(1, 1))


def folded_terminated(total_m: float, height_m: float, spacing_m: float, radius_m: float,
                      seg_m: float, resistor_ohm: float) -> Model:
    """Terminated folded dipole hung in a vertical plane.

    The fed wire is on top at ``height_m``; the wire carrying the
    terminating resistor at its centre runs ``spacing_m`` below; short
    vertical wires join the ends.
    """
    n = _segments(total_m, seg_m, odd=True, minimum=21)
    low = height_m - spacing_m
    half = total_m / 2
    ne = _segments(spacing_m, seg_m, minimum=1)
    wires = (
        Wire(1, n, (-half, 0.0, height_m), (half, 0.0, height_m), radius_m),
        Wire(2, n, (-half, 0.0, low), (half, 0.0, low), radius_m),
        Wire(3, ne, (-half, 0.0, low), (-half, 0.0, height_m), radius_m),
        Wire(4, ne, (half, 0.0, low), (half, 0.0, height_m), radius_m),
    )
    mid = (n + 1) // 2
    return Model(wires, feed=(1, mid), loads=((2, mid, resistor_ohm),))


def whip(length_m: float, base_height_m: float, radius_m: float, seg_m: float) -> Model:
    """Vertical whip fed at its base, the set grounded below it.

    One vertical wire runs from the ground (z = 0) to the whip tip: when the
    base stands above the ground the lead from the set's ground terminal
    down to the stake is part of the radiator, as it is in the field.  The
    feed is the segment at the base height.
    """
    top = base_height_m + length_m
    n = _segments(top, seg_m, minimum=9)
    seg = top / n
    feed = min(n, int(base_height_m // seg) + 1)
    w = Wire(1, n, (0.0, 0.0, 0.0), (0.0, 0.0, top), radius_m)
    return Model((w,), feed=(1, feed))
