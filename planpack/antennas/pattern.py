"""Reduce a NEC pattern to what the net needs: gain by elevation, peak,
zenith and the share of power that goes up steeply."""

from __future__ import annotations

import numpy as np

from .solver import NEC_FLOOR_DB, N_PHI

# Gain tables are floored here [dBi]: NEC gives -999.99 dB at the horizon
# over ground (the space wave vanishes there), which would swamp any sum.
GAIN_FLOOR_DBI = -40.0
ELEVATION_DEG = np.arange(91, dtype=float)

# Trapezoid weights over phi = 0..90 deg (step 15); by the quadrant symmetry
# of every model this is the average over the whole circle of azimuth.
_PHI_W = np.ones(N_PHI)
_PHI_W[[0, -1]] = 0.5
_PHI_W /= _PHI_W.sum()


def linear_gain(gain_dbi: np.ndarray) -> np.ndarray:
    """Power gain ratio from dBi, with NEC's floor mapped to zero."""
    g = np.asarray(gain_dbi, float)
    return np.where(g <= NEC_FLOOR_DB, 0.0, 10.0 ** (g / 10.0))


def to_db(ratio: np.ndarray, floor_dbi: float = GAIN_FLOOR_DBI) -> np.ndarray:
    return np.maximum(10.0 * np.log10(np.maximum(ratio, 1e-30)), floor_dbi)


def azimuth_average(gain_dbi: np.ndarray) -> np.ndarray:
    """Azimuth-averaged power gain by elevation.

    Parameters
    ----------
    gain_dbi : array (..., 91, 7)
        NEC gain [dBi] at theta 0..90 deg (rows) and phi 0..90 deg (columns).

    Returns
    -------
    array (..., 91)
        Mean power gain ratio [1] at elevation 0..90 deg (elevation = 90 - theta).
    """
    lin = linear_gain(gain_dbi) @ _PHI_W
    return lin[..., ::-1]


def fraction_above(avg_lin: np.ndarray, elevation_deg: float = 60.0) -> np.ndarray:
    """Share of the power radiated into the upper half space above an elevation.

    The integral of gain over solid angle, dOmega = cos(el) d(el) d(az), on
    the 1-degree elevation grid (trapezoid rule).

    Parameters
    ----------
    avg_lin : array (..., 91)
        Azimuth-averaged gain ratio at elevation 0..90 deg [1].
    elevation_deg : float
        Lower limit [deg].

    Returns
    -------
    array (...)
        Fraction [0..1].
    """
    el = np.radians(ELEVATION_DEG)
    w = avg_lin * np.cos(el)
    total = np.trapezoid(w, el, axis=-1)
    mask = ELEVATION_DEG >= elevation_deg
    part = np.trapezoid(w[..., mask], el[mask], axis=-1)
    return np.where(total > 0, part / np.where(total > 0, total, 1.0), 0.0)


def summary(gain_dbi: np.ndarray) -> dict[str, np.ndarray]:
    """Peak gain, zenith gain, fraction above 60 deg and the elevation table.

    Parameters
    ----------
    gain_dbi : array (n, 91, 7)
        NEC gain [dBi] per frequency.

    Returns
    -------
    dict with
        peak_gain_dbi : (n,) highest gain on the grid [dBi]
        zenith_gain_dbi : (n,) gain straight up [dBi]
        fraction_above_60deg : (n,) [0..1]
        table_dbi : (n, 91) azimuth-averaged gain at elevation 0..90 deg
            [dBi], floored at GAIN_FLOOR_DBI
    """
    g = np.asarray(gain_dbi, float)
    avg = azimuth_average(g)
    return {
        "peak_gain_dbi": np.maximum(g.reshape(g.shape[0], -1).max(axis=1), GAIN_FLOOR_DBI),
        "zenith_gain_dbi": to_db(linear_gain(g[:, 0, 0])),
        "fraction_above_60deg": fraction_above(avg, 60.0),
        "table_dbi": to_db(avg),
    }
