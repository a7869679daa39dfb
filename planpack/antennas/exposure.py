"""RF exposure: far-field distance to the 47 CFR 1.1310 power-density limits.

This is a far-field estimate only.  At HF the distances found are often
inside the reactive near field of the antenna (about lambda / 2 pi), where
power density is not a valid measure; it never replaces a proper
evaluation, local rules or the equipment's manuals.

References
----------
.. [1] 47 CFR 1.1310, Table 1, Limits for Maximum Permissible Exposure
   (MPE): (A) occupational/controlled, (B) general population/uncontrolled.
.. [2] FCC OET Bulletin 65 (1997), eq. (3): far-field power density
   S = P G / (4 pi R^2).  Its ground-reflection factor is not added here
   because the NEC gain over real ground already includes the reflection.
"""

from __future__ import annotations

import numpy as np


def mpe_limits_mw_cm2(freq_mhz) -> tuple[np.ndarray, np.ndarray]:
    """Power-density limits of 47 CFR 1.1310 Table 1 [mW/cm^2].

    Parameters
    ----------
    freq_mhz : array_like
        Frequency [MHz], 0.3 to 100 000.

    Returns
    -------
    (general_public, occupational) : arrays [mW/cm^2]

    Raises
    ------
    ValueError
        For a frequency outside the table.
    """
    f = np.asarray(freq_mhz, float)
    if np.any(~np.isfinite(f)) or np.any(f < 0.3) or np.any(f > 100_000.0):
        raise ValueError(f"freq_mhz: expected frequencies from 0.3 to 100000 MHz "
                         f"(47 CFR 1.1310 Table 1), got {freq_mhz!r}")
    # Table 1 (B) general population / uncontrolled exposure [1]
    gp = np.select(
        [f < 1.34, f < 30.0, f < 300.0, f < 1500.0],
        [100.0, 180.0 / f**2, 0.2, f / 1500.0],
        1.0,
    )
    # Table 1 (A) occupational / controlled exposure [1]
    occ = np.select(
        [f < 3.0, f < 30.0, f < 300.0, f < 1500.0],
        [100.0, 900.0 / f**2, 1.0, f / 300.0],
        5.0,
    )
    return gp, occ


def exposure_distance_m(power_w, peak_gain_dbi, duty_factor, freq_mhz
                        ) -> tuple[np.ndarray, np.ndarray]:
    """Minimum far-field distance to the 47 CFR 1.1310 limits [m].

    Solves S = P d G / (4 pi R^2) = S_limit for R ([2] eq. 3), vectorised
    (all arguments broadcast).

    Parameters
    ----------
    power_w : array_like
        Transmitter power delivered to the antenna [W].
    peak_gain_dbi : array_like
        Antenna peak gain [dBi].
    duty_factor : array_like
        Time-averaged fraction of full power the mode transmits over the
        averaging time (6 min occupational, 30 min general public) [0..1].
    freq_mhz : array_like
        Frequency [MHz].

    Returns
    -------
    (general_public_m, occupational_m) : arrays [m]
    """
    p = np.asarray(power_w, float)
    d = np.asarray(duty_factor, float)
    if np.any(p < 0) or np.any(~np.isfinite(p)):
        raise ValueError(f"power_w: expected a power of 0 W or more, got {power_w!r}")
    if np.any(d < 0) or np.any(d > 1) or np.any(~np.isfinite(d)):
        raise ValueError(f"duty_factor: expected a fraction from 0 to 1, got {duty_factor!r}")
    gain = 10.0 ** (np.asarray(peak_gain_dbi, float) / 10.0)
    gp, occ = mpe_limits_mw_cm2(freq_mhz)
    eirp_avg_w = p * d * gain
    # 1 mW/cm^2 = 10 W/m^2
    r_gp = np.sqrt(eirp_avg_w / (4.0 * np.pi * gp * 10.0))  # [2] eq. 3
    r_occ = np.sqrt(eirp_avg_w / (4.0 * np.pi * occ * 10.0))
    return r_gp, r_occ
