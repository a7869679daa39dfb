"""Ground wave over a smooth, round, homogeneous earth, and over mixed paths.

The attenuation function W relates the ground-wave field to the field of
the same short monopole over a flat, perfectly conducting plane
(E = E0 · |W|, E0 = 300 mV/m at 1 km for 1 kW):

* beyond a hand-over distance it is the residue series of the spherical
  earth (Fock, Wait, Bremmer), whose modes are the roots of Airy-function
  equations;
* inside it, the Sommerfeld-Norton flat-earth function F(p) with a
  curvature term ~x^(3/2) matched to the residue series at the hand-over,
  so the two meet with no step (the leading small-distance curvature term
  of Fock's theory is ∝ x^(3/2)).

The earth's radius is the 4/3 effective radius for a standard atmosphere
(6371 km × 4/3 = 8495 km), the refraction ITU-R P.368 folds into its curves.
Mixed land and sea paths use Millington's method (:func:`millington_loss_db`).
"""

from __future__ import annotations

import numpy as np
from scipy.special import airye, ai_zeros, wofz

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

#: Mean earth radius [km] and the effective-radius factor of a standard
#: atmosphere (ITU-R P.453 / P.834: k = 4/3 for a refractivity gradient of
#: −40 N/km near the ground), as the P.368 curves assume.
EARTH_RADIUS_KM = 6371.0
EFFECTIVE_RADIUS_FACTOR = 4.0 / 3.0
EFFECTIVE_EARTH_RADIUS_KM = EARTH_RADIUS_KM * EFFECTIVE_RADIUS_FACTOR

#: Normalised distance x at which the residue series takes over from the
#: curvature-corrected flat-earth function [-]. At x = 0.5 the series needs
#: under 100 modes for 1e-10 accuracy; 0.5 is 76 km at 2 MHz, 31 km at 30 MHz.
HANDOVER_X = 0.5

#: Modes kept at most in the residue series [-].
MAX_MODES = 100

#: A mode is dropped once it is this many nepers below the first one,
#: x · (|Im t_s| − |Im t_1|) [-] (e^−16 ≈ 1e−7); |Im t_1| ≥ 0.88 for any ground.
_MODE_CUTOFF = 16.0
_IM_T1_FLOOR = 0.8

_C = np.exp(-2j * np.pi / 3)          # w(t) = Ai(t e^{−j2π/3}) satisfies w'' = t w
_RAY = np.exp(-1j * np.pi / 3)        # the roots lie near this ray


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


def surface_impedance(eps_r, sigma_s_m, freq_mhz, vertical):
    """Normalised surface impedance Δ of the ground for each polarisation.

    Parameters
    ----------
    eps_r, sigma_s_m : array_like
        Ground relative permittivity [-] and conductivity [S/m].
    freq_mhz : array_like
        Frequency [MHz].
    vertical : array_like of bool
        True for vertical polarisation, False for horizontal.

    Returns
    -------
    ndarray of complex
        Vertical: Δ = √(εc − 1)/εc; horizontal: Δ = √(εc − 1) [-]
        (small Δ: the ground wave travels well).

    References
    ----------
    J. R. Wait, "Electromagnetic Waves in Stratified Media" (1962) §VIII;
    R. H. Ott, "An alternative integral equation for propagation over
    irregular terrain", Radio Sci. 6 (1971), for the same Δ.
    """
    ec = complex_permittivity(eps_r, sigma_s_m, freq_mhz)
    root = np.sqrt(ec - 1.0)
    return np.where(np.asarray(vertical, bool), root / ec, root)


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


def curvature_parameters(freq_mhz, eps_r, sigma_s_m, vertical, radius_km=EFFECTIVE_EARTH_RADIUS_KM):
    """Fock's scale m = (ka/2)^(1/3) and the surface parameter q.

    Parameters
    ----------
    freq_mhz : array_like
        Frequency [MHz].
    eps_r, sigma_s_m : array_like
        Ground constants [-], [S/m].
    vertical : array_like of bool
        Polarisation, True for vertical.
    radius_km : float
        Effective earth radius a [km].

    Returns
    -------
    m : ndarray
        (k a / 2)^(1/3) [-]; the normalised distance is x = m d / a.
    q : ndarray of complex
        q = −j m Δ [-] (q = 0: perfectly conducting earth).

    References
    ----------
    Wait (1962) §VIII, eq. for q; V. A. Fock, "Electromagnetic Diffraction
    and Propagation Problems" (1965) ch. 10-12.
    """
    k = 2.0 * np.pi * np.asarray(freq_mhz, float) / 299.792458e-3          # [1/km]
    m = np.cbrt(k * radius_km / 2.0)
    q = -1j * m * surface_impedance(eps_r, sigma_s_m, freq_mhz, vertical)
    return m, q


def residue_roots(q, n_modes=MAX_MODES):
    """Roots t_s of w'(t) − q w(t) = 0, the modes of the spherical earth.

    Parameters
    ----------
    q : array_like of complex, shape (n,)
        Surface parameter [-].
    n_modes : int
        Number of modes s = 1 … n_modes.

    Returns
    -------
    ndarray of complex, shape (n, n_modes)
        t_s [-], with Im t_s < 0 (time dependence e^{jωt}).

    Notes
    -----
    w(t) = Ai(t e^{−j2π/3}) obeys w'' = t w, so along a root
    dt/dq = 1/(t − q²). Each root is followed from q = 0, where the roots
    are the zeros of Ai' on the ray e^{−jπ/3}, by Runge-Kutta in ln q, then
    polished by Newton's method on r = w'/w (exponentially scaled Airy
    functions, so no overflow). As |q| → ∞ they tend to the zeros of Ai.

    References
    ----------
    Wait (1962) §VIII (mode equation and dt/dq = 1/(t − q²)); Fock (1965);
    D. A. Hill and J. R. Wait, "Ground wave attenuation function for a
    spherical earth with arbitrary surface impedance", Radio Sci. 15 (1980)
    637-643.
    """
    q = np.asarray(q, complex).reshape(-1, 1)
    _, ap, _, _ = ai_zeros(n_modes)
    t0 = -ap * _RAY                                          # q = 0: Ai'(−|a's|) = 0
    mag = np.abs(q)
    rho0 = np.minimum(1.0, 1e-3 / np.maximum(mag, 1e-300))
    t = t0 + q * rho0 / t0                                   # dt/dq = 1/t at q = 0
    steps = 64
    h = -np.log(rho0) / steps

    def slope(ln_rho, t):
        rho = np.exp(ln_rho)
        return rho * q / (t - (q * rho) ** 2)                # dt/d(ln ρ), q(ρ) = ρ q

    ln_rho = np.log(rho0)
    for _ in range(steps):                                   # RK4 along the root
        k1 = slope(ln_rho, t)
        k2 = slope(ln_rho + h / 2, t + h / 2 * k1)
        k3 = slope(ln_rho + h / 2, t + h / 2 * k2)
        k4 = slope(ln_rho + h, t + h * k3)
        t = t + h / 6 * (k1 + 2 * k2 + 2 * k3 + k4)
        ln_rho = ln_rho + h
    qb = np.broadcast_to(q, t.shape)
    for _ in range(4):                                       # Newton on g = w' − q w
        ai, aip, _, _ = airye(_C * t)
        r = _C * aip / ai
        t = t - (r - qb) / (t - qb * r)
    return t


_ROOTS: dict[complex, np.ndarray] = {}
_ROOTS_LIMIT = 50_000


def _cached_roots(q_unique):
    """Roots for each q, computed once per distinct q (grounds × frequencies) in a process."""
    missing = [q for q in q_unique.tolist() if q not in _ROOTS]
    if missing:
        if len(_ROOTS) + len(missing) > _ROOTS_LIMIT:
            _ROOTS.clear()
        for q, row in zip(missing, residue_roots(np.array(missing, complex), MAX_MODES)):
            _ROOTS[q] = row
    return np.array([_ROOTS[q] for q in q_unique.tolist()]).reshape(q_unique.size, MAX_MODES)


def _modes_needed(x):
    """Modes needed for x · (|Im t_s| − |Im t_1|) to pass the cut-off (asymptotic roots)."""
    im_needed = _MODE_CUTOFF / np.maximum(x, 1e-9) + _IM_T1_FLOOR
    s = (2.0 / (3.0 * np.pi)) * (im_needed / np.sin(np.pi / 3)) ** 1.5 + 1.0   # |t_s| ≈ (3π s/2)^(2/3)
    return np.clip(np.ceil(s), 4, MAX_MODES).astype(int)


def residue_series_attenuation(x, q, roots=None):
    """Spherical-earth attenuation function W(x, q) by the residue series.

    Parameters
    ----------
    x : array_like
        Normalised distance m d / a [-]; the series converges slowly for
        x < 0.3 (use :func:`smooth_earth_attenuation`, which hands over).
    q : array_like of complex
        Surface parameter [-], broadcast with x.
    roots : ndarray of complex, optional
        Precomputed roots for q, shape q.shape + (n_modes,).

    Returns
    -------
    ndarray of complex
        W = √(πx) e^{−jπ/4} Σ_s e^{−j x t_s} / (t_s − q²) [-].

    References
    ----------
    Wait (1962) §VIII, residue series for transmitter and receiver on the
    ground; Fock (1965) ch. 12; Hill and Wait (1980) eq. (4).
    """
    x, q = np.broadcast_arrays(np.asarray(x, float), np.asarray(q, complex))
    if roots is None:
        roots = residue_roots(q.ravel()).reshape(q.shape + (MAX_MODES,))
    terms = np.exp(-1j * x[..., None] * roots) / (roots - q[..., None] ** 2)
    return np.sqrt(np.pi * x) * np.exp(-1j * np.pi / 4) * terms.sum(axis=-1)


def smooth_earth_attenuation(distance_km, freq_mhz, eps_r, sigma_s_m, vertical,
                             radius_km=EFFECTIVE_EARTH_RADIUS_KM):
    """Magnitude of the ground-wave attenuation over a smooth round earth.

    Parameters
    ----------
    distance_km : array_like
        Ground distance [km] (> 0).
    freq_mhz : array_like
        Frequency [MHz].
    eps_r, sigma_s_m : array_like
        Ground constants [-], [S/m].
    vertical : array_like of bool
        Polarisation, True for vertical.
    radius_km : float
        Effective earth radius [km]; 4/3 × 6371 km by default.

    Returns
    -------
    ndarray
        |W| · √(θ / sin θ) [-], θ = d/a; the ground-wave field is E0 times
        this, E0 the field over a flat perfect conductor.

    Notes
    -----
    For x = m d / a ≥ :data:`HANDOVER_X` the residue series, with as many
    modes as x needs. Below it, Norton's flat-earth |F(p)| times a curvature
    factor 10^(c x^1.5 / 20), with c chosen for each ground and frequency so
    that both meet at the hand-over: x^(3/2) is the order of the first
    curvature term of Fock's small-distance expansion.

    References
    ----------
    Fock (1965); Wait (1962) §VIII; Norton (1936, 1937); ITU-R P.368-9
    (4/3 earth, short monopole, curves built the same way).
    """
    d, f, e, s, v = np.broadcast_arrays(np.asarray(distance_km, float), np.asarray(freq_mhz, float),
                                        np.asarray(eps_r, float), np.asarray(sigma_s_m, float),
                                        np.asarray(vertical, bool))
    shape = d.shape
    d, f, e, s, v = (a.ravel() for a in (d, f, e, s, v))
    m, q = curvature_parameters(f, e, s, v, radius_km)
    x = m * d / radius_km

    uq, inverse = np.unique(q, return_inverse=True)
    inverse = inverse.ravel()
    roots = _cached_roots(uq)

    out = np.empty(d.shape)
    far = x >= HANDOVER_X
    if far.any():
        idx = np.flatnonzero(far)
        bucket = np.minimum(MAX_MODES, 2 ** np.ceil(np.log2(_modes_needed(x[idx]))).astype(int))
        for n in np.unique(bucket):                          # evaluate alike mode counts together
            sel = idx[bucket == n]
            w_sph = residue_series_attenuation(x[sel], q[sel], roots[inverse[sel], :n])   # residue series
            out[sel] = np.abs(w_sph)
    near = ~far
    if near.any():
        idx = np.flatnonzero(near)
        flat = np.abs(norton_attenuation(numerical_distance(d[idx], f[idx], e[idx], s[idx], v[idx])))
        # curvature coefficient per distinct ground and frequency, matched at x = HANDOVER_X
        uidx, first = np.unique(inverse[idx], return_index=True)
        j = idx[first]
        d_h = HANDOVER_X * radius_km / m[j]
        w_h = np.abs(residue_series_attenuation(np.full(j.size, HANDOVER_X), q[j], roots[inverse[j]]))
        f_h = np.abs(norton_attenuation(numerical_distance(d_h, f[j], e[j], s[j], v[j])))
        c_db = 20.0 * np.log10(np.maximum(w_h, 1e-300) / np.maximum(f_h, 1e-300)) / HANDOVER_X ** 1.5
        c_of = np.zeros(uq.size)
        c_of[uidx] = c_db
        out[idx] = flat * 10.0 ** (c_of[inverse[idx]] * x[idx] ** 1.5 / 20.0)
    theta = np.minimum(d / radius_km, 3.0)                  # beyond any distance on the earth
    spread = np.sqrt(theta / np.where(theta > 0, np.sin(theta), 1.0))   # spherical spreading
    return (out * np.where(theta > 0, spread, 1.0)).reshape(shape)


def describe() -> str:
    """One paragraph on the ground-wave model, for a plan's assumptions."""
    return ("Ground wave: vertical or horizontal polarisation over a smooth round earth of effective radius "
            f"4/3 x {EARTH_RADIUS_KM:g} km (as ITU-R P.368's curves assume) - the residue series of "
            "Fock and Wait beyond about 0.5 Fock units (76 km at 2 MHz, 31 km at 30 MHz) and the "
            "Sommerfeld-Norton flat-earth field with a matched curvature term inside it; ground constants "
            "from ITU-R P.527; paths crossing land and sea by Millington's method, with land and sea "
            "taken from the GLOBE land mask along the great circle.")


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
        L = 32.45 + 20 log f + 20 log d − 20 log |W| [dB] over a smooth
        earth of effective radius 4/3 × 6371 km; finite at every distance.
        Add the two antennas' ground-wave gains (a short monopole on perfect
        ground has 4.77 dBi) to get received power.

    References
    ----------
    ITU-R P.525-4 (free-space loss); :func:`smooth_earth_attenuation`
    (Fock, Wait, Norton); ITU-R P.368-9.
    """
    d = np.maximum(np.asarray(distance_km, float), 0.1)
    f = np.asarray(freq_mhz, float)
    att = smooth_earth_attenuation(d, f, eps_r, sigma_s_m, vertical)
    att_db = 20.0 * np.log10(np.maximum(att, 1e-300))
    return 32.45 + 20.0 * np.log10(f) + 20.0 * np.log10(d) - att_db     # P.525 eq. 4, less W


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
        E = √(30 P G) / d · |W|, in dB(µV/m).

    References
    ----------
    ITU-R P.368-9 §1 (reference 300 mV/m at 1 km for 1 kW from a short
    vertical monopole on perfect ground); :func:`smooth_earth_attenuation`.
    """
    d_km = np.maximum(np.asarray(distance_km, float), 0.1)
    g = 10.0 ** (np.asarray(gain_dbi, float) / 10.0)
    att = smooth_earth_attenuation(d_km, freq_mhz, eps_r, sigma_s_m, vertical)
    e_v_m = np.sqrt(30.0 * np.asarray(power_w, float) * g) / (d_km * 1000.0) * att
    return 20.0 * np.log10(np.maximum(e_v_m, 1e-300) * 1e6)


def millington_loss_db(section_km, eps_r, sigma_s_m, freq_mhz, vertical):
    """Ground-wave basic transmission loss over a path of several grounds.

    Parameters
    ----------
    section_km : array_like, shape (..., k)
        Lengths of the path's sections in order from transmitter to
        receiver [km]; pad unused sections with 0.
    eps_r, sigma_s_m : array_like, shape (..., k)
        Ground constants of each section [-], [S/m].
    freq_mhz : array_like
        Frequency [MHz], broadcast against the path shape (...); give it a
        trailing axis for several frequencies per path, e.g. paths (n, k)
        with frequencies (1, c) via ``freq[None, :]`` after adding a path
        axis (see Notes).
    vertical : array_like of bool, shape (...)
        Polarisation of each path.

    Returns
    -------
    ndarray
        L = ½ (L→ + L←) [dB], with L→ = Σ_i [L_i(D_i) − L_i(D_{i−1})],
        D_i the distance from the transmitter to the end of section i and
        L_i the smooth-earth loss of :func:`ground_wave_loss_db` for section
        i's ground (L_i(0) = 0); L← the same from the receiver's end. A
        single section gives the homogeneous loss exactly, and the result is
        the same in both directions.

    Notes
    -----
    To evaluate c frequencies for n paths, pass section arrays of shape
    (n, 1, k) and freq of shape (1, c): the result is (n, c).

    References
    ----------
    G. Millington, "Ground-wave propagation over an inhomogeneous smooth
    earth", Proc. IEE 96 Pt III (1949) 53-64; ITU-R P.368-9 §3 (Millington's
    method for mixed paths).
    """
    sec = np.maximum(np.asarray(section_km, float), 0.0)
    f = np.asarray(freq_mhz, float)[..., None]
    v = np.asarray(vertical, bool)[..., None]
    sec, eps, sig, f, v = np.broadcast_arrays(sec, np.asarray(eps_r, float), np.asarray(sigma_s_m, float), f, v)

    def one_way(lengths, e, s, fr, vv):
        end = np.cumsum(lengths, axis=-1)
        start = end - lengths
        used = lengths > 0                                   # empty sections add nothing
        l_end = _loss_where(used, end, fr, e, s, vv)
        l_start = _loss_where(used & (start > 0), start, fr, e, s, vv)   # L_i(0) = 0
        return np.sum(l_end - l_start, axis=-1)              # Millington (1949) eq. for E_R

    forward = one_way(sec, eps, sig, f, v)
    flip = (Ellipsis, slice(None, None, -1))
    backward = one_way(sec[flip], eps[flip], sig[flip], f, v)
    return 0.5 * (forward + backward)                       # mean of both directions


def _loss_where(mask, distance_km, freq, eps, sig, vert):
    """ground_wave_loss_db where mask holds, 0 elsewhere (only those elements are computed)."""
    out = np.zeros(mask.shape)
    if mask.any():
        out[mask] = ground_wave_loss_db(distance_km[mask], freq[mask], eps[mask], sig[mask], vert[mask])
    return out


def mixed_path_loss_db(section_km, sea, land_eps_r, land_sigma_s_m, freq_mhz, vertical):
    """Ground-wave loss of many land/sea paths at many frequencies (Millington).

    Parameters
    ----------
    section_km : array_like, shape (n, k)
        Section lengths from transmitter to receiver [km], padded with 0
        (as :func:`planpack.ionosphere.landsea.path_sections` returns them).
    sea : array_like of bool, shape (n, k)
        True for a sea section (ITU-R P.527 sea, εr 70, σ 5 S/m).
    land_eps_r, land_sigma_s_m : array_like, shape (n,)
        Ground constants of each path's land sections [-], [S/m].
    freq_mhz : array_like, shape (c,)
        Frequencies [MHz].
    vertical : array_like of bool, shape (n,)
        Polarisation of each path.

    Returns
    -------
    ndarray, shape (n, c)
        Basic transmission loss [dB], as :func:`ground_wave_loss_db` for a
        one-ground path and :func:`millington_loss_db` otherwise.

    Notes
    -----
    Paths that are the same, or the same reversed (A→B and B→A), are
    computed once: Millington's mean of both directions is reciprocal.
    """
    sec = np.asarray(section_km, float)
    sea = np.asarray(sea, bool) & (sec > 0)
    n = sec.shape[0]
    f = np.atleast_1d(np.asarray(freq_mhz, float))
    eps_l = np.broadcast_to(np.asarray(land_eps_r, float), (n,))
    sig_l = np.broadcast_to(np.asarray(land_sigma_s_m, float), (n,))
    vert = np.broadcast_to(np.asarray(vertical, bool), (n,))
    sea_eps, sea_sig = GROUND_CONSTANTS["sea"]

    # one row per path: its non-empty sections, in the orientation that sorts first
    keys = []
    for i in range(n):
        keep = sec[i] > 0
        runs = tuple(zip(np.round(sec[i][keep], 3).tolist(), sea[i][keep].tolist()))
        keys.append((min(runs, runs[::-1]), float(eps_l[i]), float(sig_l[i]), bool(vert[i])))
    unique = {}
    index = np.array([unique.setdefault(k, len(unique)) for k in keys], int)
    rows = list(unique)
    out = np.empty((len(rows), f.size))
    single = [r for r, (runs, *_) in enumerate(rows) if len(runs) <= 1]
    if single:
        length = np.array([rows[r][0][0][0] if rows[r][0] else 0.0 for r in single])
        on_sea = np.array([bool(rows[r][0] and rows[r][0][0][1]) for r in single])
        eps = np.where(on_sea, sea_eps, [rows[r][1] for r in single])
        sig = np.where(on_sea, sea_sig, [rows[r][2] for r in single])
        out[single] = ground_wave_loss_db(length[:, None], f[None, :], eps[:, None], sig[:, None],
                                          np.array([rows[r][3] for r in single])[:, None])
    multi = [r for r in range(len(rows)) if r not in set(single)]
    if multi:
        k = max(len(rows[r][0]) for r in multi)
        lens = np.zeros((len(multi), k))
        eps = np.zeros((len(multi), k))
        sig = np.zeros((len(multi), k))
        for j, r in enumerate(multi):
            runs, e_l, s_l, _ = rows[r]
            lens[j, :len(runs)] = [x for x, _ in runs]
            eps[j] = e_l
            sig[j] = s_l
            for m, (_, is_sea) in enumerate(runs):
                if is_sea:
                    eps[j, m], sig[j, m] = sea_eps, sea_sig
        out[multi] = millington_loss_db(lens[:, None, :], eps[:, None, :], sig[:, None, :], f[None, :],
                                        np.array([rows[r][3] for r in multi])[:, None])
    return out[index]
