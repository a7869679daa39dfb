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
# A coarse pattern (theta step 2 deg, phi step 30 deg: 46 x 4 points, a third of the work) for
# the band sweep's reflection-coefficient solves, whose gains it corrects at Sommerfeld anchors
# (planpack.antennas.bandsweep); expanded to the full grid by interpolating power linearly.
COARSE_THETA_STEP_DEG = 2.0
COARSE_N_THETA = 46
COARSE_PHI_STEP_DEG = 30.0
COARSE_N_PHI = 4


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


def _pattern_grid(pattern: bool | str) -> tuple[int, int, float, float] | None:
    """(n_theta, n_phi, theta step, phi step) of a pattern request, or None for none."""
    if pattern == "coarse":
        return COARSE_N_THETA, COARSE_N_PHI, COARSE_THETA_STEP_DEG, COARSE_PHI_STEP_DEG
    return (N_THETA, N_PHI, 1.0, PHI_STEP_DEG) if pattern else None


def describe(model: Model, ground_type: int, eps_r: float, sigma: float, lossless: bool,
             freqs_khz: tuple[float, ...], pattern: bool | str) -> str:
    """Everything NEC is given for a solve, as text (the disk cache's key; floats exactly, by repr)."""
    wires = ";".join(f"{w.tag},{w.segments},{w.start!r},{w.end!r},{w.radius_m!r}" for w in model.wires)
    return (f"wires {wires}\nfeed {model.feed!r}\nloads {model.loads!r}\n"
            f"ground {ground_type},{eps_r!r},{sigma!r}\nlossless {lossless}\n"
            f"freqs {tuple(float(f) for f in freqs_khz)!r}\npattern {_pattern_grid(pattern)!r}\n")


def _nec(model: Model, ground_type: int, eps_r: float, sigma: float, lossless: bool,
         freqs_khz: tuple[float, ...], pattern: bool | str) -> tuple[np.ndarray, np.ndarray | None]:
    """Run NEC, or answer from the disk cache (:mod:`planpack.antennas.solvecache`).

    Gains come back as NEC gives them: (n, n_theta, n_phi) of the pattern grid asked for.
    """
    grid = _pattern_grid(pattern)
    entry = solvecache.key(describe(model, ground_type, eps_r, sigma, lossless, freqs_khz, pattern))
    try:
        hit = solvecache.load(entry, len(freqs_khz), grid[:2] if grid else None)
    except Exception:  # a cache that cannot be read only costs time
        hit = None
    if hit is not None:
        return hit
    ctx = _context(model, ground_type, eps_r, sigma, lossless)
    for f in freqs_khz:
        ctx.fr_card(0, 1, f / 1000.0, 0.0)  # PyNEC's FR card takes MHz
        if grid:
            # RP: normal mode, n_theta x n_phi points, total gain, from theta 0 phi 0.
            ctx.rp_card(0, grid[0], grid[1], 0, 5, 0, 0, 0.0, 0.0, grid[2], grid[3], 0.0, 0.0)
        else:
            ctx.xq_card(0)
    z = np.array([complex(ctx.get_impedance_real(i), ctx.get_impedance_imag(i))
                  for i in range(len(freqs_khz))])
    gains = None
    if grid:
        gains = np.stack([np.asarray(ctx.get_radiation_pattern(i).get_gain(), float).reshape(grid[:2])
                          for i in range(len(freqs_khz))])
    if np.all(np.isfinite(z)) and (gains is None or np.all(np.isfinite(gains))):
        try:
            solvecache.store(entry, z, gains)
        except Exception:  # nor one that cannot be written
            pass
    return z, gains


def solve(model: Model, soil: str, freqs_khz: tuple[float, ...], pattern: bool | str = True,
          bonded_vertical: bool = False, lossless: bool = False, reflection_ground: bool = False
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
    pattern : bool or "coarse"
        Also compute the radiation pattern; "coarse" asks NEC for a third
        of the points (:data:`COARSE_N_THETA` x :data:`COARSE_N_PHI`) and
        expands them to the full grid (:func:`expand_coarse`).
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
    reflection_ground : bool
        Over a real soil, use NEC-2's reflection-coefficient ground (GN 0)
        instead of Sommerfeld-Norton (GN 2): far cheaper, but blind to the
        wires' near-field coupling to the soil (see
        :mod:`planpack.antennas.bandsweep`, which corrects it).

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
        elif reflection_ground and real_soil:
            ground_type = 0
        z, gains = _nec(model, ground_type, eps_r, sigma, lossless, tuple(freqs_khz), pattern)
        if gains is not None and pattern == "coarse":
            gains = expand_coarse(gains)
        if gains is not None and bonded_vertical and real_soil:
            gains = _soil_weighted(gains, soil, freqs_khz)
    except Exception as exc:  # PyNEC raises bare RuntimeErrors without context
        raise AntennaSolveError(
            f"NEC failed on a {len(model.wires)}-wire model over {soil} at "
            f"{', '.join(f'{f:g}' for f in freqs_khz)} kHz: {exc}") from exc
    if not np.all(np.isfinite(z)):
        raise AntennaSolveError(f"NEC returned a non-finite feed impedance over {soil}")
    return z, gains


def expand_coarse(gains_db: np.ndarray) -> np.ndarray:
    """Coarse-pattern gains (n, 46, 4) [dBi] on the full grid (n, 91, 7) [dBi].

    Power (not dB) is interpolated linearly between neighbouring points, in
    phi first and then in theta, so that a null or NEC's floor at the
    horizon pulls its neighbours down no further than its share; a point
    whose interpolated power is zero keeps NEC's floor.
    """
    g = np.asarray(gains_db, float)
    lin = np.where(g <= NEC_FLOOR_DB, 0.0, 10.0 ** (g / 10.0))
    phi_c = np.arange(COARSE_N_PHI) * COARSE_PHI_STEP_DEG
    phi = np.arange(N_PHI) * PHI_STEP_DEG
    w = np.interp(phi, phi_c, np.arange(COARSE_N_PHI, dtype=float))
    lo = np.minimum(np.floor(w).astype(int), COARSE_N_PHI - 2)
    lin = lin[..., lo] * (1.0 - (w - lo)) + lin[..., lo + 1] * (w - lo)
    theta_c = np.arange(COARSE_N_THETA) * COARSE_THETA_STEP_DEG
    w = np.interp(np.arange(N_THETA, dtype=float), theta_c, np.arange(COARSE_N_THETA, dtype=float))
    lo = np.minimum(np.floor(w).astype(int), COARSE_N_THETA - 2)
    f = (w - lo)[:, None]
    lin = lin[..., lo, :] * (1.0 - f) + lin[..., lo + 1, :] * f
    return np.where(lin > 0.0, 10.0 * np.log10(np.maximum(lin, 1e-300)), NEC_FLOOR_DB)


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
