"""Why no frequency serves a (link, hour) pair: read from the predictions, not guessed.

Checked in the order a planner can act on them:

``not_authorised``
    an assigned channel reaches the target there but is not authorised at
    that hour: ask for its hours, not for a new frequency;
``luf_above_muf``
    the lowest usable frequency (the link budget's) is above the MUF, or no
    frequency meets the required SNR: more power or a better antenna (or a
    quieter receiving site), not a frequency;
``above_muf``
    the MUF is below the bottom of the band (1.6 MHz): every frequency
    that may be asked for is above it;
``outside_bands``
    frequencies between the LUF and the MUF would do, but none of them may
    be asked for (outside the bands, or excluded);
``short_of_target``
    candidates lie in the usable window but the day-to-day spread of the
    ionosphere and the noise keeps them under the target: a stronger link
    budget helps, another frequency does not.
"""

from __future__ import annotations

import numpy as np

from planpack.requests import candidates
from planpack.requests.report import pct

NOT_AUTHORISED = "not_authorised"
LUF_ABOVE_MUF = "luf_above_muf"
ABOVE_MUF = "above_muf"
OUTSIDE_BANDS = "outside_bands"
SHORT_OF_TARGET = "short_of_target"

#: The bottom of the band a request may cover by default [MHz].
BAND_BOTTOM_MHZ = candidates.DEFAULT_BANDS_KHZ[0][0] / 1000.0

#: A pair whose best candidate works on fewer days than this has, for a planner, no working frequency [0-1].
MEANINGFUL_GOOD_DAYS = 0.05

ORDER = (NOT_AUTHORISED, LUF_ABOVE_MUF, ABOVE_MUF, OUTSIDE_BANDS, SHORT_OF_TARGET)


def classify(links_hours: np.ndarray, good_days: np.ndarray, allowed: np.ndarray, muf_mhz: np.ndarray,
             luf_mhz: np.ndarray, freqs_khz: np.ndarray, best: np.ndarray, target: float) -> list[str]:
    """The reason code of each (link, hour) pair no candidate serves.

    Parameters
    ----------
    links_hours : (m, 2) int, (link index, UTC hour)
    good_days : (n, 24, c) assigned channels' fraction of good days [0-1]
    allowed : (24, c) bool, authorised hours of the assigned channels
    muf_mhz, luf_mhz : (n, 24) worst-case MUF and LUF [MHz]; LUF NaN where no frequency works
    freqs_khz : (k,) the candidates [kHz]
    best : (m,) the best fraction of good days any candidate gives the pair [0-1]
    target : the plan's target [0-1]
    """
    out = []
    f_mhz = np.asarray(freqs_khz, float) / 1000.0
    for (l, h), b in zip(links_hours, best):
        muf, luf = float(muf_mhz[l, h]), float(luf_mhz[l, h])
        if ((good_days[l, h] >= target) & ~allowed[h]).any():
            out.append(NOT_AUTHORISED)
        elif not np.isfinite(luf):
            # the LUF is a 90 % figure: without one, a candidate may still work on many days, short of the target
            out.append(SHORT_OF_TARGET if b >= MEANINGFUL_GOOD_DAYS else LUF_ABOVE_MUF)
        elif luf >= muf:
            out.append(LUF_ABOVE_MUF)
        elif not ((f_mhz >= luf) & (f_mhz <= muf)).any():
            # below the bottom of the band nothing helps; above it, the bands or exclusions are in the way
            out.append(ABOVE_MUF if muf <= min(f_mhz.min(), BAND_BOTTOM_MHZ) else OUTSIDE_BANDS)
        else:
            out.append(SHORT_OF_TARGET)
    return out


def explain(code: str, *, muf: tuple[float, float], luf: tuple[float, float] | None, best: float, best_khz: float,
            target: float, lowest_khz: float, channels: list[str]) -> str:
    """A whole sentence for a group of pairs with the same reason; figures as ranges over the group.

    muf, luf : (min, max) over the group's hours [MHz]; luf None where no frequency meets the requirement
        (never for ``outside_bands``).
    best : the best fraction of good days any candidate gives [0-1], at best_khz [kHz].
    """
    def rng(a, b):
        return f"{a:.1f}" if abs(a - b) < 0.05 else f"{a:.1f}–{b:.1f}"

    if code == NOT_AUTHORISED:
        return (f"assigned channel {', '.join(channels)} would serve it but is not authorised at those hours: "
                f"ask for its hours to be extended rather than for a new frequency.")
    if code == LUF_ABOVE_MUF:
        at = "no frequency meets the required SNR" if luf is None else f"the LUF ({rng(*luf)} MHz) is above the MUF ({rng(*muf)} MHz)"
        return f"LUF above MUF: {at}; more power or a better antenna (or a quieter receiving site), not a frequency."
    if code == ABOVE_MUF:
        return (f"above the MUF at every frequency that may be asked for: the MUF is {rng(*muf)} MHz, the lowest "
                f"candidate {lowest_khz / 1000:.3f} MHz; a relay or the ground wave, not a frequency.")
    if code == OUTSIDE_BANDS:
        return (f"the frequencies that would work, between the LUF ({rng(*luf)} MHz) and the MUF ({rng(*muf)} MHz), "
                f"lie outside the bands that may be asked for or in excluded segments; widen request.bands_khz or drop "
                f"an exclusion.")
    return (f"at best {pct(best, target)} of days (at {best_khz:g} kHz), short of the {pct(target)} target: the "
            f"day-to-day spread of the ionosphere and of the noise; more power, a better antenna or a quieter site "
            f"would help, not another frequency.")
