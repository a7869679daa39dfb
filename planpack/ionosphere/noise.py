"""External radio noise at the receiver: man-made and galactic (ITU-R P.372).

Noise figures Fa are in dB above kT0b (T0 = 288 K); frequencies in MHz.
Atmospheric (lightning) noise is not modelled: P.372's world maps of
Fam(1 MHz) by season and time block are published only as figures and
numerical coefficients that this package does not carry. A plan states any
extra local noise as a per-station margin, which is added to the total.
"""

from __future__ import annotations

import dataclasses

import numpy as np


@dataclasses.dataclass(frozen=True)
class NoiseCategory:
    """One P.372 environment: median Fam = c − d log10 f and its deciles.

    Attributes
    ----------
    c_db, d : float
        Coefficients of the median noise figure [dB], [dB/decade].
    upper_decile_db, lower_decile_db : float
        Day-to-day deviation of the upper and lower decile from the median [dB].
    """

    c_db: float
    d: float
    upper_decile_db: float
    lower_decile_db: float


#: ITU-R P.372-16 §6, Table 1 (c, d, valid 0.3-250 MHz) and Table 2
#: (decile deviations, 0.3-30 MHz). The deciles are from memory; P.372 gives
#: none for quiet rural, for which the rural values are used (cautious).
#: Galactic deciles ±2 dB as P.533-14 §8 uses them (from memory).
CATEGORIES = {
    "city": NoiseCategory(76.8, 27.7, 11.0, 6.7),
    "residential": NoiseCategory(72.5, 27.7, 10.6, 5.3),
    "rural": NoiseCategory(67.2, 27.7, 9.2, 4.6),
    "quiet_rural": NoiseCategory(53.6, 28.6, 9.2, 4.6),
    "galactic": NoiseCategory(52.0, 23.0, 2.0, 2.0),
}

#: Boltzmann's constant times T0 = 288 K, per hertz, in dBW (P.372 §2).
KT0_DBW_HZ = -204.0


def man_made_noise_db(freq_mhz, c_db, d):
    """Median man-made noise figure.

    Parameters
    ----------
    freq_mhz : array_like
        Frequency [MHz].
    c_db, d : array_like
        Coefficients of the environment [dB], [dB/decade].

    Returns
    -------
    ndarray
        Fam = c − d log10 f [dB above kT0b].

    References
    ----------
    ITU-R P.372-16 §6, Table 1 (Fam = c − d log f).
    """
    # P.372 §6 Table 1
    return np.asarray(c_db, float) - np.asarray(d, float) * np.log10(freq_mhz)


def galactic_noise_db(freq_mhz, foF2_mhz=None):
    """Median galactic noise figure, screened below the overhead foF2.

    Parameters
    ----------
    freq_mhz : array_like
        Frequency [MHz].
    foF2_mhz : array_like, optional
        F2 critical frequency over the receiver [MHz]; below it galactic
        noise does not reach the ground.

    Returns
    -------
    ndarray
        Fa = 52 − 23 log10 f [dB above kT0b], −inf where screened.

    References
    ----------
    ITU-R P.372-16 §6, Table 1 (galactic) and §5 (galactic noise reaches
    the ground only at frequencies above foF2).
    """
    fa = 52.0 - 23.0 * np.log10(freq_mhz)            # P.372 Table 1, galactic
    if foF2_mhz is None:
        return fa
    return np.where(np.asarray(freq_mhz) > np.asarray(foF2_mhz), fa, -np.inf)


def combine_noise_db(*fa_db):
    """Total of independent noise sources, summed as powers [dB].

    Parameters
    ----------
    *fa_db : array_like
        Noise figures of each source [dB above kT0b]; −inf for absent.

    Returns
    -------
    ndarray
        10 log10 Σ 10^(Fa/10) [dB above kT0b].

    References
    ----------
    ITU-R P.372-16 §9 (combination of noise from several sources, medians).
    """
    total = sum(np.power(10.0, np.asarray(f, float) / 10.0) for f in fa_db)
    with np.errstate(divide="ignore"):
        return 10.0 * np.log10(total)


def noise_power_dbw(fa_db, bandwidth_hz):
    """Noise power in a receiver bandwidth.

    Parameters
    ----------
    fa_db : array_like
        External noise figure [dB above kT0b].
    bandwidth_hz : array_like
        Receiver noise bandwidth [Hz].

    Returns
    -------
    ndarray
        Pn = Fa + 10 log10 b − 204 [dBW].

    References
    ----------
    ITU-R P.372-16 §2 (Pn = Fa + B − 204 dBW, B = 10 log10 b).
    """
    # P.372 §2, Pn = Fa + B − 204
    return np.asarray(fa_db, float) + 10.0 * np.log10(bandwidth_hz) + KT0_DBW_HZ


def man_made_deciles_db(c_db):
    """Decile deviations for the P.372 environment whose c is nearest.

    Parameters
    ----------
    c_db : array_like
        Man-made noise coefficient c of the receiver's environment [dB].

    Returns
    -------
    upper_db, lower_db : ndarray
        Upper and lower decile deviations from the median [dB].

    References
    ----------
    ITU-R P.372-16 Table 2 (see :data:`CATEGORIES`).
    """
    cats = [CATEGORIES[k] for k in ("city", "residential", "rural", "quiet_rural")]
    cs = np.array([k.c_db for k in cats])
    idx = np.argmin(np.abs(np.asarray(c_db, float)[..., None] - cs), axis=-1)
    return (np.array([k.upper_decile_db for k in cats])[idx],
            np.array([k.lower_decile_db for k in cats])[idx])
