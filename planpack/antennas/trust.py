"""Which of NEC's feed impedances to believe.

NEC-2's Sommerfeld ground (as nec2++ implements it) fails for wires very
low in wavelengths, and a link budget must count an antenna as unusable
there rather than trust a negative resistance.
"""

from __future__ import annotations

import numpy as np

#: A solved feed resistance this far below those of its neighbours is taken as NEC's failure, not physics.
DIP_FACTOR = 0.25


def physical_mask(z_ohm: np.ndarray) -> np.ndarray:
    """(n,) True where a feed impedance solved at ascending frequencies can be trusted.

    NEC-2's Sommerfeld ground (as nec2++ implements it) fails for wires very
    low in wavelengths: measured here, a horizontal wire 2 m up over
    medium-dry ground at 2.4-3.4 MHz gets R of -65 to -127 ohm.  The
    failure shows as R <= 0, and at its edges as a point whose R has
    collapsed next to it: a point beside an untrusted one whose R is under
    DIP_FACTOR times the median of the two trusted points beyond it, on the
    side away from the failure, is not trusted either.
    """
    r = np.asarray(z_ohm).real
    ok = np.isfinite(r) & (r > 0.0)
    n = len(r)
    changed = True
    while changed:
        changed = False
        good = np.flatnonzero(ok)
        for i in good:
            for side in (-1, 1):
                j = i + side
                if not (0 <= j < n) or ok[j]:
                    continue
                beyond = good[good > i][:2] if side < 0 else good[good < i][-2:]
                if len(beyond) and r[i] < DIP_FACTOR * np.median(r[beyond]):
                    ok[i] = False
                    changed = True
                    break
            if changed:
                break
    return ok
