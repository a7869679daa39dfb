"""Analyse one antenna design over one ground on a set of channels and across the band.

The flow for each (design, ground, frequency set): decide lengths (trim to
resonance with NEC where the kind is cut for a frequency), build the wire
model, solve every assigned channel and every point of the shared band grid
(:mod:`planpack.bandgrid`; the band sweep of :mod:`planpack.antennas.bandsweep`
keeps the Sommerfeld-Norton ground's cost down), then interpret: the losses
from the set to the antenna through the plan's matching (see
:mod:`planpack.antennas.matching`), the elevation pattern, the NVIS height
window, and the warnings a planner needs.

Between solved frequencies, :meth:`AntennaAnalysis.figures_at` interpolates
what varies smoothly (the feed impedance R and X, in log f, and the gain
pattern) and computes the losses at the exact frequency from the
interpolated impedance, never by interpolating losses across a resonance.

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
from concurrent.futures.process import BrokenProcessPool
from dataclasses import dataclass, fields

import numpy as np
from scipy.interpolate import PchipInterpolator

from planpack.bandgrid import grid_khz

from . import geometry, ground as gnd, matching, pattern
from .bandsweep import sweep
from .design import DIPOLE_KINDS, AntennaDesign, AntennaInputError, GroundSpec, check_freqs_khz
from .geometry import Model, wavelength_m
from .layout import Layout, builder, cut_sheet, layout
from .losstext import LOSS_WARN_DB, explain_loss
from .matching import LossChain, loss_chain, match_class, swr_json, swr_text
from .solver import AntennaSolveError, solve
from .trust import physical_mask

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

ENGINE = "NEC-2 (nec2++ through PyNEC 2.3.4)"


# ---------------------------------------------------------------- result


@dataclass(frozen=True)
class BandFigures:
    """An antenna's figures at arbitrary frequencies (interpolated between solved ones).

    freqs_khz : (k,) [kHz]
    impedance_ohm : (k,) complex feed impedance [ohm], interpolated in log f
        (PCHIP of R and X); NaN where it is not physical.
    gain_table_dbi : (k, 91) azimuth-averaged gain [dBi] at elevation
        0..90 deg, relative to the power the antenna accepts; linear in
        log f between solved frequencies.
    losses : LossChain of (k,) arrays, computed at each exact frequency.
    system_gain_table_dbi : (k, 91) ``gain_table_dbi - losses.total_db``:
        gain [dBi] relative to the set's output power.
    """

    freqs_khz: np.ndarray
    impedance_ohm: np.ndarray
    gain_table_dbi: np.ndarray
    losses: LossChain
    system_gain_table_dbi: np.ndarray


@dataclass(frozen=True)
class AntennaAnalysis:
    """Everything computed for one design over one ground on a channel set.

    Per-channel arrays follow the order of ``freqs_khz`` as given.

    Channel figures
    ---------------
    impedance_ohm : (c,) complex
        NEC feed impedance [ohm].
    swr : (c,)
        SWR of the antenna on the feedline's Z0, through the balun [-]
        (finite, uncapped; see :func:`planpack.antennas.matching.swr_text`).
    swr_class : (c,) str
        'fine' (up to 2:1), 'tuner' (the plan's matching device matches it
        fully), 'poor' (beyond its range; with no device, above 3:1).
    mismatch_loss_db : (c,)
        Mismatch loss of the bare antenna on the feedline [dB], as if nothing
        matched it (for the SWR table; the budget uses ``losses``); NaN where
        NEC's solution is not physical (plan.json: UNUSABLE_LOSS_DB there,
        and ``swr`` at its cap with ``swr_text`` "not solved").
    feedline_loss_db : (c,)
        Matched feedline loss [dB].
    losses : LossChain of (c,) arrays
        The loss from the set's output to the antenna through the plan's
        matching, and its breakdown [dB] (foldback, set mismatch, matching
        network, feedline with its SWR, ground system).
    system_loss_db : (c,)
        ``losses.total_db`` [dB]; UNUSABLE_LOSS_DB where NEC's solution is
        not physical.

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

    Across the band
    ---------------
    solved_khz : (n,)
        Every frequency solved [kHz], ascending: the band grid, the channels
        and the reference frequency.
    solved_impedance_ohm : (n,) complex, as NEC gives it; solved_trusted : (n,) bool, False where
        it is not physical (:func:`physical_mask`); solved_gain_table_dbi : (n, 91)
    grid_khz : (g,)
        The shared band grid (:data:`planpack.bandgrid.GRID_KHZ`) [kHz].
    grid_losses : LossChain of (g,) arrays
    grid_gain_table_dbi, grid_system_gain_table_dbi : (g, 91) [dBi]
    grid_peak_gain_dbi, grid_zenith_gain_dbi : (g,) [dBi]
    """

    design: AntennaDesign
    ground: GroundSpec
    freqs_khz: tuple[float, ...]
    reference_freq_khz: float
    height_wavelengths: float
    cut: dict
    transformer_ratio: float
    ground_ohm: float
    impedance_ohm: np.ndarray
    swr: np.ndarray
    swr_class: tuple[str, ...]
    mismatch_loss_db: np.ndarray
    feedline_loss_db: np.ndarray
    losses: LossChain
    system_loss_db: np.ndarray
    peak_gain_dbi: np.ndarray
    zenith_gain_dbi: np.ndarray
    fraction_above_60deg: np.ndarray
    gain_table_dbi: np.ndarray
    system_gain_table_dbi: np.ndarray
    solved_khz: np.ndarray
    solved_impedance_ohm: np.ndarray
    solved_trusted: np.ndarray
    solved_gain_table_dbi: np.ndarray
    grid_khz: np.ndarray
    grid_losses: LossChain
    grid_gain_table_dbi: np.ndarray
    grid_system_gain_table_dbi: np.ndarray
    grid_peak_gain_dbi: np.ndarray
    grid_zenith_gain_dbi: np.ndarray
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
    def matching(self) -> str:
        return self.design.matching

    @property
    def elevation_deg(self) -> np.ndarray:
        return pattern.ELEVATION_DEG

    # the loss breakdown per channel [dB], for callers that want one figure
    @property
    def feedline_loss_with_swr_db(self) -> np.ndarray:
        return self.losses.feedline_loss_db

    @property
    def network_loss_db(self) -> np.ndarray:
        return self.losses.network_loss_db

    @property
    def ground_loss_db(self) -> np.ndarray:
        return self.losses.ground_loss_db

    @property
    def matched(self) -> np.ndarray:
        """(c,) bool: the plan's matching device matches the antenna fully on the channel."""
        return self.losses.within_range

    def chain(self, z_ohm, freqs_khz) -> LossChain:
        """The loss chain of this antenna's matching and feedline for impedances at frequencies."""
        return _chain(self.design, self.transformer_ratio, self.ground_ohm, z_ohm, freqs_khz)

    def figures_at(self, freqs_khz) -> BandFigures:
        """Feed impedance, gain and losses at any frequencies within the solved range.

        Parameters
        ----------
        freqs_khz : array (k,)
            Frequencies [kHz] between ``solved_khz[0]`` and ``solved_khz[-1]``
            (the band grid covers 1500-30000 kHz).

        Returns
        -------
        BandFigures
            Exact at solved frequencies.  Between them R and X are
            interpolated by PCHIP in log f (no overshoot) and the gain table
            linearly in log f; the losses are computed at the exact
            frequency.  Where either neighbouring solution is not physical
            the antenna counts as unusable there.

        Raises
        ------
        AntennaInputError
            A frequency outside the solved range.
        """
        f = np.atleast_1d(np.asarray(freqs_khz, float))
        s = self.solved_khz
        lo, hi = float(s[0]), float(s[-1])
        bad = ~np.isfinite(f) | (f < lo * (1 - 1e-9)) | (f > hi * (1 + 1e-9))
        if np.any(bad):
            raise AntennaInputError("freqs_khz", f"frequencies between {lo:g} and {hi:g} kHz, where the "
                                    "antenna was solved", float(f[bad][0]))
        ls = np.log(s)
        lf = np.clip(np.log(np.clip(f, lo, hi)), ls[0], ls[-1])
        j = np.clip(np.searchsorted(ls, lf, side="left"), 1, len(s) - 1)
        i = j - 1
        w = np.clip((lf - ls[i]) / (ls[j] - ls[i]), 0.0, 1.0)
        g = self.solved_gain_table_dbi
        gain = (1.0 - w)[:, None] * g[i] + w[:, None] * g[j]
        zs = self.solved_impedance_ohm
        r = PchipInterpolator(ls, zs.real)(lf)
        x = PchipInterpolator(ls, zs.imag)(lf)
        ok = self.solved_trusted
        eps = 1e-12
        usable = np.where(w <= eps, ok[i], np.where(w >= 1 - eps, ok[j], ok[i] & ok[j]))
        z = np.where(usable & (r > 0), r + 1j * x, np.nan + 0j)
        losses = self.chain(z, f)
        return BandFigures(f, z, gain, losses, gain - losses.total_db[:, None])

    def to_dict(self, channel_names: Sequence[str | None] | None = None) -> dict:
        """Plain JSON-ready data for ``plan.json`` ``antennas[]`` (without the
        ``id``, ``stations`` and ``exposure`` keys the compiler adds).

        Each channel carries its loss from the set to the antenna and its
        breakdown (``foldback_db``, ``set_mismatch_db``, ``network_loss_db``,
        ``feedline_loss_with_swr_db``, ``ground_loss_db``; they add up to
        ``system_loss_db``), the SWR as a capped number and as text
        (``swr_text``, "> 50:1" beyond 50:1), the SWR the set sees, and a
        sentence on what is lost and why (``loss_note``).  ``matching``
        describes the matching device and its model; ``band`` gives the
        figures on the shared band grid.

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
        L = self.losses
        channels = []
        for i, f in enumerate(self.freqs_khz):
            z = self.impedance_ohm[i]
            channels.append({
                "channel": names[i],
                "freq_khz": _r(f, 3),
                "impedance_ohm": [_r(z.real, 1), _r(z.imag, 1)],
                # renderers print swr_text; where NEC gave no physical solution the number is the cap
                "swr": swr_json(self.swr[i]) if L.usable[i] else matching.SWR_TEXT_CAP,
                "swr_text": swr_text(self.swr[i]),
                "swr_class": self.swr_class[i],
                "swr_at_set": swr_json(L.swr_set[i]),
                "swr_at_set_text": swr_text(L.swr_set[i]),
                "matched": bool(L.within_range[i]),
                "usable": bool(L.usable[i]),
                "mismatch_loss_db": _r(self.mismatch_loss_db[i], 2) if L.usable[i] else matching.UNUSABLE_LOSS_DB,
                "feedline_loss_db": _r(self.feedline_loss_db[i], 2),
                "feedline_loss_with_swr_db": _r(L.feedline_loss_db[i], 2),
                "foldback_db": _r(L.foldback_db[i], 2),
                "set_mismatch_db": _r(L.set_mismatch_db[i], 2),
                "network_loss_db": _r(L.network_loss_db[i], 2),
                "ground_loss_db": _r(L.ground_loss_db[i], 2),
                "system_loss_db": _r(self.system_loss_db[i], 2),
                "loss_note": self.loss_note(i),
                "height_wavelengths": _r(self.design.height_m / wavelength_m(f), 3),
                "pattern": {
                    "peak_gain_dbi": _r(self.peak_gain_dbi[i], 2),
                    "zenith_gain_dbi": _r(self.zenith_gain_dbi[i], 2),
                    "fraction_above_60deg": _r(self.fraction_above_60deg[i], 3),
                },
                "elevation_gain_dbi": [_r(g, 2) for g in self.gain_table_dbi[i]],
            })
        warnings = []
        for w in self.warnings:
            w = dict(w)
            if "freq_khz" in w:
                w["channel"] = by_freq.get(w["freq_khz"])
            if "freqs_khz" in w:
                w["channels"] = [by_freq.get(f) for f in w["freqs_khz"]]
            warnings.append(w)
        G = self.grid_losses
        return {
            "kind": self.design.kind,
            "design_khz": self.design.design_khz,
            "reference_freq_khz": _r(self.reference_freq_khz, 3),
            "height_m": self.design.height_m,
            "cut": _round_tree(self.cut),
            "matching": self._matching_dict(),
            "channels": channels,
            "band": {
                "freq_khz": [_r(f, 3) for f in self.grid_khz],
                "impedance_ohm": [[_r(z.real, 1), _r(z.imag, 1)] for z in self.grid_impedance_ohm],
                "swr": [swr_json(s) for s in G.swr_feed],
                "system_loss_db": [_r(x, 2) for x in G.total_db],
                "peak_gain_dbi": [_r(x, 2) for x in self.grid_peak_gain_dbi],
                "zenith_gain_dbi": [_r(x, 2) for x in self.grid_zenith_gain_dbi],
                "usable": [bool(u) for u in G.usable],
            },
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

    @property
    def grid_impedance_ohm(self) -> np.ndarray:
        """(g,) NEC feed impedance on the band grid [ohm]."""
        idx = np.searchsorted(self.solved_khz, self.grid_khz)
        return self.solved_impedance_ohm[idx]

    def loss_note(self, i: int) -> str:
        """A sentence on what is lost between the set and the antenna on channel ``i``, and why."""
        return explain_loss(self.losses, i, freq_khz=self.freqs_khz[i], kind=self.kind, matching=self.matching,
                            z_ant_ohm=complex(self.impedance_ohm[i]), ground_ohm=self.ground_ohm,
                            coil_q=self.design.matching_coil_q, ratio=self.transformer_ratio)

    def _matching_dict(self) -> dict:
        dev = matching.DEVICES[self.matching]
        return {
            "kind": dev.key,
            "place": dev.place,
            "max_swr": dev.max_swr,
            "max_impedance_ohm": dev.max_impedance_ohm,
            "coil_q": self.design.matching_coil_q,
            "capacitor_q": matching.DEFAULT_CAPACITOR_Q,
            "foldback_knee_swr": matching.FOLDBACK_KNEE_SWR,
            "feedline_velocity_factor": self.design.feed_velocity_factor,
            "description": dev.description,
            "basis": MATCHING_BASIS,
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


MATCHING_BASIS = (
    "Loss from the set's output to the antenna: the set reduces its power when the SWR it sees is above "
    f"{matching.FOLDBACK_KNEE_SWR:g}:1 (it holds the reflected power at that of {matching.FOLDBACK_KNEE_SWR:g}:1; "
    "common practice, no source) and loses the mismatch that is left; the tuner or coupler is an L-network of "
    "a series coil and a shunt capacitor with their unloaded Q, tuned for the match; beyond its range it leaves "
    "a residual SWR that grows with the load's; the feedline loses its matched loss, more with the SWR on it "
    "(ARRL Antenna Book relation) and transforms the impedance (telegrapher's equation); a whip's ground system "
    "takes its share at the base.  Ranges and Q are typical figures (common practice, no source)."
)


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


# ---------------------------------------------------------------- analysis


_ANALYSIS_CACHE: dict[tuple, AntennaAnalysis] = {}
_STATS = {"hits": 0, "misses": 0}
_LOCK = threading.Lock()


def _readonly(a: np.ndarray) -> np.ndarray:
    a = np.array(a)
    a.flags.writeable = False
    return a


def _readonly_chain(c: LossChain) -> LossChain:
    return LossChain(**{f.name: _readonly(getattr(c, f.name)) for f in fields(LossChain)})


def _chain(d: AntennaDesign, ratio: float, ground_ohm: float, z_ohm, freqs_khz) -> LossChain:
    return loss_chain(z_ohm, freqs_khz, matching=d.matching, ratio=ratio, z0_ohm=d.feed_z0_ohm,
                      line_length_m=d.feed_length_m, line_db_per_100m_at_10mhz=d.feed_loss_db_per_100m_at_10mhz,
                      velocity_factor=d.feed_velocity_factor, ground_ohm=ground_ohm,
                      coil_q=d.matching_coil_q)


#: Around a parasitic wire's free-space resonance f_r, the band [f_r / 1.25, 1.05 f_r] where a soil's
#: loading moves what the wire adds (measured here: a reflector 2 m up over medium-dry soil, whose
#: gain straight up NEC's two grounds put up to 1 dB apart at 0.93 f_r).
PARASITIC_BAND = (1.0 / 1.25, 1.05)


def _parasitic_bands(d: AntennaDesign, ref_khz: float) -> tuple[tuple[float, float], ...]:
    """Bands [kHz] to solve with Sommerfeld-Norton throughout (see :func:`planpack.antennas.bandsweep.sweep`)."""
    if d.kind != "dipole-reflector":
        return ()
    f_r = ref_khz / (1.0 + d.reflector_longer)  # the reflector is this much longer than the resonant dipole
    return ((PARASITIC_BAND[0] * f_r, PARASITIC_BAND[1] * f_r),)


def _reference_freq_khz(d: AntennaDesign, freqs: tuple[float, ...]) -> float:
    return d.design_khz if d.design_khz is not None else min(freqs)


def solved_model(design: AntennaDesign, ground: GroundSpec, freqs_khz: tuple[float, ...]) -> Model:
    """The wire model NEC solves for a design over a ground on a channel set (trimmed, segmented
    for the highest frequency solved)."""
    lay = layout(design, ground)
    build = builder(design, _segment_m(design, freqs_khz), lay.radius_m, lay.apex_deg, lay.spacing_m,
                    lay.resistor_ohm, lay.reflector_height_m)
    return build(lay.total_m)


def _segment_m(design: AntennaDesign, freqs_khz: tuple[float, ...]) -> float:
    ref = _reference_freq_khz(design, freqs_khz)
    return geometry.segment_length_m(design.design_khz, max(max(freqs_khz), ref), band_top_khz=grid_khz()[-1])


def _analyse_uncached(design: AntennaDesign, ground: GroundSpec,
                      freqs: tuple[float, ...]) -> AntennaAnalysis:
    d = design
    lay: Layout = layout(d, ground)
    ref = _reference_freq_khz(d, freqs)
    band = grid_khz()
    model = solved_model(d, ground, freqs)
    swept = sweep(model, ground.soil, tuple(freqs) + (ref,), band, bonded_vertical=d.kind == "whip",
                  dense_khz=_parasitic_bands(d, ref))
    solve_set, z_all, g_all = swept.freqs_khz, swept.impedance_ohm, swept.gain_dbi
    trusted = physical_mask(z_all)
    z_use = np.where(trusted, z_all, np.nan + 0j)  # an untrusted solution makes the antenna unusable there
    idx = [solve_set.index(f) for f in freqs]
    gidx = [solve_set.index(f) for f in band]
    ridx = solve_set.index(ref)
    summ = pattern.summary(g_all)
    z = z_all[idx]
    f = np.asarray(freqs, float)
    ground_ohm = gnd.ground_loss_ohm(ground.soil, ground.system) if d.kind == "whip" else 0.0

    # Feed-point match and losses, on the channels and across the band.
    chain = _chain(d, lay.ratio, ground_ohm, z_use[idx], f)
    grid_chain = _chain(d, lay.ratio, ground_ohm, z_use[gidx], np.asarray(band))
    gamma = matching.reflection(z, d.feed_z0_ohm, lay.ratio)
    swr = np.where(chain.usable, matching.swr(gamma), np.nan)
    mismatch = np.where(chain.usable, matching.mismatch_loss_db(gamma), np.nan)
    matched_db = matching.matched_line_loss_db(f, d.feed_length_m, d.feed_loss_db_per_100m_at_10mhz)
    classes = tuple(match_class(float(s), bool(m), d.matching) for s, m in zip(swr, chain.within_range))
    system_loss = chain.total_db

    table = summ["table_dbi"][idx]
    sys_table = table - system_loss[:, None]
    grid_table = summ["table_dbi"][gidx]

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
        if not chain.usable[i]:  # NEC-2's thin-wire model fails for wires very near the ground far below resonance
            warnings.append({
                "code": "solver-unreliable",
                "severity": "warning",
                "freq_khz": fk,
                "message": (f"NEC-2 gives a non-physical feed resistance ({z[i].real:.1f} ohm) at {fk:g} kHz, "
                            "so the figures for this channel are not to be trusted and the link budget counts "
                            "the antenna as unusable there; wire ends near the ground far below resonance are "
                            "the usual cause."),
            })
    if applies and not inside:
        warnings.append({
            "code": "outside-nvis-window",
            "severity": "warning",
            "message": (f"Hung at {d.height_m:g} m, {h_wl:.2f} wavelength at {ref:g} kHz, the antenna is "
                        f"outside the usual NVIS window of {lo:g}-{hi:g} wavelength "
                        f"({lo * lam_ref:.1f}-{hi * lam_ref:.1f} m)."),
        })
    high = [i for i in range(len(freqs)) if chain.usable[i] and system_loss[i] > LOSS_WARN_DB]
    if high:
        worst = max(high, key=lambda i: system_loss[i])
        at = ", ".join(f"{freqs[i]:g}" for i in high)
        warnings.append({
            "code": "loss-high",
            "severity": "warning",
            "freqs_khz": [freqs[i] for i in high],
            "system_loss_db": [float(system_loss[i]) for i in high],
            "message": (f"More than {LOSS_WARN_DB:g} dB of the set's power is lost before this antenna at "
                        f"{at} kHz. " + explain_loss(chain, worst, freq_khz=freqs[worst], kind=d.kind,
                                                      matching=d.matching, z_ant_ohm=complex(z[worst]),
                                                      ground_ohm=ground_ohm, coil_q=d.matching_coil_q,
                                                      ratio=lay.ratio)),
        })

    reflector = None
    if d.kind == "dipole-reflector":
        bare = geometry.dipole(lay.total_m, d.height_m, lay.radius_m, _segment_m(d, freqs))
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
            "ground_loss_ohm": ground_ohm,
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
            if d.kind == "whip" else (
                f"Sommerfeld-Norton (NEC GN 2) at {int(swept.sommerfeld.sum())} of {len(solve_set)} "
                "frequencies (every channel among them); between those, the reflection-coefficient "
                "ground (GN 0) corrected by the difference Sommerfeld-Norton shows there")),
        "segments": model.segment_count,
        "wires": len(model.wires),
        "wire_loss": "copper, 5.8e7 S/m",
        "pattern_grid": "elevation 0-90 deg step 1, azimuth 0-90 deg step 15 (symmetric)" + (
            "" if d.kind == "whip" or ground.soil in ("perfect", "free-space") else
            " on the channels; at the other frequencies NEC gives elevation step 2 and azimuth step 30, "
            "and the power is interpolated onto that grid"),
        "frequencies_solved": len(solve_set),
        "band_grid": (f"{len(band)} log-spaced points {band[0]:g}-{band[-1]:g} kHz; between solved "
                      "frequencies R and X are interpolated in log f and losses computed at the exact frequency"),
        "trim_solves": lay.trim.solves if lay.trim is not None else 0,
    }

    return AntennaAnalysis(
        design=d, ground=ground, freqs_khz=freqs, reference_freq_khz=ref,
        height_wavelengths=h_wl, cut=cut_sheet(d, lay), transformer_ratio=lay.ratio, ground_ohm=ground_ohm,
        impedance_ohm=_readonly(z), swr=_readonly(swr), swr_class=classes,
        mismatch_loss_db=_readonly(mismatch), feedline_loss_db=_readonly(matched_db),
        losses=_readonly_chain(chain), system_loss_db=_readonly(system_loss),
        peak_gain_dbi=_readonly(summ["peak_gain_dbi"][idx]),
        zenith_gain_dbi=_readonly(summ["zenith_gain_dbi"][idx]),
        fraction_above_60deg=_readonly(summ["fraction_above_60deg"][idx]),
        gain_table_dbi=_readonly(table), system_gain_table_dbi=_readonly(sys_table),
        solved_khz=_readonly(np.asarray(solve_set, float)), solved_impedance_ohm=_readonly(z_all),
        solved_trusted=_readonly(trusted),
        solved_gain_table_dbi=_readonly(summ["table_dbi"]),
        grid_khz=_readonly(np.asarray(band, float)), grid_losses=_readonly_chain(grid_chain),
        grid_gain_table_dbi=_readonly(grid_table),
        grid_system_gain_table_dbi=_readonly(grid_table - grid_chain.total_db[:, None]),
        grid_peak_gain_dbi=_readonly(summ["peak_gain_dbi"][gidx]),
        grid_zenith_gain_dbi=_readonly(summ["zenith_gain_dbi"][gidx]),
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
    """Cut sheet, losses and elevation pattern of one antenna on its channels and across the band.

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
    """Solve one job; errors come back as values, so that they cross the process boundary intact."""
    try:
        return _analyse_uncached(*job)
    except (AntennaInputError, AntennaSolveError) as exc:
        return exc
    except Exception as exc:  # anything else NEC or numpy raises: a picklable error naming it
        return AntennaSolveError(f"the antenna solver failed ({type(exc).__name__}: {exc})")


def _wire_estimate_m(d: AntennaDesign) -> float:
    """Rough total wire of a design [m], before any solve: NEC's work grows with it."""
    if d.kind == "whip":
        return 0.0  # over a perfect ground: no Sommerfeld tables, a few segments
    half_wave = 150_000.0 / d.design_khz if d.design_khz else 0.0
    if d.kind == "folded-terminated":
        return 2.0 * (d.length_m or 27.0)
    return half_wave * (2.0 if d.kind == "dipole-reflector" else 1.0)


def _largest_first(job) -> tuple[float, str]:
    """Solve order: the biggest models first, so that worker processes finish together; ties by repr."""
    return (-_wire_estimate_m(job[0]), repr(job))


def _describe(job) -> str:
    d, g, _ = job
    what = f"{d.kind} cut for {d.design_khz:g} kHz" if d.design_khz is not None else d.kind
    return f"a {what} at {d.height_m:g} m over {g.soil} ground"


def _solve_alone(job):
    """One job in a fresh process of its own, so that a crash is pinned on it."""
    try:
        with ProcessPoolExecutor(max_workers=1) as pool:
            return pool.submit(_worker, job).result()
    except BrokenProcessPool:
        return AntennaSolveError(f"the NEC solver process stopped while solving {_describe(job)} "
                                 "(it crashed or ran out of memory)")


def _solve_in_processes(todo: list, n: int) -> dict:
    """Solve jobs in ``n`` worker processes; a job whose worker dies is re-solved alone to find the culprit."""
    out: dict = {}
    try:
        with ProcessPoolExecutor(max_workers=n) as pool:
            futures = [(j, pool.submit(_worker, j)) for j in todo]
            for j, fut in futures:
                try:
                    out[j] = fut.result()
                except BrokenProcessPool:
                    pass
    except BrokenProcessPool:
        pass
    for j in todo:
        if j not in out:
            out[j] = _solve_alone(j)
    return out


def analyse_antennas(jobs: Iterable[tuple[AntennaDesign, GroundSpec, Sequence[float]]],
                     workers: int | None = None, *, isolate: bool = False,
                     return_exceptions: bool = False) -> list:
    """Analyse many (design, ground, freqs_khz) jobs; same results as
    :func:`analyse_antenna`, in the order given.

    Distinct uncached jobs are solved once each, in ``workers`` processes
    (default: the CPU count; 1 solves in this process unless ``isolate``).
    Results enter the same cache.  A worker process that dies (a crash in
    NEC) does not take the others with it: the jobs it left are re-solved
    one by one in fresh processes, and the one that crashes again gets an
    :class:`AntennaSolveError` naming it.

    Parameters
    ----------
    isolate : bool
        Solve in worker processes even when one would do, so that a crash
        in NEC can never end the calling process.
    return_exceptions : bool
        Give a job that fails its AntennaInputError or AntennaSolveError in
        its place in the result list, instead of raising the first.
    """
    checked: list = []
    for d, g, f in jobs:
        try:
            checked.append((d, g, _check(d, g, f)))
        except AntennaInputError as exc:
            if not return_exceptions:
                raise
            checked.append(exc)
    valid = [j for j in checked if not isinstance(j, Exception)]
    with _LOCK:
        todo = sorted({j for j in valid if j not in _ANALYSIS_CACHE}, key=_largest_first)
    n = workers if workers is not None else (os.cpu_count() or 1)
    n = max(1, min(n, len(todo)))
    if todo and (n > 1 or isolate):
        solved = _solve_in_processes(todo, n)
    else:
        solved = {j: _worker(j) for j in todo}
    failed: dict = {}
    with _LOCK:
        for j in todo:
            r = solved[j]
            if isinstance(r, Exception):
                failed[j] = r
            else:
                _STATS["misses"] += 1
                _ANALYSIS_CACHE.setdefault(j, r)
    out: list = []
    for j in checked:
        if isinstance(j, Exception):
            out.append(j)
        elif j in failed:
            if not return_exceptions:
                raise failed[j]
            out.append(failed[j])
        else:
            out.append(analyse_antenna(*j))
    return out


def cache_info() -> dict[str, int]:
    """Hits, misses and size of the analysis cache (and the trim cache size)."""
    from .layout import _TRIM_CACHE

    with _LOCK:
        return {**_STATS, "size": len(_ANALYSIS_CACHE), "trimmed": len(_TRIM_CACHE)}


def clear_cache() -> None:
    """Forget every cached analysis and trim, and the NEC solutions kept on disk: the next solve is cold."""
    from . import solvecache
    from .layout import _TRIM_CACHE

    with _LOCK:
        _ANALYSIS_CACHE.clear()
        _TRIM_CACHE.clear()
        _STATS.update(hits=0, misses=0)
    solvecache.clear()


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
