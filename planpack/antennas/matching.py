"""Feed-point match and feedline loss, vectorised over channels.

References
----------
.. [1] Standard transmission-line relations: reflection coefficient
   Gamma = (Z - Z0) / (Z + Z0), SWR = (1 + |Gamma|) / (1 - |Gamma|),
   mismatch loss = -10 log10(1 - |Gamma|^2).
.. [2] ARRL Antenna Book, chapter on transmission lines: total loss of a
   line with matched loss A and load reflection |Gamma| (from memory),
   L = 10 log10((a^2 - |Gamma|^2) / (a (1 - |Gamma|^2))), a = 10^(A/10).
"""

from __future__ import annotations

import numpy as np

SWR_CAP = 999.0
SWR_FINE_MAX = 2.0
SWR_TUNER_MAX = 3.0


def reflection(z_ohm: np.ndarray, z0_ohm: float, ratio: float = 1.0) -> np.ndarray:
    """Reflection coefficient at the feedline side of a transformer [1].

    Parameters
    ----------
    z_ohm : complex array
        Antenna feed impedance [ohm].
    z0_ohm : float
        Feedline characteristic impedance [ohm].
    ratio : float
        Impedance ratio of an ideal balun/transformer, antenna side over
        feedline side [1] (16 for a 16:1 transformer).
    """
    z = np.asarray(z_ohm, complex) / ratio
    return (z - z0_ohm) / (z + z0_ohm)  # [1]


def swr(gamma: np.ndarray) -> np.ndarray:
    """Standing-wave ratio from the reflection coefficient [1]; capped at 999."""
    m = np.minimum(np.abs(gamma), 1.0 - 1e-12)
    return np.minimum((1.0 + m) / (1.0 - m), SWR_CAP)  # [1]


def mismatch_loss_db(gamma: np.ndarray) -> np.ndarray:
    """Power not accepted by the load for lack of a match [dB, positive]."""
    m2 = np.minimum(np.abs(gamma) ** 2, 1.0 - 1e-12)
    return -10.0 * np.log10(1.0 - m2)  # [1]


def swr_class(swr_value: float) -> str:
    """'fine' up to 2:1, 'tuner' above 2:1 to 3:1, 'poor' above 3:1
    (common practice, no source)."""
    if swr_value <= SWR_FINE_MAX:
        return "fine"
    if swr_value <= SWR_TUNER_MAX:
        return "tuner"
    return "poor"


def matched_line_loss_db(freq_khz: np.ndarray, length_m: float,
                         db_per_100m_at_10mhz: float) -> np.ndarray:
    """Matched feedline loss [dB], scaled from the 10 MHz figure by sqrt(f).

    At HF the loss of coaxial cable is mostly conductor (skin-effect) loss,
    which grows as the square root of frequency; dielectric loss (linear in
    f) is small there.

    Parameters
    ----------
    freq_khz : array
        Frequency [kHz].
    length_m : float
        Line length [m].
    db_per_100m_at_10mhz : float
        Matched loss [dB / 100 m] at 10 MHz.
    """
    f = np.asarray(freq_khz, float)
    return db_per_100m_at_10mhz * (length_m / 100.0) * np.sqrt(f / 10_000.0)


def line_loss_with_swr_db(matched_db: np.ndarray, gamma_load: np.ndarray) -> np.ndarray:
    """Total loss of a line [dB] with a mismatched load, matched at the set
    end by a tuner (ARRL Antenna Book relation [2])."""
    a = 10.0 ** (np.asarray(matched_db, float) / 10.0)
    m2 = np.minimum(np.abs(gamma_load) ** 2, 1.0 - 1e-12)
    return 10.0 * np.log10((a * a - m2) / (a * (1.0 - m2)))  # [2]


#: How a station matches a wire antenna to its set, and what that costs.
#: (largest SWR it matches [-], where the match is made, its own loss [dB]).
#: Matching ranges and losses are typical figures (common practice, no source).
MATCHING = {
    "set-tuner": (SWR_TUNER_MAX, "set", 0.0),       # the set's built-in tuner
    "wide-tuner": (10.0, "set", 0.5),               # an external wide-range tuner at the set
    "feedpoint-coupler": (30.0, "feed", 1.0),       # an automatic coupler at the antenna's feed point
}


def system_loss_db(matching: str, swr_value, mismatch_db, matched_line_db, line_with_swr_db):
    """Loss between the set's output and the antenna's feed point [dB], per channel.

    Within the matching device's range the set sees a match: the loss is the
    device's own loss plus the feedline's (with the antenna's SWR on it when
    the match is made at the set; matched when it is made at the feed point).
    Outside it, nothing matches the antenna and the mismatch loss stands,
    as the antenna package computes it without a tuner.

    Parameters
    ----------
    matching : str
        A key of :data:`MATCHING`.
    swr_value, mismatch_db, matched_line_db, line_with_swr_db : array (c,)
        SWR [-], mismatch loss, matched feedline loss and feedline loss with
        that SWR [dB].

    Returns
    -------
    (loss_db, matched) : arrays (c,)
        Loss [dB] and whether the device matches the antenna on the channel.
    """
    max_swr, where, own_db = MATCHING[matching]
    swr_value = np.asarray(swr_value, float)
    matched = swr_value <= max_swr
    line = np.asarray(line_with_swr_db if where == "set" else matched_line_db, float)
    unmatched = np.asarray(mismatch_db, float) + np.asarray(matched_line_db, float)
    return np.where(matched, line + own_db, unmatched), matched
