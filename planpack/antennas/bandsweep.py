"""Solve an antenna over a real soil at many frequencies for a fraction of NEC's cost.

NEC-2's Sommerfeld-Norton ground (GN 2) is what makes a low wire's feed
resistance and gain right: it carries the near-field coupling of the wires
to a lossy soil.  nec2++ spends about 25 ms a frequency building its
Sommerfeld tables, whatever the antenna, and every antenna is solved on the
band grid's 41 points beside its channels.  NEC-2's reflection-coefficient
ground (GN 0) costs about a millisecond a frequency, but misses that
coupling: measured here, a half-wave dipole 0.1 wavelength over medium-dry
soil has 0.7 dB too much gain on it, and 0.2 wavelength up the two agree to
0.05 dB.

Across the band the two grounds share what varies fast (the antenna's own
resonances); what differs between them (the soil's near-field coupling)
varies slowly with frequency.  So a sweep:

1. solves the reflection-coefficient ground at every frequency;
2. solves Sommerfeld-Norton at *anchors*: every exact frequency (the
   channels), the band's ends, and enough grid points that no two anchors
   lie more than :data:`ANCHOR_STEPS` grid steps apart;
3. between anchors, adds to the reflection-coefficient solution the
   difference the anchors show: feed impedance R and X by PCHIP in log f,
   gain in dB at each direction linearly in log f;
4. checks itself: an interval whose end anchors NEC could not solve
   physically (:func:`planpack.antennas.trust.physical_mask`), or
   across which the difference moves by more than :data:`JUMP_RELATIVE` of
   the impedance or :data:`JUMP_GAIN_DB` of the azimuth-averaged gain at
   45-90 degrees elevation, is solved with Sommerfeld-Norton at every point,
   and so is every band the caller names as one where the soil moves a
   feature of the antenna (a reflector's resonance).

The channels get NEC's full pattern; the other frequencies a coarse one
(:data:`planpack.antennas.solver.COARSE_N_THETA` x ``COARSE_N_PHI``),
which is all the band grid's azimuth-averaged gain needs.

Measured against Sommerfeld-Norton at every one of 241 log-spaced
frequencies over 1.5-30 MHz, for the 19 wire-antenna and soil pairs of the
demo plans, away from the zones where NEC-2 itself fails (wire ends near
the ground far below resonance), by ``bench/bandsweep_accuracy.py``: the
gain less the losses from the set at 50, 70 and 90 degrees elevation, read
between solved frequencies as the link budget reads it, is within 0.13 dB
at the 95th percentile and 0.23 dB at the 99th up to 12 MHz (0.80 dB at
worst), where the same reading from Sommerfeld-Norton at every grid point
gives 0.09, 0.23 and 0.79 dB; up to 30 MHz, where long wires' lobes split
between grid points, 0.44, 1.15 and 6.8 dB against 0.42, 1.09 and 6.8 dB.
It takes the demo plans' cold antenna time from 6.6-8.3 s to about 3.5 s
each (``bench/bench_antennas.py``).  ``tests/antennas/test_bandsweep.py``
checks it on three antennas.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from scipy.interpolate import PchipInterpolator

from . import pattern
from .geometry import Model
from .ground import nec_ground_args
from .solver import NEC_FLOOR_DB, N_THETA, AntennaSolveError, solve
from .trust import physical_mask

#: Most band-grid steps between two Sommerfeld-Norton anchors (4 steps of the 41-point grid span 35 %).
ANCHOR_STEPS = 4
#: An interval is solved in full where the anchors' impedance difference moves by more than this
#: fraction of the smaller anchor impedance ...
JUMP_RELATIVE = 0.25
#: ... or their azimuth-averaged gain difference moves by more than this at 45-90 degrees elevation [dB].
JUMP_GAIN_DB = 1.0
#: Elevations 45-90 degrees in an azimuth-averaged table (elevation 0..90, 1-degree steps).
_STEEP_ELEVATIONS = slice(45, 91)


@dataclass(frozen=True)
class Sweep:
    """An antenna solved at ascending frequencies.

    freqs_khz : (n,) [kHz], ascending
    impedance_ohm : (n,) complex feed impedance [ohm]
    gain_dbi : (n, 91, 7) NEC gain [dBi] (theta 0..90, phi 0..90 deg), NEC's floor kept
    sommerfeld : (n,) bool, True where Sommerfeld-Norton was solved (or the ground needs no Sommerfeld
        tables: free space, perfect ground, a bonded whip); False where the reflection-coefficient
        ground was corrected by the anchors
    """

    freqs_khz: tuple[float, ...]
    impedance_ohm: np.ndarray
    gain_dbi: np.ndarray
    sommerfeld: np.ndarray


def anchors(exact_khz: Sequence[float], grid_khz: Sequence[float], steps: int = ANCHOR_STEPS) -> tuple[float, ...]:
    """The frequencies to solve with Sommerfeld-Norton [kHz], ascending.

    Every exact frequency, the grid's ends, and the fewest grid points that
    leave no gap between anchors wider than ``steps`` grid steps (in log f)
    over the grid's span: walking up from the grid's first point, the next
    anchor is the farthest exact frequency within reach, else the farthest
    grid point within reach.
    """
    grid = sorted(float(g) for g in grid_khz)
    fixed = sorted({float(f) for f in exact_khz})
    reach = math.exp(steps * math.log(grid[1] / grid[0])) * (1.0 + 1e-9) if len(grid) > 1 else 1.0
    chosen = {grid[0], grid[-1]}
    pos = grid[0]
    while pos < grid[-1]:
        ahead = [f for f in fixed if pos < f <= pos * reach]
        if ahead:
            pos = ahead[-1]
            continue
        within = [g for g in grid if pos < g <= pos * reach]
        pos = within[-1] if within else next(g for g in grid if g > pos)
        chosen.add(pos)
    return tuple(sorted(chosen | set(fixed)))


def _finite_gain(g: np.ndarray) -> np.ndarray:
    return np.where(g <= NEC_FLOOR_DB, np.nan, g)


def _jump(dz: np.ndarray, zs: np.ndarray, dt: np.ndarray, i: int) -> bool:
    """The anchors' difference moves too much between anchor i and i + 1 to be read between them.

    ``dt`` is the difference of the azimuth-averaged gain by elevation [dB], what the link budget reads.
    """
    scale = min(abs(zs[i]), abs(zs[i + 1]))
    if abs(dz[i + 1] - dz[i]) > JUMP_RELATIVE * scale:
        return True
    moved = np.abs(dt[i + 1, _STEEP_ELEVATIONS] - dt[i, _STEEP_ELEVATIONS])
    return bool(np.max(moved, initial=0.0) > JUMP_GAIN_DB)


def sweep(model: Model, soil: str, exact_khz: Sequence[float], grid_khz: Sequence[float],
          bonded_vertical: bool = False, dense_khz: Sequence[tuple[float, float]] = ()) -> Sweep:
    """Feed impedance and gain of a model at every exact and grid frequency.

    Parameters
    ----------
    model : Model
        Wires, feed and loads [m, ohm].
    soil : str
        A P.527 soil name, 'perfect' or 'free-space'.
    exact_khz : sequence of float
        Frequencies to solve with Sommerfeld-Norton whatever happens (the
        channels, the reference frequency) [kHz].
    grid_khz : sequence of float
        The band grid [kHz], ascending and log-spaced.
    bonded_vertical : bool
        As for :func:`planpack.antennas.solver.solve` (the whip, which needs
        no Sommerfeld tables).
    dense_khz : sequence of (low, high) [kHz]
        Bands where the ground's effect is known to change fast, solved with
        Sommerfeld-Norton at every frequency: around the resonance of a
        parasitic wire near the ground (a reflector), which the soil's
        loading shifts, so that the gain the reflector adds moves with it.

    Returns
    -------
    Sweep
        At the union of both sets of frequencies, ascending.

    Raises
    ------
    AntennaSolveError
        NEC failed on the model.
    """
    freqs = tuple(sorted({float(f) for f in exact_khz} | {float(f) for f in grid_khz}))
    if nec_ground_args(soil)[0] != 2 or bonded_vertical:
        z, g = solve(model, soil, freqs, pattern=True, bonded_vertical=bonded_vertical)
        return Sweep(freqs, z, g, np.ones(len(freqs), bool))

    try:
        z_rc, g_rc = solve(model, soil, freqs, pattern="coarse", reflection_ground=True)
    except AntennaSolveError:  # the cheap ground failed where Sommerfeld-Norton may not: use it throughout
        z, g = solve(model, soil, freqs, pattern=True)
        return Sweep(freqs, z, g, np.ones(len(freqs), bool))
    at = {f: i for i, f in enumerate(freqs)}
    solved: dict[float, tuple[complex, np.ndarray]] = {}

    def sommerfeld(fs, points) -> None:
        fs = tuple(sorted(fs))
        if fs:
            z, g = solve(model, soil, fs, pattern=points)
            solved.update({f: (complex(z[k]), g[k]) for k, f in enumerate(fs)})

    # The exact frequencies get NEC's full pattern; grid anchors the coarse one, as the
    # reflection-coefficient solves do (what the band grid reads is the azimuth average).
    exact = {float(f) for f in exact_khz}
    sommerfeld(exact, True)
    sommerfeld(set(anchors(exact_khz, grid_khz)) - exact, "coarse")
    keys, zs, dz = _impedance_difference(solved, z_rc, at)
    dt = (pattern.summary(np.stack([solved[f][1] for f in keys]))["table_dbi"]
          - pattern.summary(g_rc[[at[f] for f in keys]])["table_dbi"])
    ok = physical_mask(zs)
    refine: list[float] = [f for f in freqs if any(lo <= f <= hi for lo, hi in dense_khz) and f not in solved]
    for i in range(len(keys) - 1):
        inside = [f for f in freqs if keys[i] < f < keys[i + 1] and f not in refine]
        if inside and (not (ok[i] and ok[i + 1]) or _jump(dz, zs, dt, i)):
            refine += inside
    sommerfeld(refine, "coarse")
    z, g, is_solved = _corrected(freqs, z_rc, g_rc, solved, at)
    # A corrected impedance that is not physical is no reading to trust: solve it instead.
    sommerfeld([f for i, f in enumerate(freqs) if not is_solved[i] and not z[i].real > 0], "coarse")
    z, g, is_solved = _corrected(freqs, z_rc, g_rc, solved, at)
    return Sweep(freqs, z, g, is_solved)


def _impedance_difference(solved: dict[float, tuple[complex, np.ndarray]], z_rc: np.ndarray,
                          at: dict[float, int]) -> tuple[list[float], np.ndarray, np.ndarray]:
    """The solved frequencies, ascending, their Sommerfeld-Norton impedances and those less the cheap ground's."""
    keys = sorted(solved)
    zs = np.array([solved[f][0] for f in keys])
    return keys, zs, zs - z_rc[[at[f] for f in keys]]


def _corrected(freqs: tuple[float, ...], z_rc: np.ndarray, g_rc: np.ndarray,
               solved: dict[float, tuple[complex, np.ndarray]], at: dict[float, int]
               ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Sommerfeld-Norton where solved; elsewhere the reflection-coefficient solution plus the difference
    at the solved frequencies, interpolated in log f (PCHIP for R and X, linear for gain in dB)."""
    keys, _, dz = _impedance_difference(solved, z_rc, at)
    is_solved = np.array([f in solved for f in freqs])
    z = np.array(z_rc, complex)
    g = np.array(g_rc, float)
    for f in keys:
        z[at[f]], g[at[f]] = solved[f]
    between = ~is_solved
    if between.any():
        lk = np.log(keys)
        lf = np.log(np.asarray(freqs)[between])
        z[between] += PchipInterpolator(lk, dz.real)(lf) + 1j * PchipInterpolator(lk, dz.imag)(lf)
        dg = np.stack([_finite_gain(solved[f][1]) - _finite_gain(g_rc[at[f]]) for f in keys])
        dg = np.nan_to_num(dg.reshape(len(keys), -1), nan=0.0)  # no correction where either is NEC's floor
        corr = np.stack([np.interp(lf, lk, col) for col in dg.T], axis=1).reshape(len(lf), N_THETA, -1)
        rc = g[between]
        g[between] = np.where(rc <= NEC_FLOOR_DB, rc, np.maximum(rc + corr, NEC_FLOOR_DB))
    return z, g, is_solved
