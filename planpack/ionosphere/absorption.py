"""Sky-wave losses: free space, D-layer absorption, above-MUF, ground, catch-all.

All losses are positive numbers of decibels; frequencies in MHz.
"""

from __future__ import annotations

import numpy as np

#: Catch-all loss for sky-wave effects the method does not otherwise
#: include [dB] (ITU-R P.533-14 §5.2.1, Lz; value from memory).
LZ_DB = 8.72

#: Loss at each ground reflection between hops [dB] (ITU-R P.533-14 §5.2.1, Lg).
GROUND_REFLECTION_LOSS_DB = 2.0

#: Largest solar zenith angle the absorption index follows [deg]; beyond it
#: the night value holds (CCIR Report 252-2 / P.533 §5.2.1 limit χ ≤ 102°).
CHI_LIMIT_DEG = 102.0

#: Night floor of the solar-zenith factor [-] (ITU-R P.533-14 eq. 20 note:
#: F(χ) is cos^p(0.881χ) or 0.02, whichever is greater; from memory).
CHI_FACTOR_FLOOR = 0.02


def free_space_loss_db(freq_mhz, slant_km):
    """Basic free-space loss over a slant path.

    Parameters
    ----------
    freq_mhz : array_like
        Frequency [MHz].
    slant_km : array_like
        Ray path length [km].

    Returns
    -------
    ndarray
        Lbf = 32.45 + 20 log10 f + 20 log10 p' [dB].

    References
    ----------
    ITU-R P.533-14 §5.2.1 eq. (18)-(19) (the free-space term of Lb);
    ITU-R P.525-4 eq. (4).
    """
    # P.533 eq. 19, free-space term
    return 32.45 + 20.0 * np.log10(freq_mhz) + 20.0 * np.log10(np.maximum(slant_km, 1e-3))


def absorption_index(solar_zenith_deg, r12):
    """Ionospheric absorption index I at a D-layer crossing [-].

    Parameters
    ----------
    solar_zenith_deg : array_like
        Solar zenith angle at the crossing [deg].
    r12 : float
        12-month smoothed sunspot number [-].

    Returns
    -------
    ndarray
        I = (1 + 0.0037 R12) · max(cos^1.3(0.881χ), 0.02), χ held at 102°.

    References
    ----------
    P. L. George and P. A. Bradley, "A new method of predicting the
    ionospheric absorption of high frequency waves at oblique incidence",
    Telecommun. J. 41 (1974) 307-312; CCIR Report 252-2 supplement (1978).
    Coefficients from memory. Night floor as ITU-R P.533-14 eq. (20).
    """
    chi = np.minimum(np.asarray(solar_zenith_deg, float), CHI_LIMIT_DEG)
    cos_term = np.cos(np.deg2rad(0.881 * chi))
    factor = np.maximum(np.clip(cos_term, 0.0, 1.0) ** 1.3, CHI_FACTOR_FLOOR)
    return (1.0 + 0.0037 * float(r12)) * factor


def absorption_frequency_factor(freq_mhz, fH_mhz):
    """Frequency term of the non-deviative D-layer absorption [-].

    Parameters
    ----------
    freq_mhz : array_like
        Frequency [MHz].
    fH_mhz : array_like
        Electron gyrofrequency [MHz].

    Returns
    -------
    ndarray
        1 / ((f + fH)^1.98 + 10.2) [MHz^-1.98].

    References
    ----------
    George & Bradley (1974), eq. (1); see :func:`d_layer_absorption_db`.
    """
    f = np.asarray(freq_mhz, float) + np.asarray(fH_mhz, float)
    return 1.0 / (f**1.98 + 10.2)                       # George & Bradley eq. 1, denominator


def absorption_path_factor_db(solar_zenith_deg, r12, incidence_100km_deg, n_hops=1):
    """Path term of the non-deviative D-layer absorption [dB MHz^1.98].

    Parameters
    ----------
    solar_zenith_deg : array_like
        Solar zenith angle where the ray crosses the D layer [deg].
    r12 : float
        12-month smoothed sunspot number [-].
    incidence_100km_deg : array_like
        Angle of incidence of the ray at 100 km [deg].
    n_hops : array_like
        Number of hops [-].

    Returns
    -------
    ndarray
        n · 677.2 · sec i100 · I(χ, R12); times
        :func:`absorption_frequency_factor` it gives the loss [dB].

    References
    ----------
    George & Bradley (1974), eq. (1); see :func:`d_layer_absorption_db`.
    """
    sec_i = 1.0 / np.cos(np.deg2rad(incidence_100km_deg))
    return np.asarray(n_hops) * 677.2 * sec_i * absorption_index(solar_zenith_deg, r12)


def d_layer_absorption_db(freq_mhz, fH_mhz, solar_zenith_deg, r12, incidence_100km_deg, n_hops=1):
    """Non-deviative D-layer absorption of a sky-wave mode.

    Parameters
    ----------
    freq_mhz : array_like
        Frequency [MHz].
    fH_mhz : array_like
        Electron gyrofrequency [MHz].
    solar_zenith_deg : array_like
        Solar zenith angle where the ray crosses the D layer [deg].
    r12 : float
        12-month smoothed sunspot number [-].
    incidence_100km_deg : array_like
        Angle of incidence of the ray at 100 km [deg].
    n_hops : array_like
        Number of hops (each crosses the D layer twice) [-].

    Returns
    -------
    ndarray
        Li = n · 677.2 · sec i100 · I / ((f + fH)^1.98 + 10.2) [dB].

    Notes
    -----
    The loss is a path term (geometry, sun, solar cycle) times a frequency
    term; the link budget uses the two factors separately so that the path
    term is computed once per sample time and the frequency term once per
    frequency.

    References
    ----------
    George & Bradley (1974), eq. (1); CCIR Report 252-2 (the absorption
    formula that preceded ITU-R P.533 eq. 20). Coefficients from memory.
    """
    # George & Bradley (1974) eq. 1, per hop (down and up through D)
    return (absorption_path_factor_db(solar_zenith_deg, r12, incidence_100km_deg, n_hops)
            * absorption_frequency_factor(freq_mhz, fH_mhz))


def above_muf_loss_db(freq_mhz, basic_muf_mhz, layer):
    """Median loss of a mode used above its basic MUF.

    Parameters
    ----------
    freq_mhz : array_like
        Frequency [MHz].
    basic_muf_mhz : array_like
        Basic MUF of the mode [MHz].
    layer : {"E", "F2"}
        Which layer the mode reflects from.

    Returns
    -------
    ndarray
        Lm [dB]: 0 at or below the MUF; above it 130 (f/fb − 1)² for E
        modes and 36 (f/fb − 1)^½ for F2 modes.

    References
    ----------
    ITU-R P.533-14 §5.2.1, eqs. (24)-(25) (from memory).
    """
    with np.errstate(divide="ignore", invalid="ignore"):
        excess = np.maximum(np.asarray(freq_mhz, float) / np.asarray(basic_muf_mhz, float) - 1.0, 0.0)
    excess = np.where(np.isfinite(excess), excess, 1e3)
    if layer == "E":
        return 130.0 * excess**2                 # P.533 eq. 24
    if layer == "F2":
        return 36.0 * np.sqrt(excess)            # P.533 eq. 25
    raise ValueError(f"layer must be 'E' or 'F2', got {layer!r}")


def ground_reflection_loss_db(n_hops):
    """Loss at the ground reflections between hops [dB].

    Parameters
    ----------
    n_hops : array_like
        Number of hops [-].

    Returns
    -------
    ndarray
        Lg = 2 (n − 1) [dB].

    References
    ----------
    ITU-R P.533-14 §5.2.1 (Lg, 2 dB per intermediate reflection).
    """
    return GROUND_REFLECTION_LOSS_DB * (np.asarray(n_hops, float) - 1.0)
