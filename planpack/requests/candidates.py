"""The candidate grid: every frequency that may be asked for.

Candidates lie on multiples of the step inside the bands the spectrum
manager assigns from, outside the plan's exclusions, outside the
international distress and safety frequencies with a guard band, outside the
standard frequency and time signal bands, and not on top of a channel the
plan already has.

Pure functions of plain numbers: the plan reader uses them to check a
``request:`` section, the optimiser to build its grid.

Sources of the built-in exclusions
----------------------------------
ITU Radio Regulations (RR), Appendix 15, Table 15-1 (frequencies below
30 MHz of the Global Maritime Distress and Safety System), and RR Article 5
footnotes 5.108-5.111. The 2182 kHz guard band 2173.5-2190.5 kHz and the
frequencies marked "RR 5.108-5.111" below were checked against a published
reproduction of those footnotes; the maritime safety information (MSI-HF)
frequencies and the standard frequency and time signal bands (RR Article 5
table of allocations) are from memory.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

#: Whole band a request may cover by default [kHz] (the issue of planpack's request command).
DEFAULT_BANDS_KHZ = ((1600.0, 30000.0),)
#: Default spacing of the candidates [kHz].
DEFAULT_STEP_KHZ = 25.0
#: Frequencies the link budget covers [kHz]: bands must lie inside.
HF_LOW_KHZ, HF_HIGH_KHZ = 1500.0, 30000.0
#: At most this many candidates: the predictions cost time in proportion.
MAX_CANDIDATES = 4000
#: Guard either side of each distress and safety frequency [kHz]: RR 5.111 confines emissions on
#: 10003, 14993 and 19993 kHz to +-3 kHz; a 3 kHz channel on either sideband then needs 6 kHz of
#: separation, and 4 kHz more is left for frequency tolerance (common practice, no source).
DISTRESS_GUARD_KHZ = 10.0
#: A proposal keeps at least this far from an assigned channel [kHz] (the plan reader's rule).
ASSIGNED_SPACING_KHZ = 3.0

#: (kHz, use, where it comes from) of the HF distress and safety frequencies.
DISTRESS_SAFETY_KHZ: tuple[tuple[float, str, str], ...] = (
    (2174.5, "NBDP distress and safety traffic", "RR 5.108-5.111, App. 15"),
    (2182.0, "radiotelephony distress and calling", "RR 5.108-5.111, App. 15"),
    (2187.5, "DSC distress and safety calling", "RR 5.108-5.111, App. 15"),
    (3023.0, "aeronautical search and rescue", "RR 5.111"),
    (4125.0, "radiotelephony distress and safety traffic", "RR 5.108-5.111, App. 15"),
    (4177.5, "NBDP distress and safety traffic", "RR 5.108-5.111, App. 15"),
    (4207.5, "DSC distress and safety calling", "RR 5.108-5.111, App. 15"),
    (4209.5, "NAVTEX-type maritime safety information", "App. 15, published GMDSS reference"),
    (4210.0, "maritime safety information (MSI-HF)", "App. 15, from memory"),
    (5680.0, "aeronautical search and rescue", "RR 5.111"),
    (6215.0, "radiotelephony distress and safety traffic", "RR 5.108-5.111, App. 15"),
    (6268.0, "NBDP distress and safety traffic", "RR 5.108-5.111, App. 15"),
    (6312.0, "DSC distress and safety calling", "RR 5.108-5.111, App. 15"),
    (6314.0, "maritime safety information (MSI-HF)", "App. 15, from memory"),
    (8291.0, "radiotelephony distress and safety traffic", "RR 5.108-5.111, App. 15"),
    (8364.0, "search and rescue (survival craft)", "RR 5.111"),
    (8376.5, "NBDP distress and safety traffic", "RR 5.108-5.111, App. 15"),
    (8414.5, "DSC distress and safety calling", "RR 5.108-5.111, App. 15"),
    (8416.5, "maritime safety information (MSI-HF)", "App. 15, from memory"),
    (10003.0, "search and rescue, manned space vehicles", "RR 5.111"),
    (12290.0, "radiotelephony distress and safety traffic", "RR 5.108-5.111, App. 15"),
    (12520.0, "NBDP distress and safety traffic", "RR 5.108-5.111, App. 15"),
    (12577.0, "DSC distress and safety calling", "RR 5.108-5.111, App. 15"),
    (12579.0, "maritime safety information (MSI-HF)", "App. 15, from memory"),
    (14993.0, "search and rescue, manned space vehicles", "RR 5.111"),
    (16420.0, "radiotelephony distress and safety traffic", "RR 5.108-5.111, App. 15"),
    (16695.0, "NBDP distress and safety traffic", "RR 5.108-5.111, App. 15"),
    (16804.5, "DSC distress and safety calling", "RR 5.108-5.111, App. 15"),
    (16806.5, "maritime safety information (MSI-HF)", "App. 15, from memory"),
    (19680.5, "maritime safety information (MSI-HF)", "App. 15, from memory"),
    (19993.0, "search and rescue, manned space vehicles", "RR 5.111"),
    (22376.0, "maritime safety information (MSI-HF)", "App. 15, from memory"),
    (26100.5, "maritime safety information (MSI-HF)", "App. 15, from memory"),
)
#: Segments excluded whole [kHz]: the 2182 kHz guard band, and the standard frequency and
#: time signal bands (allocated to that service alone; RR Article 5, from memory).
PROTECTED_BANDS_KHZ: tuple[tuple[float, float, str, str], ...] = (
    (2173.5, 2190.5, "guard band of the 2182 kHz distress frequency", "RR 5.108-5.111"),
    (2495.0, 2505.0, "standard frequency and time signals", "RR Article 5, from memory"),
    (4995.0, 5005.0, "standard frequency and time signals", "RR Article 5, from memory"),
    (9995.0, 10005.0, "standard frequency and time signals", "RR Article 5, from memory"),
    (14990.0, 15010.0, "standard frequency and time signals", "RR Article 5, from memory"),
    (19990.0, 20010.0, "standard frequency and time signals", "RR Article 5, from memory"),
    (24990.0, 25010.0, "standard frequency and time signals", "RR Article 5, from memory"),
)


class GridError(ValueError):
    """A request section (or option) that leaves no usable grid; ``key`` names the plan key."""

    def __init__(self, key: str, message: str) -> None:
        super().__init__(f"{key}: {message}")
        self.key = key
        self.message = message


@dataclass(frozen=True)
class CandidateGrid:
    """The frequencies that may be asked for.

    freqs_khz : (k,) ascending candidate frequencies [kHz].
    run : (k,) int, index of the contiguous run each candidate belongs to: neighbours in one run
        are one step apart with nothing excluded between them, so a window never spans a hole.
    step_khz : spacing [kHz].
    bands_khz, exclude_khz : the segments asked for and the plan's own exclusions [kHz].
    builtin : the built-in exclusions that touch the bands: dicts {khz: [lo, hi], why, source}.
    """

    freqs_khz: np.ndarray
    run: np.ndarray
    step_khz: float
    bands_khz: tuple[tuple[float, float], ...]
    exclude_khz: tuple[tuple[float, float], ...]
    builtin: tuple[dict, ...]

    @property
    def size(self) -> int:
        return int(self.freqs_khz.size)

    def describe(self) -> dict:
        return {"bands_khz": [list(b) for b in self.bands_khz], "exclude_khz": [list(e) for e in self.exclude_khz],
                "step_khz": self.step_khz, "count": self.size, "builtin_exclusions": list(self.builtin),
                "distress_guard_khz": DISTRESS_GUARD_KHZ, "assigned_spacing_khz": ASSIGNED_SPACING_KHZ}


def builtin_exclusions() -> list[tuple[float, float, str, str]]:
    """(low, high, why, source) [kHz]: distress and safety frequencies with their guard, protected bands."""
    out = [(f - DISTRESS_GUARD_KHZ, f + DISTRESS_GUARD_KHZ, use, src) for f, use, src in DISTRESS_SAFETY_KHZ]
    return sorted(out + list(PROTECTED_BANDS_KHZ))


def as_segment(value) -> tuple[float, float]:
    """A plan exclusion: a single frequency [kHz] or a segment [low, high] -> (low, high)."""
    if isinstance(value, (list, tuple)):
        return float(value[0]), float(value[1])
    return float(value), float(value)


def _measure(segments: list[tuple[float, float]]) -> float:
    total, end = 0.0, -math.inf
    for lo, hi in sorted(segments):
        lo = max(lo, end)
        if hi > lo:
            total += hi - lo
            end = hi
    return total


def check_values(bands, exclude, step, key: str = "request") -> list[tuple[str, str]]:
    """Problems with a request's values, as (key, message); empty when the grid can be built.

    ``bands`` are [low, high] pairs, ``exclude`` frequencies or [low, high] pairs, ``step`` [kHz].
    """
    problems: list[tuple[str, str]] = []
    if not bands:
        problems.append((f"{key}.bands_khz", "expected at least one band [low, high] in kHz, got none"))
    for i, (lo, hi) in enumerate(bands):
        if not (HF_LOW_KHZ <= lo <= HF_HIGH_KHZ and HF_LOW_KHZ <= hi <= HF_HIGH_KHZ):
            problems.append((f"{key}.bands_khz[{i}]", f"[{lo:g}, {hi:g}] kHz reaches outside {HF_LOW_KHZ:g}-{HF_HIGH_KHZ:g} kHz, "
                                                      "the frequencies the predictions cover"))
        elif hi < lo:
            problems.append((f"{key}.bands_khz[{i}]", f"[{lo:g}, {hi:g}] is inverted; write [low, high] in kHz"))
        elif hi == lo:
            problems.append((f"{key}.bands_khz[{i}]", f"[{lo:g}, {hi:g}] is empty; a band needs low < high (kHz)"))
    for i, seg in enumerate(exclude):
        lo, hi = as_segment(seg)
        if hi < lo:
            problems.append((f"{key}.exclude_khz[{i}]", f"[{lo:g}, {hi:g}] is inverted; write [low, high] in kHz"))
    if not (step > 0 and math.isfinite(step)):
        problems.append((f"{key}.step_khz", f"expected a spacing above 0 kHz, got {step:g}"))
    if problems:
        return problems
    open_width = _measure(list(bands)) - _measure([(max(lo, b0), min(hi, b1)) for b0, b1 in bands
                                                   for lo, hi in map(as_segment, exclude) if min(hi, b1) > max(lo, b0)])
    count = _count(bands, step)
    if open_width <= 0:
        problems.append((f"{key}.exclude_khz", "the exclusions cover every band; nothing is left to ask for"))
    elif count == 0:
        problems.append((f"{key}.step_khz", f"no multiple of {step:g} kHz lies in the bands; use a smaller step"))
    elif count > MAX_CANDIDATES:
        problems.append((f"{key}.step_khz", f"a step of {step:g} kHz over {_measure(list(bands)):g} kHz of bands gives about "
                                            f"{count} candidate frequencies; at most {MAX_CANDIDATES} are predicted "
                                            f"(use a step of at least {math.ceil(_measure(list(bands)) / MAX_CANDIDATES):g} kHz "
                                            "or narrower bands)"))
    return problems


def _count(bands, step) -> int:
    return sum(max(0, math.floor(hi / step) - math.ceil(lo / step) + 1) for lo, hi in bands)


def candidate_grid(bands=DEFAULT_BANDS_KHZ, exclude=(), step: float = DEFAULT_STEP_KHZ,
                   assigned_khz=(), key: str = "request") -> CandidateGrid:
    """Every frequency that may be asked for.

    Parameters
    ----------
    bands : sequence of (low, high) [kHz]
        Segments the spectrum manager assigns from, inside 1500-30000 kHz.
    exclude : sequence of frequencies or (low, high) [kHz]
        Never to be proposed (a single frequency excludes candidates closer than the spacing of
        assigned channels, 3 kHz).
    step : float
        Candidate spacing [kHz]; candidates sit on whole multiples of it.
    assigned_khz : sequence of float
        Channels the plan already has [kHz]: no candidate within 3 kHz of one.
    key : str
        Plan key of the section, for messages.

    Returns
    -------
    CandidateGrid

    Raises
    ------
    GridError
        When the values are unusable or nothing is left (the message names the key).
    """
    bands = tuple(sorted((float(lo), float(hi)) for lo, hi in bands))
    excl = tuple(as_segment(e) for e in exclude)
    problems = check_values(bands, excl, float(step), key)
    if problems:
        raise GridError(*problems[0])
    step = float(step)
    pieces = [np.arange(math.ceil(lo / step), math.floor(hi / step) + 1) for lo, hi in bands]
    n = np.unique(np.concatenate(pieces)) if pieces else np.zeros(0, int)
    f = np.round(n * step, 6)
    keep = np.ones(f.size, bool)
    for lo, hi in excl:
        if lo == hi:  # a single frequency: keep a channel's spacing from it
            keep &= np.abs(f - lo) >= ASSIGNED_SPACING_KHZ
        else:
            keep &= ~((f >= lo) & (f <= hi))
    touching = []
    for lo, hi, why, src in builtin_exclusions():
        hit = (f >= lo) & (f <= hi)
        if any(b0 <= hi and lo <= b1 for b0, b1 in bands):
            touching.append({"khz": [lo, hi], "why": why, "source": src})
        keep &= ~hit
    for a in assigned_khz:
        keep &= np.abs(f - float(a)) >= ASSIGNED_SPACING_KHZ
    if not keep.any():
        raise GridError(f"{key}.bands_khz", "no frequency is left to ask for once the exclusions, the distress and safety "
                                            "frequencies with their guard bands and the assigned channels are taken out")
    # a run breaks wherever a neighbour was removed or a band ends
    run = np.cumsum(np.concatenate([[0], (np.diff(n) != 1) | ~keep[1:] | ~keep[:-1]]))
    return CandidateGrid(freqs_khz=f[keep], run=run[keep], step_khz=step, bands_khz=bands,
                         exclude_khz=excl, builtin=tuple(touching))
