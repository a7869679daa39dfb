"""The one place that talks to NEC-2 (nec2++ through PyNEC 2.3.4).

NEC does the electromagnetics; this module only turns a :class:`Model`, a
ground and a frequency list into feed impedances and far-field gains.  One
NEC context is built per call and solves every frequency in it; what NEC
returns is kept on disk (:mod:`planpack.antennas.solvecache`), so the same
model, ground and frequencies are never solved twice.

PyNEC details that matter here: ``fr_card`` takes MHz (despite its argument
name), and over ground the pattern is floored at -999.99 dB at and below the
horizon.
"""

from __future__ import annotations

import numpy as np
from PyNEC import nec_context

from . import solvecache
from .geometry import Model
from .ground import nec_ground_args, vertical_reflection

COPPER_S_PER_M = 5.8e7
# Pattern grid: theta (from zenith) 0..90 deg in 1 deg steps, phi 0..90 deg in
# 15 deg steps.  Every model here is symmetric about the xz and yz planes, so
# one quadrant of azimuth stands for the whole circle.
N_THETA = 91
PHI_STEP_DEG = 15.0
N_PHI = 7
NEC_FLOOR_DB = -999.0


class AntennaSolveError(RuntimeError):
    """NEC could not solve a model (reported with the model and frequency)."""


def _context(model: Model, ground_type: int, eps_r: float, sigma: float, lossless: bool) -> nec_context:
    ctx = nec_context()
    geo = ctx.get_geometry()
    for w in model.wires:
        geo.wire(w.tag, w.segments, *w.start, *w.end, w.radius_m, 1.0, 1.0)
    # GE card: flag 1 when a wire touches the ground plane (the whip), else 0.
    touches = ground_type != -1 and model.lowest_z_m() <= 1e-9
    ctx.geometry_complete(1 if touches else 0)
    if not lossless:
        ctx.ld_card(5, 0, 0, 0, COPPER_S_PER_M, 0.0, 0.0)  # LD 5: copper wire loss, all wires
    for tag, seg, r in model.loads:
        ctx.ld_card(4, tag, seg, seg, r, 0.0, 0.0)        # LD type 4: Z = R + j0
    ctx.gn_card(ground_type, 0, eps_r, sigma, 0.0, 0.0, 0.0, 0.0)
    ctx.ex_card(0, model.feed[0], model.feed[1], 0, 1.0, 0.0, 0.0, 0.0, 0.0, 0.0)
    return ctx


def describe(model: Model, ground_type: int, eps_r: float, sigma: float, lossless: bool,
             freqs_khz: tuple[float, ...], pattern: bool) -> str:
    """Everything NEC is given for a solve, as text (the disk cache's key; floats exactly, by repr)."""
    wires = ";".join(f"{w.tag},{w.segments},{w.start!r},{w.end!r},{w.radius_m!r}" for w in model.wires)
    return (f"wires {wires}\nfeed {model.feed!r}\nloads {model.loads!r}\n"
            f"ground {ground_type},{eps_r!r},{sigma!r}\nlossless {lossless}\n"
            f"freqs {tuple(float(f) for f in freqs_khz)!r}\npattern {pattern} {N_THETA} {N_PHI} {PHI_STEP_DEG!r}\n")


def _nec(model: Model, ground_type: int, eps_r: float, sigma: float, lossless: bool,
         freqs_khz: tuple[float, ...], pattern: bool) -> tuple[np.ndarray, np.ndarray | None]:
    """Run NEC, or answer from the disk cache (:mod:`planpack.antennas.solvecache`)."""
    entry = solvecache.key(describe(model, ground_type, eps_r, sigma, lossless, freqs_khz, pattern))
    try:
        hit = solvecache.load(entry, len(freqs_khz), (N_THETA, N_PHI) if pattern else None)
    except Exception:  # a cache that cannot be read only costs time
        hit = None
    if hit is not None:
        return hit
    ctx = _context(model, ground_type, eps_r, sigma, lossless)
    for f in freqs_khz:
        ctx.fr_card(0, 1, f / 1000.0, 0.0)  # PyNEC's FR card takes MHz
        if pattern:
            # RP: normal mode, 91 x 7 points, total gain, from theta 0 phi 0.
            ctx.rp_card(0, N_THETA, N_PHI, 0, 5, 0, 0, 0.0, 0.0, 1.0, PHI_STEP_DEG,
                        0.0, 0.0)
        else:
            ctx.xq_card(0)
    z = np.array([complex(ctx.get_impedance_real(i), ctx.get_impedance_imag(i))
                  for i in range(len(freqs_khz))])
    gains = None
    if pattern:
        gains = np.stack([np.asarray(ctx.get_radiation_pattern(i).get_gain(), float)
                          for i in range(len(freqs_khz))])
    if np.all(np.isfinite(z)) and (gains is None or np.all(np.isfinite(gains))):
        try:
            solvecache.store(entry, z, gains)
        except Exception:  # nor one that cannot be written
            pass
    return z, gains


def solve(model: Model, soil: str, freqs_khz: tuple[float, ...], pattern: bool = True,
          bonded_vertical: bool = False, lossless: bool = False
          ) -> tuple[np.ndarray, np.ndarray | None]:
    """Feed impedance and far-field gain of a model at each frequency.

    Parameters
    ----------
    model : Model
        Wires, feed and loads [m, ohm].
    soil : str
        A P.527 soil name, 'perfect' or 'free-space'.
    freqs_khz : tuple of float
        Frequencies [kHz].
    pattern : bool
        Also compute the radiation pattern.
    bonded_vertical : bool
        The model is a vertical bonded to the ground at its base (the whip).
        NEC-2 can model neither stakes nor radials in the soil, and its
        reflection-coefficient ground is not valid for a wire touching the
        ground; so over a real soil the currents and feed impedance are
        solved over a perfect ground and the far field is then weighted by
        |1 + R_v(elevation)|^2 / 4, the plane-wave reflection of the soil for
        vertical polarisation (see :func:`planpack.antennas.ground.vertical_reflection`).
        The image of a short vertical coincides with it, so the weighting is
        exact for a short whip and an approximation for one longer than
        about a quarter wave.  The soil loss near the base is left to the
        ground-system loss model.
    lossless : bool
        Perfectly conducting wires (for reference checks); otherwise copper.

    Returns
    -------
    z_ohm : complex array (n,)
        Feed-point impedance [ohm].
    gain_dbi : array (n, 91, 7) or None
        Total power gain [dBi] at theta = 0..90 deg (from zenith, step 1)
        and phi = 0..90 deg (step 15), relative to the power accepted at the
        feed; NEC's -999.99 dB floor is left as it is.
    """
    try:
        ground_type, eps_r, sigma = nec_ground_args(soil)
        real_soil = ground_type == 2
        if bonded_vertical and real_soil:
            ground_type = 1  # currents over a perfect bond; the soil enters below
        z, gains = _nec(model, ground_type, eps_r, sigma, lossless, tuple(freqs_khz), pattern)
        if gains is not None and bonded_vertical and real_soil:
            gains = _soil_weighted(gains, soil, freqs_khz)
    except Exception as exc:  # PyNEC raises bare RuntimeErrors without context
        raise AntennaSolveError(
            f"NEC failed on a {len(model.wires)}-wire model over {soil} at "
            f"{', '.join(f'{f:g}' for f in freqs_khz)} kHz: {exc}") from exc
    if not np.all(np.isfinite(z)):
        raise AntennaSolveError(f"NEC returned a non-finite feed impedance over {soil}")
    return z, gains


def _soil_weighted(gains_db: np.ndarray, soil: str, freqs_khz) -> np.ndarray:
    """Perfect-ground gains of a bonded vertical weighted by |1 + R_v|^2 / 4."""
    _, eps_r, sigma = nec_ground_args(soil)
    elev = np.radians(90.0 - np.arange(N_THETA, dtype=float))  # rows are theta 0..90
    out = np.array(gains_db, float)
    for i, f in enumerate(freqs_khz):
        rv = vertical_reflection(elev, eps_r, sigma, f)
        w_db = 10.0 * np.log10(np.maximum(np.abs(1.0 + rv) ** 2 / 4.0, 1e-30))
        g = out[i]
        out[i] = np.where(g <= NEC_FLOOR_DB, g, np.maximum(g + w_db[:, None], NEC_FLOOR_DB))
    return out
