"""Geomagnetic latitude in the centred-dipole approximation, for the high-latitude caution.

The auroral zone and the polar cap, where absorption events the monthly
median predictions leave out can close HF for hours or days, are ordered
by geomagnetic latitude, not geographic.  A centred dipole places them to
within a few degrees, which is all a caution needs.
"""

from __future__ import annotations

import numpy as np

#: North geomagnetic (dipole) pole of IGRF-13 for epoch 2025 [deg] (from memory, within about 0.3 deg).
DIPOLE_POLE_LAT_DEG = 80.8
DIPOLE_POLE_LON_DEG = -72.7

#: Geomagnetic latitude from which a site lies in or under the auroral zone, the band where
#: auroral absorption strikes on disturbed nights and mornings [deg] (from memory: the auroral oval's
#: equatorward edge lies near 65 deg in quiet times and moves to 60 deg and below in moderate storms).
AURORAL_ZONE_FROM_DEG = 60.0
#: Geomagnetic latitude from which a site lies in the polar cap, where polar-cap absorption follows
#: solar proton events and can last days [deg] (from memory).
POLAR_CAP_FROM_DEG = 75.0


def dipole_latitude_deg(lat_deg, lon_deg):
    """Geomagnetic latitude [deg] of geographic points, centred-dipole field.

    Parameters
    ----------
    lat_deg, lon_deg : float or array
        Geographic latitude and longitude [deg], north and east positive.

    Returns
    -------
    float or ndarray
        Geomagnetic latitude [deg], north positive.

    References
    ----------
    Spherical trigonometry on the dipole axis: sin(phi_m) = sin(phi) sin(phi_p)
    + cos(phi) cos(phi_p) cos(lambda - lambda_p), with (phi_p, lambda_p) the
    north geomagnetic pole (e.g. Davies, Ionospheric Radio, 1990, sec. 2.4;
    from memory).
    """
    phi = np.radians(lat_deg)
    phi_p = np.radians(DIPOLE_POLE_LAT_DEG)
    dlon = np.radians(np.asarray(lon_deg, float) - DIPOLE_POLE_LON_DEG)
    s = np.sin(phi) * np.sin(phi_p) + np.cos(phi) * np.cos(phi_p) * np.cos(dlon)
    out = np.degrees(np.arcsin(np.clip(s, -1.0, 1.0)))
    return float(out) if np.ndim(out) == 0 else out


def zone(geomagnetic_lat_deg: float) -> str | None:
    """'polar cap', 'auroral zone' or None for a geomagnetic latitude [deg]."""
    m = abs(geomagnetic_lat_deg)
    if m >= POLAR_CAP_FROM_DEG:
        return "polar cap"
    if m >= AURORAL_ZONE_FROM_DEG:
        return "auroral zone"
    return None
