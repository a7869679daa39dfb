"""Ground wave over a flat, homogeneous earth: Sommerfeld-Norton attenuation.

Valid where the earth's curvature does not matter, about d < 80 / f^(1/3) km
(f in MHz); beyond that this module reports the ground wave as absent
rather than overstate it (see :func:`flat_earth_limit_km`).
"""

from __future__ import annotations

import numpy as np
from scipy.special import wofz

#: Ground constants (relative permittivity [-], conductivity [S/m]).
#: ITU-R P.527-6, Figure 1 / Table 1 at HF.
GROUND_CONSTANTS = {
    "sea": (70.0, 5.0),
    "fresh_water": (80.0, 0.003),
    "wet_ground": (30.0, 0.01),
    "medium_dry_ground": (15.0, 0.001),
    "very_dry_ground": (3.0, 0.0001),
    "ice": (3.0, 0.00003),
}

#: Gain credited to an antenna for the ground wave when nothing better is
#: known [dBi]: a short monopole on perfectly conducting ground (directivity
#: 3, the 300 mV/m at 1 km for 1 kW of ITU-R P.368).
SHORT_MONOPOLE_GAIN_DBI = 10.0 * np.log10(3.0)


def complex_permittivity(eps_r, sigma_s_m, freq_mhz):
    """Complex relative permittivity of the ground.

    Parameters
    ----------
    eps_r : array_like
        Relative permittivity [-].
    sigma_s_m : array_like
        Conductivity [S/m].
    freq_mhz : array_like
        Frequency [MHz].

    Returns
    -------
    ndarray of complex
        εc = εr − j 60 σ λ = εr − j 18000 σ / f [-].

    References
    ----------
    ITU-R P.527-6 §2 (ε' − j60σλ), time dependence e^{jωt}.
    """
    # P.527: εc = εr − j60σλ, λ = 300/f m
    return np.asarray(eps_r, float) - 1j * 18000.0 * np.asarray(sigma_s_m, float) / np.asarray(freq_mhz, float)


def numerical_distance(distance_km, freq_mhz, eps_r, sigma_s_m, vertical):
    """Sommerfeld-Norton complex numerical distance w.

    Parameters
    ----------
    distance_km : array_like
        Ground distance [km].
    freq_mhz : array_like
        Frequency [MHz].
    eps_r, sigma_s_m : array_like
        Ground relative permittivity [-] and conductivity [S/m].
    vertical : array_like of bool
        True for vertical polarisation, False for horizontal.

    Returns
    -------
    ndarray of complex
        w = |w| e^{−jb} [-]; vertical: w = −j (πd/λ)(εc − 1)/εc²;
        horizontal: w = (πd/λ)(x − j(εr − 1)) with x = 60σλ, whose modulus
        and phase are Terman's p = (πd/λ) x / cos b and b = atan((εr − 1)/x).

    References
    ----------
    K. A. Norton, "The propagation of radio waves over the surface of the
    earth and in the upper atmosphere", Proc. IRE 24 (1936) 1367-1387 and
    25 (1937) 1203-1236; F. E. Terman, Radio Engineers' Handbook (1943)
    §10, numerical distance p and phase b (from memory).
    """
    d_m = np.asarray(distance_km, float) * 1000.0
    lam = 299.792458 / np.asarray(freq_mhz, float)
    k = np.pi * d_m / lam
    ec = complex_permittivity(eps_r, sigma_s_m, freq_mhz)
    w_v = -1j * k * (ec - 1.0) / ec**2                      # Norton, vertical
    x = 18000.0 * np.asarray(sigma_s_m, float) / np.asarray(freq_mhz, float)
    w_h = k * (x - 1j * (np.asarray(eps_r, float) - 1.0))   # Norton/Terman, horizontal
    return np.where(np.asarray(vertical, bool), w_v, w_h)


def norton_attenuation(w):
    """Sommerfeld-Norton flat-earth attenuation function F(w).

    Parameters
    ----------
    w : array_like of complex
        Numerical distance [-].

    Returns
    -------
    ndarray of complex
        F = 1 − j √(πw) e^{−w} erfc(j √w) [-]; |F| → 1 for small w and
        → 1/(2|w|) for large w.

    Notes
    -----
    e^{−w} erfc(j√w) = wofz(−√w), the Faddeeva function, which stays
    finite for large w where the naive product overflows.

    References
    ----------
    A. Sommerfeld, Ann. Phys. 28 (1909) 665; Norton (1936), eq. for the
    surface-wave attenuation factor; R. E. Collin, "Hertzian dipole radiating
    over a lossy earth or sea", IEEE Antennas Propag. Mag. 46(2) (2004) eq. (22).
    """
    w = np.asarray(w, complex)
    s = np.sqrt(w)
    # Norton/Sommerfeld attenuation via the Faddeeva function
    return 1.0 - 1j * np.sqrt(np.pi * w) * wofz(-s)


def flat_earth_limit_km(freq_mhz):
    """Distance up to which the flat-earth ground wave is adequate [km].

    Parameters
    ----------
    freq_mhz : array_like
        Frequency [MHz].

    Returns
    -------
    ndarray
        80 / f^(1/3) [km].

    References
    ----------
    Terman, Radio Engineers' Handbook (1943) §10 (flat-earth formula
    adequate to about 80/∛f km); common practice, from memory.
    """
    return 80.0 / np.cbrt(np.asarray(freq_mhz, float))


def ground_wave_loss_db(distance_km, freq_mhz, eps_r, sigma_s_m, vertical):
    """Basic transmission loss of the ground wave between ideal radiators.

    Parameters
    ----------
    distance_km : array_like
        Ground distance [km] (held at ≥ 0.1 km).
    freq_mhz : array_like
        Frequency [MHz].
    eps_r, sigma_s_m : array_like
        Ground constants [-], [S/m].
    vertical : array_like of bool
        Polarisation, True for vertical.

    Returns
    -------
    ndarray
        L = 32.45 + 20 log f + 20 log d − 20 log |F(w)| [dB], +inf beyond the
        flat-earth limit. Add the two antennas' ground-wave gains (a short
        monopole on perfect ground has 4.77 dBi) to get received power.

    References
    ----------
    ITU-R P.525-4 (free-space loss); Norton (1936), attenuation factor.
    """
    d = np.maximum(np.asarray(distance_km, float), 0.1)
    f = np.asarray(freq_mhz, float)
    w = numerical_distance(d, f, eps_r, sigma_s_m, vertical)
    att_db = 20.0 * np.log10(np.maximum(np.abs(norton_attenuation(w)), 1e-30))
    loss = 32.45 + 20.0 * np.log10(f) + 20.0 * np.log10(d) - att_db
    return np.where(d <= flat_earth_limit_km(f), loss, np.inf)


def ground_wave_field_dbuv_m(power_w, gain_dbi, distance_km, freq_mhz, eps_r, sigma_s_m, vertical):
    """Ground-wave field strength at a distance.

    Parameters
    ----------
    power_w : array_like
        Power delivered to the antenna [W].
    gain_dbi : array_like
        Transmitting antenna's ground-wave gain [dBi] (4.77 dBi for a short
        monopole on perfect ground).
    distance_km, freq_mhz, eps_r, sigma_s_m, vertical
        As for :func:`ground_wave_loss_db`.

    Returns
    -------
    ndarray
        E = √(30 P G) / d · |F(w)|, in dB(µV/m).

    References
    ----------
    ITU-R P.368-9 §1 (reference 300 mV/m at 1 km for 1 kW from a short
    vertical monopole on perfect ground); Norton (1936).
    """
    d_m = np.maximum(np.asarray(distance_km, float), 0.1) * 1000.0
    g = 10.0 ** (np.asarray(gain_dbi, float) / 10.0)
    w = numerical_distance(distance_km, freq_mhz, eps_r, sigma_s_m, vertical)
    e_v_m = np.sqrt(30.0 * np.asarray(power_w, float) * g) / d_m * np.abs(norton_attenuation(w))
    return 20.0 * np.log10(e_v_m * 1e6)
