"""Trim a wire antenna to resonance at its design frequency.

Resonance is where the feed reactance crosses zero going from short
(capacitive, X < 0) to long (inductive, X > 0).  The root is found by
Brent's method (scipy.optimize.brentq), a bracketing bisection safeguarded
with secant steps: it never leaves the bracket and needs fewer NEC solves
than plain bisection for the same 1 mm tolerance.

Over a real soil each solve with NEC's Sommerfeld-Norton ground costs about
25 ms, and one with its reflection-coefficient ground about a millisecond.
The two grounds put resonance within a few per cent of each other in
length, and the reactance's slope with length barely differs.  So the
resonance is first found over the cheap ground, then Newton steps with
that ground's slope carry it onto Sommerfeld-Norton, until a step would
move it by 1 mm or less (usually after one to three solves); anything else
falls back to Brent's method over Sommerfeld-Norton, from the bracket the
steps found or, failing one, the usual bracket.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

from scipy.optimize import brentq

from .geometry import Model
from .ground import nec_ground_args
from .solver import solve

TOLERANCE_M = 1e-3


@dataclass(frozen=True)
class Trim:
    length_m: float          # resonant length (or the start value if none was found) [m]
    resonant: bool           # a zero crossing of the reactance was found
    impedance_ohm: complex   # feed impedance at length_m [ohm]
    solves: int              # NEC solves over the ground asked for (not the cheap ones that seed them)


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
    cap = max_length_m if max_length_m is not None else float("inf")
    if not bonded_vertical and nec_ground_args(soil)[0] == 2:
        seeded = _seeded(build, soil, freq_khz, start_m, cap)
        if seeded is not None:
            return seeded
    return _bracketed(build, soil, freq_khz, start_m, bonded_vertical, cap, {})


def _solver(build, soil: str, freq_khz: float, solved: dict[float, complex], bonded_vertical: bool = False,
            reflection_ground: bool = False) -> Callable[[float], complex]:
    """Feed impedance at a length, each length solved once (kept in ``solved``)."""
    def impedance(length_m: float) -> complex:
        if length_m not in solved:
            z, _ = solve(build(length_m), soil, (freq_khz,), pattern=False, bonded_vertical=bonded_vertical,
                         reflection_ground=reflection_ground)
            solved[length_m] = complex(z[0])
        return solved[length_m]
    return impedance


#: Newton steps over Sommerfeld-Norton from the reflection-coefficient resonance before Brent takes over.
NEWTON_STEPS = 3


def _seeded(build, soil: str, freq_khz: float, start_m: float, cap: float) -> Trim | None:
    """Resonance over Sommerfeld-Norton, started from the reflection-coefficient ground's; None if that has none."""
    cheap: dict[float, complex] = {}
    rc = _bracketed(build, soil, freq_khz, start_m, False, cap, cheap, reflection_ground=True)
    if not rc.resonant:
        return None
    length = rc.length_m
    probe = _solver(build, soil, freq_khz, cheap, reflection_ground=True)
    h = max(0.002 * length, 10 * TOLERANCE_M)
    if length + h > cap:
        h = -h
    slope = (probe(length + h).imag - rc.impedance_ohm.imag) / h  # dX/dL [ohm/m], > 0 near resonance
    if not slope > 0:
        return None
    solved: dict[float, complex] = {}
    impedance = _solver(build, soil, freq_khz, solved)
    for _ in range(NEWTON_STEPS):
        x = impedance(length).imag
        step = -x / slope
        if abs(step) <= TOLERANCE_M:
            return Trim(float(length), True, impedance(length), len(solved))
        nxt = min(max(length + step, 0.5 * start_m), cap)
        if nxt == length:
            break
        length = nxt
    # Brent's method over Sommerfeld-Norton between the shortest inductive and longest capacitive lengths seen.
    short = [L for L, z in solved.items() if z.imag <= 0]
    long_ = [L for L, z in solved.items() if z.imag >= 0]
    if short and long_ and max(short) <= min(long_):
        lo, hi = max(short), min(long_)
        root = brentq(lambda L: impedance(L).imag, lo, hi, xtol=TOLERANCE_M) if lo < hi else lo
        return Trim(float(root), True, impedance(root), len(solved))
    return _bracketed(build, soil, freq_khz, start_m, False, cap, solved)


def _bracketed(build, soil: str, freq_khz: float, start_m: float, bonded_vertical: bool, cap: float,
               solved: dict[float, complex], reflection_ground: bool = False) -> Trim:
    """Brent's method from a bracket around the rule of thumb, widened until the reactance changes sign."""
    # Every length solved is kept: brentq asks again for the bracket's ends, and the
    # root it returns is a length it has already solved.
    impedance = _solver(build, soil, freq_khz, solved, bonded_vertical, reflection_ground)

    def reactance(length_m: float) -> float:
        return impedance(length_m).imag

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
