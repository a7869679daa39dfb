"""The one frequency grid over the HF band that antennas and predictions share.

Antennas are solved on it and the link budget is evaluated on it, so that
the LUF, a usable window and every gap's window say what each station's own
antennas can do on frequencies that are not yet assigned.  A log grid: the
quantities that vary along it (antenna impedance, absorption, noise) vary
smoothly in log f.
"""

from __future__ import annotations

import numpy as np

#: Lowest and highest grid frequency [kHz].
GRID_LOW_KHZ = 1500.0
GRID_HIGH_KHZ = 30000.0
#: Number of grid points: 41 gives steps of 7.8 % (20^(1/40)).
GRID_POINTS = 41

#: The grid [kHz], ascending, read-only.
GRID_KHZ = np.geomspace(GRID_LOW_KHZ, GRID_HIGH_KHZ, GRID_POINTS)
GRID_KHZ.flags.writeable = False

#: The same grid [MHz].
GRID_MHZ = GRID_KHZ / 1000.0
GRID_MHZ.flags.writeable = False


def grid_khz() -> tuple[float, ...]:
    """The grid as a hashable tuple of frequencies [kHz], rounded to 0.001 kHz."""
    return tuple(round(float(f), 3) for f in GRID_KHZ)
