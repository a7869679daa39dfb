"""Decide an antenna's dimensions before it is solved, and its cut sheet.

Lengths come from the design (given) or from NEC (trimmed to resonance at
the design frequency over the station's soil).  The geometry a plan cannot
hang (legs into the ground, no room for a reflector) was refused when the
design was made (:func:`planpack.antennas.design.check_geometry`); here the
trimming is kept within lengths whose ends stay at the safe minimum, so no
soil can push a wire lower.
"""

from __future__ import annotations

import math
import threading
from dataclasses import dataclass

from . import cut, geometry
from .design import DEFAULT_APEX_DEG, DEFAULT_FOLDED_SPACING_M, DIPOLE_KINDS, AntennaDesign, GroundSpec
from .geometry import wavelength_m
from .trim import Trim, trim_to_resonance

# Defaults applied when a plan leaves a field out (common practice, no
# source); each one applied is listed in the result's assumptions.
DEFAULT_FOLDED_LENGTH_M = 27.0
DEFAULT_FOLDED_RESISTOR_OHM = 800.0
DEFAULT_FOLDED_RATIO = 16.0
DEFAULT_RATIO = 1.0


@dataclass(frozen=True)
class Layout:
    """Decided dimensions of a design, ready to build."""

    total_m: float
    trim: Trim | None
    reflector_m: float | None
    reflector_height_m: float | None
    apex_deg: float | None
    spacing_m: float | None
    resistor_ohm: float | None
    ratio: float
    seg_m: float
    radius_m: float
    assumptions: tuple[str, ...]
    warnings: tuple[dict, ...]


def builder(design: AntennaDesign, lay_seg_m: float, radius_m: float, apex_deg, spacing_m,
            resistor_ohm, reflector_height_m):
    """Length [m] -> wire Model for the design's kind."""
    h = design.height_m
    k = design.kind
    if k == "dipole":
        return lambda L: geometry.dipole(L, h, radius_m, lay_seg_m)
    if k == "inverted-v":
        return lambda L: geometry.inverted_v(L, h, apex_deg, radius_m, lay_seg_m)
    if k == "dipole-reflector":
        return lambda L: geometry.dipole_with_reflector(
            L, h, radius_m, lay_seg_m, L * (1.0 + design.reflector_longer), reflector_height_m)
    if k == "folded-terminated":
        return lambda L: geometry.folded_terminated(L, h, spacing_m, radius_m, lay_seg_m,
                                                    resistor_ohm)
    return lambda L: geometry.whip(L, h, radius_m, lay_seg_m)


_TRIM_CACHE: dict[tuple, Layout] = {}
_LOCK = threading.Lock()


def layout(design: AntennaDesign, ground: GroundSpec) -> Layout:
    """The decided dimensions of a design over a ground (cached: trimming costs NEC solves)."""
    key = (design, ground)
    with _LOCK:
        hit = _TRIM_CACHE.get(key)
    if hit is not None:
        return hit
    lay = _decide_layout(design, ground)
    with _LOCK:
        _TRIM_CACHE[key] = lay
    return lay


def _decide_layout(d: AntennaDesign, g: GroundSpec) -> Layout:
    assumptions: list[str] = []
    warnings: list[dict] = []
    seg = geometry.segment_length_m(d.design_khz, d.design_khz)
    radius = d.wire_mm / 2000.0
    apex = spacing = resistor = refl_h = None
    ratio = d.transformer_ratio
    if ratio is None:
        ratio = DEFAULT_FOLDED_RATIO if d.kind == "folded-terminated" else DEFAULT_RATIO
        assumptions.append(f"transformer_ratio not given: {ratio:g}:1 assumed "
                           "(common practice, no source)")
    if d.kind == "inverted-v":
        apex = d.apex_deg
        if apex is None:
            apex = DEFAULT_APEX_DEG
            assumptions.append(f"apex_deg not given: {apex:g} degrees between the legs "
                               "assumed (common practice, no source)")
    if d.kind == "dipole-reflector":
        lam = wavelength_m(d.design_khz)
        want = d.height_m - d.reflector_below_wl * lam
        refl_h = max(want, geometry.MIN_REFLECTOR_HEIGHT_M)
        if want < geometry.MIN_REFLECTOR_HEIGHT_M:
            warnings.append({
                "code": "reflector-raised",
                "severity": "warning",
                "message": (f"The reflector would hang {d.reflector_below_wl:g} wavelength "
                            f"({d.reflector_below_wl * lam:.1f} m) below the dipole, under "
                            f"the {geometry.MIN_REFLECTOR_HEIGHT_M:g} m minimum height; it is "
                            f"placed at {refl_h:.1f} m, {d.height_m - refl_h:.1f} m below the dipole."),
            })
    if d.kind == "folded-terminated":
        spacing = d.spacing_m if d.spacing_m is not None else DEFAULT_FOLDED_SPACING_M
        resistor = d.resistor_ohm if d.resistor_ohm is not None else DEFAULT_FOLDED_RESISTOR_OHM
        for name, given, val, unit in (("length_m", d.length_m, DEFAULT_FOLDED_LENGTH_M, "m"),
                                       ("spacing_m", d.spacing_m, spacing, "m"),
                                       ("resistor_ohm", d.resistor_ohm, resistor, "ohm")):
            if given is None:
                assumptions.append(f"{name} not given: {val:g} {unit} assumed for a 2-30 MHz "
                                   "folded-terminated dipole (common practice, no source)")
    build = builder(d, seg, radius, apex, spacing, resistor, refl_h)

    trim = None
    if d.kind == "folded-terminated":
        total = d.length_m if d.length_m is not None else DEFAULT_FOLDED_LENGTH_M
    elif d.kind == "whip" and d.length_m is not None:
        total = d.length_m
    elif d.kind == "whip":
        start = max(cut.quarter_wave_rule_m(d.design_khz) - d.height_m, 1.0)
        trim = trim_to_resonance(build, g.soil, d.design_khz, start, bonded_vertical=True)
        total = trim.length_m
    else:
        rule = cut.half_wave_rule_m(d.design_khz)
        cap = None
        if d.kind == "inverted-v":
            # The longest wire whose leg ends stay at the safe minimum height: trimming never
            # goes past it, whatever the soil (the rule-of-thumb length was checked to fit).
            drop = math.cos(math.radians(apex / 2.0))
            feed = min(geometry.INVERTED_V_FEED_M, 0.1 * rule)
            cap = 2.0 * (d.height_m - geometry.MIN_END_HEIGHT_M) / max(drop, 1e-9) + feed
            cap = max(cap, rule)
        trim = trim_to_resonance(build, g.soil, d.design_khz, rule, max_length_m=cap)
        total = trim.length_m
    if trim is not None and not trim.resonant:
        warnings.append({
            "code": "no-resonance",
            "severity": "warning",
            "message": (f"NEC found no resonance at {d.design_khz:g} kHz near the rule-of-thumb length "
                        f"within the lengths this height allows; {total:.2f} m is used: check the "
                        "height and the ground."),
        })
    low_end = lowest_fed_end_m(d, total, apex, spacing)
    if low_end < geometry.MIN_END_HEIGHT_M - 1e-6:
        warnings.append({
            "code": "wire-ends-low",
            "severity": "warning",
            "end_height_m": low_end,
            "message": (f"The wire ends of this {d.kind} are {low_end:.1f} m above the ground, under the "
                        f"{geometry.MIN_END_HEIGHT_M:g} m minimum: they carry high RF voltage and are "
                        f"within reach; hang the antenna at least {geometry.MIN_END_HEIGHT_M:g} m up "
                        "(its ends included) or fence them off."),
        })
    refl_m = total * (1.0 + d.reflector_longer) if d.kind == "dipole-reflector" else None
    return Layout(total, trim, refl_m, refl_h, apex, spacing, resistor, float(ratio), seg,
                  radius, tuple(assumptions), tuple(warnings))


def lowest_fed_end_m(d: AntennaDesign, total_m: float, apex_deg: float | None,
                     spacing_m: float | None) -> float:
    """Height above ground of the lowest end of the wires that carry the feed's RF voltage [m].

    A dipole's ends are at its height; an inverted-V's at the end of its
    legs; a folded-terminated dipole's lower wire hangs ``spacing_m`` below.
    A whip stands on its base and is not a hanging wire: +inf.
    """
    if d.kind == "inverted-v":
        return geometry.inverted_v_end_height_m(total_m, d.height_m, apex_deg, 0.0)
    if d.kind == "folded-terminated":
        return d.height_m - spacing_m
    if d.kind == "whip":
        return math.inf
    return d.height_m


def cut_sheet(d: AntennaDesign, lay: Layout) -> dict:
    """The cut sheet of plan.json's ``antennas[].cut``: lengths in metres and feet-inches."""
    kind = d.kind
    total = lay.total_m
    leg = total / 2.0 if kind in DIPOLE_KINDS else None
    rule = None
    if kind in DIPOLE_KINDS:
        rule = cut.half_wave_rule_m(d.design_khz)
    elif kind == "whip" and d.design_khz is not None:
        rule = cut.quarter_wave_rule_m(d.design_khz)
    below = d.height_m - lay.reflector_height_m if lay.reflector_height_m is not None else None
    # Pieces of wire and how many ends each has to loop: dipole legs run from
    # the centre insulator to an end insulator; a whip is bought, not cut.
    if kind in DIPOLE_KINDS:
        leg_cut = cut.with_allowance_m(leg, 2)
        total_cut = 2 * leg_cut
    elif kind == "folded-terminated":
        leg_cut = None
        total_cut = cut.with_allowance_m(total, 2)
    else:
        leg_cut = None
        total_cut = None
    sheet = {
        "total_m": total,
        "leg_m": leg,
        "rule_of_thumb_total_m": rule,
        "rule_of_thumb_leg_m": rule / 2.0 if rule is not None and kind in DIPOLE_KINDS else None,
        "rule_of_thumb_basis": (
            "468 / f[MHz] ft for a half-wave dipole (common practice, no source)"
            if kind in DIPOLE_KINDS else
            "234 / f[MHz] ft for a quarter-wave vertical (common practice, no source)"
            if rule is not None else None),
        "rule_vs_nec_percent": (100.0 * (rule - total) / total) if rule is not None else None,
        "reflector_m": lay.reflector_m,
        "reflector_below_m": below,
        "reflector_height_m": lay.reflector_height_m,
        "total_ft_in": cut.feet_inches(total),
        "leg_ft_in": cut.feet_inches(leg),
        "rule_of_thumb_total_ft_in": cut.feet_inches(rule),
        "reflector_ft_in": cut.feet_inches(lay.reflector_m),
        "reflector_below_ft_in": cut.feet_inches(below),
        "end_allowance_m": cut.END_ALLOWANCE_M if total_cut is not None else None,
        "allowance_basis": ("cut each piece with extra for the end loops and insulators: "
                            f"{cut.END_ALLOWANCE_M * 100:g} cm at each end "
                            "(common practice, no source)") if total_cut is not None else None,
        "leg_cut_with_extra_m": leg_cut,
        "leg_cut_with_extra_ft_in": cut.feet_inches(leg_cut),
        "total_cut_with_extra_m": total_cut,
        "total_cut_with_extra_ft_in": cut.feet_inches(total_cut),
        "reflector_cut_with_extra_m": cut.with_allowance_m(lay.reflector_m, 2),
        "reflector_cut_with_extra_ft_in": cut.feet_inches(cut.with_allowance_m(lay.reflector_m, 2)),
        "trimmed": lay.trim is not None and lay.trim.resonant,
        "trimmed_at": ({"freq_khz": d.design_khz, "height_m": d.height_m,
                        "wire_mm": d.wire_mm} if lay.trim is not None else None),
        "resonant_impedance_ohm": ([lay.trim.impedance_ohm.real, lay.trim.impedance_ohm.imag]
                                   if lay.trim is not None else None),
        "apex_deg": lay.apex_deg,
        "end_height_m": (geometry.inverted_v_end_height_m(total, d.height_m, lay.apex_deg, lay.seg_m)
                         if kind == "inverted-v" else None),
        "min_end_height_m": geometry.MIN_END_HEIGHT_M if kind == "inverted-v" else None,
        "spacing_m": lay.spacing_m,
        "resistor_ohm": lay.resistor_ohm,
        "transformer_ratio": lay.ratio,
    }
    return sheet
