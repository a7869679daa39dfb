"""Ground electrical constants and the whip's ground-system loss model.

References
----------
.. [1] ITU-R P.527-6, "Electrical characteristics of the surface of the
   Earth" (2021), the HF values of its curves as used in the P.368 ground-wave
   work: sea 70 / 5 S/m, fresh water 80 / 3e-3, wet ground 30 / 1e-2, medium
   dry 15 / 1e-3, very dry 3 / 1e-4, ice 3 / 3e-5.  Treated as constant
   across 1-30 MHz (the curves are nearly flat there).
.. [2] G. H. Brown, R. F. Lewis, J. Epstein, "Ground systems as a factor in
   antenna efficiency", Proc. IRE 25(6), 753-787, 1937: ground loss of a
   ground-mounted vertical falls steeply with the number and length of
   radials.
.. [4] Plane-wave (Fresnel) reflection coefficient of a lossy half space
   for vertical polarisation, with the complex relative permittivity
   eps_c = eps_r - j sigma / (omega eps_0) = eps_r - j 60 lambda sigma;
   e.g. Balanis, Antenna Theory, the section on ground effects (from memory).
.. [3] J. Sevick, "Short ground-radial systems for short verticals", QST,
   April 1978: measured input resistance of short verticals over a single
   rod and over few short radials.
"""

from __future__ import annotations

import numpy as np

# ITU-R P.527 HF constants [1]: soil -> (relative permittivity, conductivity [S/m]).
SOIL_CONSTANTS: dict[str, tuple[float, float]] = {
    "sea": (70.0, 5.0),
    "fresh-water": (80.0, 3e-3),
    "wet": (30.0, 1e-2),
    "medium-dry": (15.0, 1e-3),
    "very-dry": (3.0, 1e-4),
    "ice": (3.0, 3e-5),
}

# Whip ground-system loss: a series resistance at the base [ohm].
# Values from memory, of the order of the measurements in [2] and [3]: a single
# driven rod or stake leaves tens of ohms in the return path; a counterpoise
# laid on the ground or a few short radials cut it to roughly a third or a
# fifth of that; no ground system at all (the set's case and the operator)
# is worse than a rod.  On sea water the return path is nearly lossless
# whatever the system (common practice, no source).
GROUND_LOSS_OHM: dict[str, float] = {
    "none": 60.0,
    "rods": 35.0,
    "counterpoise": 15.0,
    "radials": 8.0,
}
SEA_GROUND_LOSS_OHM = 2.0

GROUND_LOSS_MODEL = (
    "Short-vertical efficiency model: the power the whip accepts at its base divides between R, the "
    "NEC feed resistance of the whip over the P.527 ground (radiation resistance and copper loss), "
    "and R_ground, a series ground-system loss resistance (none 60, rods 35, counterpoise 15, radials "
    "8 ohm; 2 ohm on sea water; from memory, of the order measured by Brown, Lewis and Epstein, "
    "Proc. IRE 25(6), 1937, and Sevick, QST April 1978): the ground loss is 10 log10((R + R_ground) / R) "
    "dB.  The coupler or tuner that matches R + R_ground + jX is a lossy L-network (see the matching "
    "model).  NEC solves the whip's currents as if its base were bonded to a perfect ground, and its "
    "far field is weighted by the P.527 soil's reflection for vertical polarisation; the loss in the "
    "soil near the base is the ground-system term, because NEC-2 cannot model stakes or radials in the "
    "soil."
)


def nec_ground_args(soil: str) -> tuple[int, float, float]:
    """NEC GN card parameters for a soil.

    Parameters
    ----------
    soil : str
        A P.527 soil name, or 'perfect' / 'free-space'.

    Returns
    -------
    (ground_type, eps_r, sigma) : NEC ground type (-1 free space, 1 perfect,
        2 Sommerfeld-Norton), relative permittivity [1], conductivity [S/m].
    """
    if soil == "free-space":
        return -1, 0.0, 0.0
    if soil == "perfect":
        return 1, 0.0, 0.0
    eps_r, sigma = SOIL_CONSTANTS[soil]
    return 2, eps_r, sigma


def ground_loss_ohm(soil: str, system: str) -> float:
    """Series ground-system loss resistance of a ground-mounted whip [ohm].

    See the module references; values are from memory (see GROUND_LOSS_MODEL).
    """
    if soil in ("perfect", "free-space"):
        return 0.0
    if soil == "sea":
        return SEA_GROUND_LOSS_OHM
    return GROUND_LOSS_OHM[system]


def vertical_reflection(elevation_rad, eps_r: float, sigma_s_per_m: float,
                        freq_khz: float) -> np.ndarray:
    """Plane-wave reflection coefficient of the ground, vertical polarisation [1].

    Parameters
    ----------
    elevation_rad : array
        Grazing (elevation) angle [rad].
    eps_r : float
        Relative permittivity [1].
    sigma_s_per_m : float
        Conductivity [S/m].
    freq_khz : float
        Frequency [kHz].

    Returns
    -------
    complex array, R_v = (eps_c sin(psi) - sqrt(eps_c - cos^2 psi)) /
    (eps_c sin(psi) + sqrt(eps_c - cos^2 psi))   [4]
    """
    lam = 299_792_458.0 / (freq_khz * 1e3)
    eps_c = eps_r - 1j * 60.0 * lam * sigma_s_per_m  # [4]
    psi = np.asarray(elevation_rad, float)
    root = np.sqrt(eps_c - np.cos(psi) ** 2)
    return (eps_c * np.sin(psi) - root) / (eps_c * np.sin(psi) + root)  # [4]
