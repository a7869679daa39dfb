"""Maximum usable frequencies, reflection height, OWF and the P.1239 foE.

All frequencies in MHz, distances in km.
"""

from __future__ import annotations

import numpy as np
from scipy.special import ndtr

from .geodesy import E_LAYER_HEIGHT_KM, MAX_HOP_F2_KM, elevation_angle_deg, incidence_angle_deg

#: Ratios of the lower and upper decile of the day-to-day MUF to its monthly
#: median. F2: 0.85 / 1.15, the fixed ratios long used for the optimum
#: working frequency (the "FOT" = 0.85 MUF; ITU-R P.1239 Table 1 ranges
#: about 0.8-0.9; fixed ratio from memory). E: 0.95 / 1.05 (ITU-R P.1239
#: §4, E-layer MUF deciles ±5 %; from memory).
F2_LOWER_DECILE_RATIO = 0.85
F2_UPPER_DECILE_RATIO = 1.15
E_LOWER_DECILE_RATIO = 0.95
E_UPPER_DECILE_RATIO = 1.05

#: z of the 90th percentile of the standard normal [-].
Z90 = 1.2815515655446004


def reflection_height_km(m3000f2):
    """Mirror reflection height of the F2 layer [km].

    Parameters
    ----------
    m3000f2 : array_like
        M(3000)F2 propagation factor [-].

    Returns
    -------
    ndarray
        hr = 1490 / M(3000)F2 − 176 [km], held within 200..500 km.

    References
    ----------
    ITU-R P.533-14 §5.1 (ray-path geometry): hr = 1490/M(3000)F2 − 176 km,
    limited to 500 km (the 200 km floor is this module's guard).
    """
    m = np.asarray(m3000f2, float)
    # P.533 §5.1 mirror-height formula
    return np.clip(1490.0 / m - 176.0, 200.0, 500.0)


def _b_factor(m3000f2, x):
    # P.1240 eq. (3) / P.533 §3.5: B
    return m3000f2 - 0.124 + (m3000f2**2 - 4.0) * (0.0215 + 0.005 * np.sin(7.854 / x - 1.9635))


def _dmax_km(b, x):
    # P.1240 eq. (4) / P.533 §3.5: dmax, limited to 4000 km
    d = 4780.0 + (12610.0 + 2140.0 / x**2 - 49720.0 / x**4 + 688900.0 / x**6) * (1.0 / b - 0.303)
    return np.minimum(d, MAX_HOP_F2_KM)


def _cd(z):
    # P.1240 eq. (2) / P.533 §3.5: Cd as a polynomial in Z = 1 − 2d/dmax
    return 0.74 + z * (-0.591 + z * (-0.424 + z * (-0.090 + z * (0.088 + z * (0.181 + z * 0.096)))))


def f2_basic_muf_mhz(hop_km, foF2_mhz, m3000f2, foE_mhz, fH_mhz):
    """Basic MUF of a one-hop F2 mode over a hop length.

    Parameters
    ----------
    hop_km : array_like
        Ground length of the hop [km]; hops longer than dmax use dmax.
    foF2_mhz : array_like
        F2 critical frequency at the control point [MHz].
    m3000f2 : array_like
        M(3000)F2 propagation factor [-].
    foE_mhz : array_like
        E critical frequency at the control point [MHz].
    fH_mhz : array_like
        Electron gyrofrequency at 300 km [MHz].

    Returns
    -------
    ndarray
        F2(d)MUF [MHz]; foF2 + fH/2 at vertical incidence.

    References
    ----------
    ITU-R P.1240-2 Annex 1 §3.1 eqs. (1)-(5); ITU-R P.533-14 §3.5:
    F2(D)MUF = [1 + (Cd/C3000)(B − 1)] foF2 + (fH/2)(1 − d/dmax), with
    x = foF2/foE (not less than 2), B, dmax (≤ 4000 km), Cd(Z = 1 − 2d/dmax)
    and C3000 = Cd at d = 3000 km.
    """
    fof2 = np.asarray(foF2_mhz, float)
    m = np.asarray(m3000f2, float)
    with np.errstate(divide="ignore", invalid="ignore"):
        x = np.maximum(np.where(foE_mhz > 0, fof2 / np.asarray(foE_mhz, float), 2.0), 2.0)
    b = _b_factor(m, x)                                   # P.1240 eq. 3
    dmax = _dmax_km(b, x)                                 # P.1240 eq. 4
    d = np.minimum(np.asarray(hop_km, float), dmax)
    cd = _cd(1.0 - 2.0 * d / dmax)                        # P.1240 eq. 2
    c3000 = _cd(1.0 - 2.0 * 3000.0 / dmax)                # P.1240 eq. 2 at 3000 km
    # P.1240 eq. 1
    return (1.0 + (cd / c3000) * (b - 1.0)) * fof2 + 0.5 * np.asarray(fH_mhz, float) * (1.0 - d / dmax)


def e_basic_muf_mhz(hop_km, foE_mhz):
    """Basic MUF of a one-hop E mode [MHz].

    Parameters
    ----------
    hop_km : array_like
        Ground length of the hop [km], up to 2000 km.
    foE_mhz : array_like
        E critical frequency at the control point [MHz].

    Returns
    -------
    ndarray
        E(d)MUF = foE · sec i110 [MHz].

    References
    ----------
    ITU-R P.1240-2 Annex 1 §5.1; ITU-R P.533-14 §3.3: E(D)MUF = foE sec i110,
    i110 the angle of incidence at the mid-hop height of 110 km.
    """
    elev = elevation_angle_deg(hop_km, E_LAYER_HEIGHT_KM)
    i110 = np.deg2rad(incidence_angle_deg(elev, E_LAYER_HEIGHT_KM))
    # P.533 §3.3 secant law
    return np.asarray(foE_mhz, float) / np.cos(i110)


def e_screening_frequency_mhz(elevation_f2_deg, foE_mhz):
    """Frequency below which the E layer screens an F2 mode [MHz].

    Parameters
    ----------
    elevation_f2_deg : array_like
        Elevation angle of the F2 ray [deg].
    foE_mhz : array_like
        E critical frequency [MHz].

    Returns
    -------
    ndarray
        fs = 1.05 foE sec i, i the F2 ray's incidence at 110 km [MHz].

    References
    ----------
    ITU-R P.533-14 §4 (E-layer maximum screening frequency), eq. (6); from
    memory.
    """
    i = np.deg2rad(incidence_angle_deg(elevation_f2_deg, E_LAYER_HEIGHT_KM))
    # P.533 §4 eq. 6
    return 1.05 * np.asarray(foE_mhz, float) / np.cos(i)


def owf_mhz(muf_mhz, lower_decile_ratio=F2_LOWER_DECILE_RATIO):
    """Optimum working frequency: the lower decile of the day-to-day MUF.

    Parameters
    ----------
    muf_mhz : array_like
        Monthly median (basic) MUF [MHz].
    lower_decile_ratio : float
        Lower-decile to median ratio [-].

    Returns
    -------
    ndarray
        OWF, exceeded by the MUF on 90 % of days [MHz].

    References
    ----------
    ITU-R P.373-10 (definition of the OWF as the frequency the operational
    MUF exceeds 90 % of the time); ratio as in :data:`F2_LOWER_DECILE_RATIO`.
    """
    return np.asarray(muf_mhz, float) * lower_decile_ratio


def muf_exceedance_probability(freq_mhz, muf_mhz, lower_ratio=F2_LOWER_DECILE_RATIO,
                               upper_ratio=F2_UPPER_DECILE_RATIO):
    """Fraction of days in the month the MUF is above a frequency [-].

    Parameters
    ----------
    freq_mhz : array_like
        Operating frequency [MHz].
    muf_mhz : array_like
        Monthly median MUF [MHz].
    lower_ratio, upper_ratio : float
        Lower and upper decile of the MUF relative to its median [-].

    Returns
    -------
    ndarray
        Probability 0..1; 0.5 at the median MUF, 0.9 at the lower decile.

    Notes
    -----
    The day-to-day MUF is taken as two half-normal distributions joined at
    the median, one fitted to each decile: the usual reading of the P.1239
    deciles (P.533 §10 does the same for signal and noise).

    References
    ----------
    ITU-R P.1239-3 §4 (decile variability of foF2/MUF); ITU-R P.533-14 §10.
    """
    f = np.asarray(freq_mhz, float)
    muf = np.asarray(muf_mhz, float)
    with np.errstate(divide="ignore", invalid="ignore"):
        r = np.where(muf > 0, f / muf, np.inf)
    spread = np.where(r < 1.0, 1.0 - lower_ratio, upper_ratio - 1.0)
    z = Z90 * (r - 1.0) / spread
    return np.where(np.isfinite(z), ndtr(-z), 0.0)


def phi_from_r12(r12):
    """Monthly mean 10.7 cm solar flux from the sunspot number [sfu].

    Parameters
    ----------
    r12 : array_like
        12-month smoothed sunspot number [-].

    Returns
    -------
    ndarray
        Φ = 63.7 + 0.728 R12 + 0.00089 R12² [sfu].

    References
    ----------
    ITU-R P.1239-3 §2, eq. (1).
    """
    r = np.asarray(r12, float)
    return 63.7 + 0.728 * r + 0.00089 * r**2          # P.1239 eq. 1


def foE_p1239_mhz(lat_deg, solar_zenith_deg, declination_deg, phi_sfu):
    """Monthly median E-layer critical frequency by the ITU-R P.1239 formula.

    Parameters
    ----------
    lat_deg : array_like
        Geographic latitude [deg].
    solar_zenith_deg : array_like
        Solar zenith angle [deg].
    declination_deg : array_like
        Solar declination [deg] (the noon zenith angle is |lat − decl|).
    phi_sfu : array_like
        Monthly mean 10.7 cm solar flux Φ [sfu].

    Returns
    -------
    ndarray
        foE [MHz]; foE⁴ = A·B·C·D, never below the night floor.

    References
    ----------
    ITU-R P.1239-3 Annex 1 §3 (foE), eqs. (2)-(8) (coefficients as
    published; equation numbering from memory):
    A = 1 + 0.0094(Φ − 66); B = cos^m N, N = |lat − δ| (≤ 80°),
    m = −1.93 + 1.92 cos lat (|lat| < 32°) or 0.11 − 0.49 cos lat;
    C = X + Y cos lat, (X, Y) = (23, 116) (|lat| < 32°) or (92, 35);
    D = cos^p χ (χ ≤ 73°), cos^p(χ − δχ) with δχ = 6.27e-13 (χ − 50)^8
    (73° < χ < 90°), 0.072^p exp(25.2 − 0.28χ) (90° ≤ χ ≤ 117°),
    0.072^p exp(−7.56) (χ > 117°), p = 1.31 (|lat| ≤ 12°) or 1.2;
    night floor foE⁴ ≥ 0.004 (1 + 0.021Φ)².
    """
    lat = np.asarray(lat_deg, float)
    chi = np.asarray(solar_zenith_deg, float)
    phi = np.asarray(phi_sfu, float)
    coslat = np.cos(np.deg2rad(lat))
    low = np.abs(lat) < 32.0
    a = 1.0 + 0.0094 * (phi - 66.0)                                   # P.1239 solar factor A
    n = np.minimum(np.abs(lat - np.asarray(declination_deg, float)), 80.0)
    m = np.where(low, -1.93 + 1.92 * coslat, 0.11 - 0.49 * coslat)
    b = np.cos(np.deg2rad(n)) ** m                                    # seasonal factor B
    c = np.where(low, 23.0 + 116.0 * coslat, 92.0 + 35.0 * coslat)    # latitude factor C
    p = np.where(np.abs(lat) <= 12.0, 1.31, 1.2)
    dchi = 6.27e-13 * (chi - 50.0) ** 8
    with np.errstate(invalid="ignore"):
        d = np.where(chi <= 73.0, np.cos(np.deg2rad(np.minimum(chi, 73.0))) ** p,
             np.where(chi < 90.0, np.cos(np.deg2rad(np.clip(chi - dchi, 0.0, 89.99))) ** p,
             np.where(chi <= 117.0, 0.072**p * np.exp(25.2 - 0.28 * chi),
                      0.072**p * np.exp(-7.56))))                      # time-of-day factor D
    fo4 = np.maximum(a * b * c * d, 0.004 * (1.0 + 0.021 * phi) ** 2)  # night floor
    return fo4**0.25
