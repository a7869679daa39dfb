"""Analyse one antenna design over one ground on a set of channels.

The flow for each (design, ground, frequency set): decide lengths (trim to
resonance with NEC where the kind is cut for a frequency), build the wire
model, solve every frequency in one NEC context, then interpret: SWR through
the balun or transformer, mismatch and feedline losses, the elevation
pattern, the NVIS height window, and the warnings a planner needs.

Results are cached on the frozen inputs, so many stations sharing a design
solve it once.  The arrays in a result are read-only because the same result
object is handed to every caller.
"""

from __future__ import annotations

import math
import os
import threading
from collections.abc import Iterable, Sequence
from concurrent.futures import ProcessPoolExecutor
from dataclasses import dataclass

import numpy as np

from . import cut, geometry, ground as gnd, matching, pattern
from .design import (DIPOLE_KINDS, AntennaDesign, AntennaInputError, GroundSpec,
                     check_freqs_khz)
from .geometry import Model, wavelength_m
from .solver import solve
from .trim import Trim, trim_to_resonance

# Usual NVIS height window for horizontal wires [wavelengths] (common
# practice, no source); for the optimum over real ground see Witvliet et al.,
# IEEE Antennas and Propagation Magazine 57(1), 2015.
NVIS_WINDOW_WL = (0.10, 0.25)
NVIS_WINDOW_BASIS = (
    "0.1-0.25 wavelength is the usual NVIS height window (common practice, no source); "
    "for the optimum over real ground see Witvliet et al., IEEE Antennas and "
    "Propagation Magazine 57(1), 2015."
)
HORIZONTAL_KINDS = DIPOLE_KINDS + ("folded-terminated",)

# Defaults applied when a plan leaves a field out (common practice, no
# source); each one applied is listed in the result's assumptions.
DEFAULT_APEX_DEG = 120.0
DEFAULT_FOLDED_LENGTH_M = 27.0
DEFAULT_FOLDED_SPACING_M = 0.9
DEFAULT_FOLDED_RESISTOR_OHM = 800.0
DEFAULT_FOLDED_RATIO = 16.0
DEFAULT_RATIO = 1.0
WHIP_LOSS_WARN_DB = 10.0

ENGINE = "NEC-2 (nec2++ through PyNEC 2.3.4)"


# ---------------------------------------------------------------- result


@dataclass(frozen=True)
class AntennaAnalysis:
    """Everything computed for one design over one ground on a channel set.

    Per-channel arrays follow the order of ``freqs_khz`` as given.

    Gain tables
    -----------
    gain_table_dbi : (c, 91)
        Azimuth-averaged antenna gain [dBi] at elevation 0..90 deg (step 1)
        per channel, relative to the power accepted at the feed point; it
        includes NEC's ground reflection and the near-field ground loss, and
        is floored at -40 dBi (NEC gives -999 dB at the horizon).
    system_gain_table_dbi : (c, 91)
        ``gain_table_dbi - system_loss_db[:, None]``: what the link budget
        should use, relative to the set's output power.
    system_loss_db : (c,)
        Dipole kinds and folded-terminated: mismatch loss + matched
        feedline loss (the set is assumed to deliver its power without a
        tuner, which is what makes a badly cut antenna show).  Whip: ground
        loss + tuner loss + feedline loss with SWR (the set's tuner matches
        it at the base).
    """

    design: AntennaDesign
    ground: GroundSpec
    freqs_khz: tuple[float, ...]
    reference_freq_khz: float
    height_wavelengths: float
    cut: dict
    impedance_ohm: np.ndarray
    swr: np.ndarray
    swr_class: tuple[str, ...]
    mismatch_loss_db: np.ndarray
    feedline_loss_db: np.ndarray
    feedline_loss_with_swr_db: np.ndarray
    ground_loss_db: np.ndarray | None
    tuner_loss_db: np.ndarray | None
    system_loss_db: np.ndarray
    peak_gain_dbi: np.ndarray
    zenith_gain_dbi: np.ndarray
    fraction_above_60deg: np.ndarray
    gain_table_dbi: np.ndarray
    system_gain_table_dbi: np.ndarray
    pattern: dict
    nvis_window: dict
    reflector: dict | None
    whip_ground: dict | None
    warnings: tuple[dict, ...]
    assumptions: tuple[str, ...]
    solver: dict

    @property
    def kind(self) -> str:
        return self.design.kind

    @property
    def elevation_deg(self) -> np.ndarray:
        return pattern.ELEVATION_DEG

    def to_dict(self, channel_names: Sequence[str | None] | None = None) -> dict:
        """Plain JSON-ready data for ``plan.json`` ``antennas[]`` (without the
        ``id``, ``stations`` and ``exposure`` keys the compiler adds).

        Parameters
        ----------
        channel_names : sequence of str, optional
            Channel names in the order of ``freqs_khz``; None leaves
            ``channel`` null.
        """
        names = list(channel_names) if channel_names is not None else [None] * len(self.freqs_khz)
        if len(names) != len(self.freqs_khz):
            raise ValueError(f"channel_names: expected {len(self.freqs_khz)} names, "
                             f"got {len(names)}")
        by_freq = dict(zip(self.freqs_khz, names))
        channels = []
        for i, f in enumerate(self.freqs_khz):
            z = self.impedance_ohm[i]
            ch = {
                "channel": names[i],
                "freq_khz": _r(f, 3),
                "impedance_ohm": [_r(z.real, 1), _r(z.imag, 1)],
                "swr": _r(self.swr[i], 2),
                "swr_class": self.swr_class[i],
                "mismatch_loss_db": _r(self.mismatch_loss_db[i], 2),
                "feedline_loss_db": _r(self.feedline_loss_db[i], 2),
                "feedline_loss_with_swr_db": _r(self.feedline_loss_with_swr_db[i], 2),
                "system_loss_db": _r(self.system_loss_db[i], 2),
                "height_wavelengths": _r(self.design.height_m / wavelength_m(f), 3),
                "pattern": {
                    "peak_gain_dbi": _r(self.peak_gain_dbi[i], 2),
                    "zenith_gain_dbi": _r(self.zenith_gain_dbi[i], 2),
                    "fraction_above_60deg": _r(self.fraction_above_60deg[i], 3),
                },
                "elevation_gain_dbi": [_r(g, 2) for g in self.gain_table_dbi[i]],
            }
            if self.ground_loss_db is not None:
                ch["matched_by_tuner"] = True
                ch["ground_loss_db"] = _r(self.ground_loss_db[i], 2)
                ch["tuner_loss_db"] = _r(self.tuner_loss_db[i], 2)
            channels.append(ch)
        warnings = []
        for w in self.warnings:
            w = dict(w)
            if "freq_khz" in w:
                w["channel"] = by_freq.get(w["freq_khz"])
            warnings.append(w)
        return {
            "kind": self.design.kind,
            "design_khz": self.design.design_khz,
            "reference_freq_khz": _r(self.reference_freq_khz, 3),
            "height_m": self.design.height_m,
            "cut": _round_tree(self.cut),
            "channels": channels,
            "pattern": _round_tree(self.pattern),
            "height_wavelengths": _r(self.height_wavelengths, 3),
            "nvis_window": _round_tree(self.nvis_window),
            "reflector": _round_tree(self.reflector),
            "ground": _round_tree(self._ground_dict()),
            "elevation_deg_step": 1,
            "warnings": _round_tree(warnings),
            "assumptions": list(self.assumptions),
            "solver": dict(self.solver),
        }

    def _ground_dict(self) -> dict:
        soil = self.ground.soil
        eps, sig = gnd.SOIL_CONSTANTS.get(soil, (None, None))
        return {
            "soil": soil,
            "system": self.ground.system,
            "eps_r": eps,
            "sigma_s_per_m": sig,
            "constants_source": "ITU-R P.527" if eps is not None else "idealised",
            "whip_loss_model": self.whip_ground,
        }


def _r(x, nd: int):
    if x is None:
        return None
    x = float(x)
    if not math.isfinite(x):
        return None
    v = round(x, nd)
    return 0.0 if v == 0 else v


def _round_tree(obj):
    if isinstance(obj, dict):
        return {k: _round_tree(v) for k, v in obj.items()}
    if isinstance(obj, (list, tuple)):
        return [_round_tree(v) for v in obj]
    if isinstance(obj, (float, np.floating)):
        return _r(obj, 4)
    if isinstance(obj, np.integer):
        return int(obj)
    if isinstance(obj, np.bool_):
        return bool(obj)
    return obj


# ---------------------------------------------------------------- lengths


@dataclass(frozen=True)
class _Layout:
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


def _builder(design: AntennaDesign, lay_seg_m: float, radius_m: float, apex_deg, spacing_m,
             resistor_ohm, reflector_height_m):
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


_TRIM_CACHE: dict[tuple, _Layout] = {}
_LOCK = threading.Lock()


def _layout(design: AntennaDesign, ground: GroundSpec) -> _Layout:
    key = (design, ground)
    with _LOCK:
        hit = _TRIM_CACHE.get(key)
    if hit is not None:
        return hit
    lay = _decide_layout(design, ground)
    with _LOCK:
        _TRIM_CACHE[key] = lay
    return lay


def _decide_layout(d: AntennaDesign, g: GroundSpec) -> _Layout:
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
        if refl_h >= d.height_m - 0.5:
            raise AntennaInputError(
                "AntennaDesign.height_m",
                f"a dipole-reflector hung at least {geometry.MIN_REFLECTOR_HEIGHT_M + 0.5:g} m "
                "up, so that its reflector fits below it", d.height_m)
        if want < geometry.MIN_REFLECTOR_HEIGHT_M:
            warnings.append({
                "code": "reflector-raised",
                "severity": "warning",
                "message": (f"the reflector would be {d.reflector_below_wl:g} wavelength "
                            f"({d.reflector_below_wl * lam:.1f} m) below the dipole, under "
                            f"the {geometry.MIN_REFLECTOR_HEIGHT_M:g} m minimum; it is "
                            f"placed at {refl_h:.1f} m, {d.height_m - refl_h:.1f} m below"),
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
        if d.height_m - spacing < geometry.MIN_REFLECTOR_HEIGHT_M:
            raise AntennaInputError(
                "AntennaDesign.height_m",
                f"a height at least {spacing + geometry.MIN_REFLECTOR_HEIGHT_M:g} m so that "
                f"the lower wire, {spacing:g} m below, stays "
                f"{geometry.MIN_REFLECTOR_HEIGHT_M:g} m above ground", d.height_m)
    build = _builder(d, seg, radius, apex, spacing, resistor, refl_h)

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
            _check_inverted_v_ends(d, rule, apex, seg)
            # Longest wire whose ends stay above half the modelling minimum.
            drop = math.cos(math.radians(apex / 2.0))
            feed = min(geometry.INVERTED_V_FEED_M, 0.1 * rule)
            cap = 2.0 * (d.height_m - geometry.MIN_WIRE_HEIGHT_M / 2) / max(drop, 1e-9) + feed
        trim = trim_to_resonance(build, g.soil, d.design_khz, rule, max_length_m=cap)
        total = trim.length_m
    if trim is not None and not trim.resonant:
        warnings.append({
            "code": "no-resonance",
            "severity": "warning",
            "message": (f"NEC found no resonance near the rule-of-thumb length at "
                        f"{d.design_khz:g} kHz; the rule-of-thumb length {total:.2f} m is "
                        "used; check the height and the ground"),
        })
    if d.kind == "inverted-v":
        end_h = _check_inverted_v_ends(d, total, apex, seg)
        if end_h < geometry.MIN_END_HEIGHT_M:
            warnings.append({
                "code": "inverted-v-ends-low",
                "severity": "warning",
                "message": (f"the leg ends come down to {end_h:.1f} m, below the "
                            f"{geometry.MIN_END_HEIGHT_M:g} m minimum: the ends carry high RF "
                            "voltage; raise the apex or widen the angle between the legs"),
            })
    refl_m = total * (1.0 + d.reflector_longer) if d.kind == "dipole-reflector" else None
    return _Layout(total, trim, refl_m, refl_h, apex, spacing, resistor, float(ratio), seg,
                   radius, tuple(assumptions), tuple(warnings))


def _check_inverted_v_ends(d: AntennaDesign, total_m: float, apex: float, seg: float) -> float:
    end_h = geometry.inverted_v_end_height_m(total_m, d.height_m, apex, seg)
    if end_h < geometry.MIN_WIRE_HEIGHT_M:
        raise AntennaInputError(
            "AntennaDesign.height_m",
            f"an apex high enough for {total_m / 2:.1f} m legs at {apex:g} degrees to end "
            f"at least {geometry.MIN_END_HEIGHT_M:g} m above ground (they would end at "
            f"{end_h:.1f} m); raise the apex or widen apex_deg", d.height_m)
    return end_h


def _cut_sheet(d: AntennaDesign, lay: _Layout) -> dict:
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
        "end_height_m": (geometry.inverted_v_end_height_m(total, d.height_m, lay.apex_deg,
                                                          lay.seg_m)
                         if kind == "inverted-v" else None),
        "min_end_height_m": geometry.MIN_END_HEIGHT_M if kind == "inverted-v" else None,
        "spacing_m": lay.spacing_m,
        "resistor_ohm": lay.resistor_ohm,
        "transformer_ratio": lay.ratio,
    }
    return sheet


# ---------------------------------------------------------------- analysis


_ANALYSIS_CACHE: dict[tuple, AntennaAnalysis] = {}
_STATS = {"hits": 0, "misses": 0}


def _readonly(a: np.ndarray) -> np.ndarray:
    a = np.array(a)
    a.flags.writeable = False
    return a


def _reference_freq_khz(d: AntennaDesign, freqs: tuple[float, ...]) -> float:
    return d.design_khz if d.design_khz is not None else min(freqs)


def _analyse_uncached(design: AntennaDesign, ground: GroundSpec,
                      freqs: tuple[float, ...]) -> AntennaAnalysis:
    d = design
    lay = _layout(d, ground)
    ref = _reference_freq_khz(d, freqs)
    solve_set = tuple(sorted(set(freqs) | {ref}))
    seg = geometry.segment_length_m(d.design_khz, solve_set[-1])
    build = _builder(d, seg, lay.radius_m, lay.apex_deg, lay.spacing_m, lay.resistor_ohm,
                     lay.reflector_height_m)
    model: Model = build(lay.total_m)
    z_all, g_all = solve(model, ground.soil, solve_set, pattern=True,
                         bonded_vertical=d.kind == "whip")
    idx = [solve_set.index(f) for f in freqs]
    ridx = solve_set.index(ref)
    summ = pattern.summary(g_all)
    z = z_all[idx]
    f = np.asarray(freqs, float)

    # Feed-point match and losses.
    ground_loss = tuner_loss = None
    matched_db = matching.matched_line_loss_db(f, d.feed_length_m,
                                               d.feed_loss_db_per_100m_at_10mhz)
    if d.kind == "whip":
        r_g = gnd.ground_loss_ohm(ground.soil, ground.system)
        z_term = z + r_g  # what the tuner sees: the ground loss is in series
        gamma = matching.reflection(z_term, d.feed_z0_ohm, lay.ratio)
        r = np.maximum(z.real, 1e-6)
        r_t = np.abs(z.imag) / gnd.TUNER_Q
        ground_loss = 10.0 * np.log10((r + r_g) / r)
        tuner_loss = 10.0 * np.log10((r + r_g + r_t) / (r + r_g))
        with_swr = matching.line_loss_with_swr_db(matched_db, gamma)
        system_loss = ground_loss + tuner_loss + with_swr
    else:
        gamma = matching.reflection(z, d.feed_z0_ohm, lay.ratio)
        with_swr = matching.line_loss_with_swr_db(matched_db, gamma)
    swr = matching.swr(gamma)
    mismatch = matching.mismatch_loss_db(gamma)
    if d.kind != "whip":
        system_loss = mismatch + matched_db
    classes = tuple(matching.swr_class(float(s)) for s in swr)

    table = summ["table_dbi"][idx]
    sys_table = table - system_loss[:, None]

    lam_ref = wavelength_m(ref)
    h_wl = d.height_m / lam_ref
    applies = d.kind in HORIZONTAL_KINDS
    lo, hi = NVIS_WINDOW_WL
    inside = bool(lo <= h_wl <= hi)
    nvis = {
        "applies": applies,
        "freq_khz": ref,
        "height_wavelengths": h_wl,
        "low_wavelengths": lo,
        "high_wavelengths": hi,
        "inside": inside if applies else None,
        "low_height_m": lo * lam_ref,
        "high_height_m": hi * lam_ref,
        "basis": NVIS_WINDOW_BASIS,
    }

    warnings = list(lay.warnings)
    for i, fk in enumerate(freqs):
        if z[i].real <= 0.0:  # NEC-2's thin-wire model fails for wires very near the ground far below resonance
            warnings.append({
                "code": "solver-unreliable",
                "severity": "warning",
                "freq_khz": fk,
                "message": (f"NEC-2 gives a non-physical feed resistance ({z[i].real:.1f} ohm) at {fk:g} kHz; "
                            f"the figures for this channel are not to be trusted (wire ends too near the "
                            f"ground for this frequency?); the link budget counts it as unusable"),
            })
    if applies and not inside:
        warnings.append({
            "code": "outside-nvis-window",
            "severity": "warning",
            "message": (f"hung at {d.height_m:g} m, {h_wl:.2f} wavelength at {ref:g} kHz: "
                        f"outside the usual NVIS window of {lo:g}-{hi:g} wavelength "
                        f"({lo * lam_ref:.1f}-{hi * lam_ref:.1f} m)"),
        })
    for i, fk in enumerate(freqs):
        if d.kind != "whip" and swr[i] > matching.SWR_TUNER_MAX:
            warnings.append({
                "code": "swr-above-3",
                "severity": "warning",
                "freq_khz": fk,
                "swr": float(swr[i]),
                "mismatch_loss_db": float(mismatch[i]),
                "message": (f"SWR {swr[i]:.1f}:1 at {fk:g} kHz: the set's tuner may match it, "
                            f"but without a match {mismatch[i]:.1f} dB of the power is lost"
                            + (f"; matched at the set, the feedline loses {with_swr[i]:.1f} dB "
                               f"(against {matched_db[i]:.1f} dB matched)"
                               if d.feed_length_m > 0 else "")),
            })
        if d.kind == "whip" and system_loss[i] > WHIP_LOSS_WARN_DB:
            warnings.append({
                "code": "whip-low-efficiency",
                "severity": "warning",
                "freq_khz": fk,
                "system_loss_db": float(system_loss[i]),
                "message": (f"the whip turns only {100 * 10 ** (-system_loss[i] / 10):.0f} % "
                            f"of the power into radiation at {fk:g} kHz (ground system "
                            f"{ground_loss[i]:.1f} dB, tuner {tuner_loss[i]:.1f} dB)"),
            })

    reflector = None
    if d.kind == "dipole-reflector":
        bare = geometry.dipole(lay.total_m, d.height_m, lay.radius_m, seg)
        _, g_bare = solve(bare, ground.soil, (ref,), pattern=True)
        bare_sum = pattern.summary(g_bare)
        with_r = float(summ["zenith_gain_dbi"][ridx])
        without = float(bare_sum["zenith_gain_dbi"][0])
        reflector = {
            "freq_khz": ref,
            "zenith_gain_with_reflector_dbi": with_r,
            "zenith_gain_without_reflector_dbi": without,
            "zenith_gain_increase_db": with_r - without,
            "fraction_above_60deg_with": float(summ["fraction_above_60deg"][ridx]),
            "fraction_above_60deg_without": float(bare_sum["fraction_above_60deg"][0]),
            "basis": ("a reflector about 5 % longer, about 0.15 wavelength below, raises the "
                      "gain straight up (common practice, no source); figures from NEC"),
        }

    whip_ground = None
    if d.kind == "whip":
        whip_ground = {
            "ground_loss_ohm": gnd.ground_loss_ohm(ground.soil, ground.system),
            "tuner_q": gnd.TUNER_Q,
            "model": gnd.GROUND_LOSS_MODEL,
        }

    pat = {
        "freq_khz": ref,
        "peak_gain_dbi": float(summ["peak_gain_dbi"][ridx]),
        "zenith_gain_dbi": float(summ["zenith_gain_dbi"][ridx]),
        "fraction_above_60deg": float(summ["fraction_above_60deg"][ridx]),
        "max_peak_gain_dbi_on_channels": float(np.max(summ["peak_gain_dbi"][idx])),
    }
    solver_info = {
        "engine": ENGINE,
        "ground_model": {"free-space": "free space", "perfect": "perfect ground"}.get(
            ground.soil, "perfect-ground currents, far field weighted by the soil's reflection, "
            "plus the ground-system loss model"
            if d.kind == "whip" else "Sommerfeld-Norton (NEC GN 2)"),
        "segments": model.segment_count,
        "wires": len(model.wires),
        "wire_loss": "copper, 5.8e7 S/m",
        "pattern_grid": "elevation 0-90 deg step 1, azimuth 0-90 deg step 15 (symmetric)",
        "trim_solves": lay.trim.solves if lay.trim is not None else 0,
    }

    return AntennaAnalysis(
        design=d, ground=ground, freqs_khz=freqs, reference_freq_khz=ref,
        height_wavelengths=h_wl, cut=_cut_sheet(d, lay),
        impedance_ohm=_readonly(z), swr=_readonly(swr), swr_class=classes,
        mismatch_loss_db=_readonly(mismatch), feedline_loss_db=_readonly(matched_db),
        feedline_loss_with_swr_db=_readonly(with_swr),
        ground_loss_db=None if ground_loss is None else _readonly(ground_loss),
        tuner_loss_db=None if tuner_loss is None else _readonly(tuner_loss),
        system_loss_db=_readonly(system_loss),
        peak_gain_dbi=_readonly(summ["peak_gain_dbi"][idx]),
        zenith_gain_dbi=_readonly(summ["zenith_gain_dbi"][idx]),
        fraction_above_60deg=_readonly(summ["fraction_above_60deg"][idx]),
        gain_table_dbi=_readonly(table), system_gain_table_dbi=_readonly(sys_table),
        pattern=pat, nvis_window=nvis, reflector=reflector, whip_ground=whip_ground,
        warnings=tuple(warnings), assumptions=lay.assumptions, solver=solver_info,
    )


def _check(design, ground, freqs_khz) -> tuple[float, ...]:
    if not isinstance(design, AntennaDesign):
        raise AntennaInputError("design", "an AntennaDesign", type(design).__name__)
    if not isinstance(ground, GroundSpec):
        raise AntennaInputError("ground", "a GroundSpec", type(ground).__name__)
    return check_freqs_khz(freqs_khz)


def analyse_antenna(design: AntennaDesign, ground: GroundSpec,
                    freqs_khz: tuple[float, ...]) -> AntennaAnalysis:
    """Cut sheet, SWR, losses and elevation pattern of one antenna on its channels.

    Parameters
    ----------
    design : AntennaDesign
    ground : GroundSpec
    freqs_khz : tuple of float
        Assigned channel frequencies [kHz], 1000 to 30000; results follow
        this order.

    Returns
    -------
    AntennaAnalysis
        Cached: the same inputs return the same (read-only) object.

    Raises
    ------
    AntennaInputError
        A field or a derived dimension the analysis cannot use.
    AntennaSolveError
        NEC failed on the model.
    """
    freqs = _check(design, ground, freqs_khz)
    key = (design, ground, freqs)
    with _LOCK:
        hit = _ANALYSIS_CACHE.get(key)
        if hit is not None:
            _STATS["hits"] += 1
            return hit
    result = _analyse_uncached(design, ground, freqs)
    with _LOCK:
        _STATS["misses"] += 1
        return _ANALYSIS_CACHE.setdefault(key, result)


def _worker(job):
    return _analyse_uncached(*job)


def analyse_antennas(jobs: Iterable[tuple[AntennaDesign, GroundSpec, Sequence[float]]],
                     workers: int | None = None) -> list[AntennaAnalysis]:
    """Analyse many (design, ground, freqs_khz) jobs; same results as
    :func:`analyse_antenna`, in the order given.

    Distinct uncached jobs are solved once each, in ``workers`` processes
    (default: the CPU count; 1 solves in this process).  Results enter the
    same cache.
    """
    jobs = [(d, g, _check(d, g, f)) for d, g, f in jobs]
    with _LOCK:
        todo = sorted({j for j in jobs if j not in _ANALYSIS_CACHE}, key=repr)
    n = workers if workers is not None else (os.cpu_count() or 1)
    n = max(1, min(n, len(todo)))
    if n > 1:
        with ProcessPoolExecutor(max_workers=n) as pool:
            results = list(pool.map(_worker, todo))
        with _LOCK:
            for j, r in zip(todo, results):
                _STATS["misses"] += 1
                _ANALYSIS_CACHE.setdefault(j, r)
    return [analyse_antenna(*j) for j in jobs]


def cache_info() -> dict[str, int]:
    """Hits, misses and size of the analysis cache (and the trim cache size)."""
    with _LOCK:
        return {**_STATS, "size": len(_ANALYSIS_CACHE), "trimmed": len(_TRIM_CACHE)}


def clear_cache() -> None:
    """Forget every cached analysis and trim."""
    with _LOCK:
        _ANALYSIS_CACHE.clear()
        _TRIM_CACHE.clear()
        _STATS.update(hits=0, misses=0)


def station_exposure(analysis: AntennaAnalysis, power_w: float, duty_factor: float) -> dict:
    """Worst-case exposure distances over an antenna's channels [m].

    Uses each channel's peak gain and frequency with
    :func:`planpack.antennas.exposure.exposure_distance_m` and keeps the
    largest distance for each limit.  A far-field estimate only.
    """
    from .exposure import exposure_distance_m

    f_mhz = np.asarray(analysis.freqs_khz) / 1000.0
    gp, occ = exposure_distance_m(power_w, analysis.peak_gain_dbi, duty_factor, f_mhz)
    i_gp, i_occ = int(np.argmax(gp)), int(np.argmax(occ))
    lam = wavelength_m(analysis.freqs_khz[i_gp])
    return {
        "general_public_m": float(gp[i_gp]),
        "occupational_m": float(occ[i_occ]),
        "worst_freq_khz": analysis.freqs_khz[i_gp],
        "peak_gain_dbi": float(analysis.peak_gain_dbi[i_gp]),
        "within_near_field": bool(gp[i_gp] < lam / (2 * math.pi)),
        "basis": ("far-field estimate to the 47 CFR 1.1310 Table 1 limits from power, peak "
                  "gain and duty factor; it defers to local rules and a proper evaluation"),
    }


def isotropic_default_gain_dbi(kind: str) -> float:
    """Gain [dBi] to use for a kind when no NEC solution is available.

    Stated defaults (common practice, no source): 0 dBi for the horizontal
    wire antennas at NVIS angles, -5 dBi for the folded-terminated (about
    half the power goes into its resistor) and -10 dBi for a whip (ground
    and tuner loss, and little radiation straight up).
    """
    defaults = {"dipole": 0.0, "inverted-v": 0.0, "dipole-reflector": 0.0,
                "folded-terminated": -5.0, "whip": -10.0}
    if kind not in defaults:
        raise AntennaInputError("kind", "one of " + ", ".join(defaults), kind)
    return defaults[kind]
