"""Trim a wire antenna to resonance at its design frequency.

Resonance is where the feed reactance crosses zero going from short
(capacitive, X < 0) to long (inductive, X > 0).  The root is found by
Brent's method (scipy.optimize.brentq), a bracketing bisection safeguarded
with secant steps: it never leaves the bracket and needs fewer NEC solves
than plain bisection for the same 1 mm tolerance.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

from scipy.optimize import brentq

from .geometry import Model
from .solver import solve

TOLERANCE_M = 1e-3


@dataclass(frozen=True)
class Trim:
    length_m: float          # resonant length (or the start value if none was found) [m]
    resonant: bool           # a zero crossing of the reactance was found
    impedance_ohm: complex   # feed impedance at length_m [ohm]
    solves: int              # NEC solves used


def trim_to_resonance(build: Callable[[float], Model], soil: str, freq_khz: float,
                      start_m: float, bonded_vertical: bool = False,
                      max_length_m: float | None = None) -> Trim:
    """Length [m] at which ``build(length)`` has zero feed reactance at ``freq_khz``.

    Parameters
    ----------
    build : callable
        Length [m] -> Model.
    soil : str
        Ground for NEC.
    freq_khz : float
        Design frequency [kHz].
    start_m : float
        First guess [m] (the rule of thumb); the bracket starts at
        0.85..1.10 of it and widens up to 0.5..1.5 of it.
    bonded_vertical : bool
        Passed to :func:`planpack.antennas.solver.solve`.
    max_length_m : float, optional
        Longest length the geometry allows [m] (an inverted-v's legs must not
        reach the ground); caps the bracket.
    """
    # Every length solved is kept: brentq asks again for the bracket's ends, and the
    # root it returns is a length it has already solved.
    solved: dict[float, complex] = {}

    def impedance(length_m: float) -> complex:
        if length_m not in solved:
            z, _ = solve(build(length_m), soil, (freq_khz,), pattern=False,
                         bonded_vertical=bonded_vertical)
            solved[length_m] = complex(z[0])
        return solved[length_m]

    def reactance(length_m: float) -> float:
        return impedance(length_m).imag

    cap = max_length_m if max_length_m is not None else float("inf")
    lo, hi = 0.85 * start_m, min(1.10 * start_m, cap)
    x_lo, x_hi = reactance(lo), reactance(hi)
    while x_lo > 0 and lo > 0.5 * start_m:
        lo *= 0.9
        x_lo = reactance(lo)
    while x_hi < 0 and hi < min(1.5 * start_m, cap):
        hi = min(hi * 1.1, cap)
        x_hi = reactance(hi)
    if not (x_lo <= 0 <= x_hi):
        # Still short at the longest length the geometry allows: that length is the nearest
        # to resonance; otherwise keep the rule of thumb.
        best = hi if (x_hi < 0 and hi >= cap - 1e-9) else min(start_m, cap)
        z = impedance(best)
        return Trim(float(best), False, z, len(solved))
    length = brentq(reactance, lo, hi, xtol=TOLERANCE_M)
    z = impedance(length)
    return Trim(float(length), True, z, len(solved))
