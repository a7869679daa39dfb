"""Monthly median ionosphere at control points, from the CCIR maps PyIRI carries.

ITU-R P.1239 adopts the CCIR numerical maps of foF2 and M(3000)F2, given
for two solar levels, R12 = 0 and R12 = 100, and says to interpolate
linearly in R12 between them (held at R12 = 160 above). PyIRI carries the
coefficients and the basis functions; this module evaluates the maps with
them for all points and any UTC times of a month and interpolates in R12
as P.1239 does. (PyIRI's own ``IRI_monthly_mean_par`` interpolates foF2 in
the ionosonde index IG12, the IRI convention, which differs by a few per
cent.)
"""

from __future__ import annotations

import dataclasses
import datetime as _dt
import functools

import numpy as np

#: Sunspot number above which the F2 maps are held (ITU-R P.1239-3 §2:
#: R12 > 160 is replaced by 160 for foF2 and M(3000)F2; from memory).
R12_SATURATION = 160.0

#: Electron gyrofrequency per unit field [MHz/nT]: e/(2π m_e) = 27.99 GHz/T
#: (CODATA 2018 constants).
GYRO_MHZ_PER_NT = 2.799249e-5

#: Height at which the gyrofrequency is taken [km] (ITU-R P.533-14 §3.5, fH
#: at 300 km).
GYRO_HEIGHT_KM = 300.0


@dataclasses.dataclass(frozen=True)
class IonosphereMonth:
    """Monthly median ionospheric characteristics at points × UTC times.

    Attributes
    ----------
    foF2_mhz, m3000f2, hmF2_km, foE_mhz : ndarray, shape (npoints, ntimes)
        F2 critical frequency [MHz], M(3000)F2 propagation factor [-],
        F2 peak height [km] and E critical frequency [MHz].
    solar_zenith_deg : ndarray, shape (npoints, ntimes)
        Solar zenith angle on day 15 of the month [deg] (:mod:`.sun`).
    fH_mhz : ndarray, shape (npoints,)
        Electron gyrofrequency at 300 km from IGRF-13 [MHz].
    modip_deg : ndarray, shape (npoints,)
        Modified dip latitude [deg].
    r12, ig12 : float
        Solar indices used (after saturation) [-].
    """

    foF2_mhz: np.ndarray
    m3000f2: np.ndarray
    hmF2_km: np.ndarray
    foE_mhz: np.ndarray
    solar_zenith_deg: np.ndarray
    fH_mhz: np.ndarray
    modip_deg: np.ndarray
    r12: float
    ig12: float


def r12_from_f107(f107_sfu):
    """Sunspot number R12 from the 10.7 cm solar flux.

    Parameters
    ----------
    f107_sfu : float or array_like
        Solar radio flux at 10.7 cm [sfu].

    Returns
    -------
    float or ndarray
        12-month smoothed sunspot number [-].

    References
    ----------
    PyIRI ``main_library.F107_2_R12`` (IRI-2020 irisub.for), the inverse of
    ITU-R P.1239-3 eq. (1): Φ = 63.7 + 0.728 R12 + 0.00089 R12².
    """
    from PyIRI import main_library as ml

    return ml.F107_2_R12(np.asarray(f107_sfu, float))


def f107_from_r12(r12):
    """10.7 cm solar flux from the sunspot number R12 [sfu].

    Parameters
    ----------
    r12 : float or array_like
        12-month smoothed sunspot number [-].

    Returns
    -------
    float or ndarray
        Φ [sfu].

    References
    ----------
    ITU-R P.1239-3 eq. (1); PyIRI ``R12_2_F107`` uses 63.75 for 63.7.
    """
    from PyIRI import main_library as ml

    return ml.R12_2_F107(np.asarray(r12, float))


def gyrofrequency_mhz(lat_deg, lon_deg, year, month, height_km=GYRO_HEIGHT_KM):
    """Electron gyrofrequency from the IGRF-13 field that PyIRI carries.

    Parameters
    ----------
    lat_deg, lon_deg : array_like
        Geographic position [deg].
    year, month : int
        Epoch (the field is taken on the 15th).
    height_km : float
        Height [km].

    Returns
    -------
    ndarray
        fH = e|B| / (2π m_e) [MHz].

    References
    ----------
    IGRF-13, Alken et al., Earth Planets Space 73, 49 (2021), through
    ``PyIRI.igrf_library.inclination``; ITU-R P.533-14 §3.5 (fH at 300 km).
    """
    import PyIRI
    from PyIRI import igrf_library as igrf
    from PyIRI import main_library as ml

    lat = np.atleast_1d(np.asarray(lat_deg, float))
    lon = np.atleast_1d(np.asarray(lon_deg, float))
    dec_year = ml.decimal_year(_dt.datetime(int(year), int(month), 15))
    out = igrf.inclination(PyIRI.coeff_dir, dec_year, lon, lat, height_km, only_inc=False)
    total_nt = np.asarray(out[-1], float)
    return GYRO_MHZ_PER_NT * total_nt


@functools.lru_cache(maxsize=12)
def _ccir_coefficients(month):
    """CCIR foF2 and M(3000)F2 coefficients of a month as float arrays.

    Returns
    -------
    fof2, m3000 : ndarray, shapes (13, 76, 2) and (9, 49, 2)
        Diurnal × geographic coefficients at the two solar levels R12 = 0
        and R12 = 100 (last axis) [MHz], [-].

    References
    ----------
    ITU-R P.1239-3 §2 (the CCIR numerical maps); Jones & Gallet, ITU
    Telecommun. J. 32 (1965) 18-28; read by PyIRI ``read_ccir_ursi_coeff``.
    """
    import PyIRI
    from PyIRI import main_library as ml

    fof2, _ursi, m3000, _es = ml.read_ccir_ursi_coeff(int(month), PyIRI.coeff_dir)
    fof2 = np.asarray(fof2, dtype=float)
    m3000 = np.asarray(m3000, dtype=float)
    fof2.flags.writeable = False
    m3000.flags.writeable = False
    return fof2, m3000


def ccir_maps(lat_deg, lon_deg, modip_deg, month, utc_hours):
    """foF2 and M(3000)F2 of the CCIR maps at their two solar levels.

    Parameters
    ----------
    lat_deg, lon_deg, modip_deg : array_like, shape (npoints,)
        Geographic position and modified dip latitude [deg].
    month : int
        Month 1..12.
    utc_hours : array_like, shape (ntimes,)
        UTC times [h], 0..24.

    Returns
    -------
    fof2, m3000 : ndarray, shape (npoints, ntimes, 2)
        F2 critical frequency [MHz] and M(3000)F2 [-] at R12 = 0 and
        R12 = 100 (last axis).

    References
    ----------
    ITU-R P.1239-3 §2: Ω(λ, θ, T) = Σ_k U_k(T) G_k(λ, θ), the diurnal
    Fourier series U_k(T) = a_0k + Σ_j (a_2j,k cos jT + b_2j−1,k sin jT)
    times the geographic functions G_k of modip, latitude and longitude
    (Jones & Gallet 1965). PyIRI's ``diurnal_functions`` and
    ``set_global_functions`` build the basis.
    """
    from PyIRI import main_library as ml

    lat = np.asarray(lat_deg, float)
    lon = np.asarray(lon_deg, float)
    modip = np.asarray(modip_deg, float)
    t = np.asarray(utc_hours, float)
    c_fo, c_m = _ccir_coefficients(month)
    ext = ml.highest_power_of_extension()
    d_fo, d_m, _ = ml.diurnal_functions(t)                               # U_k(T) basis
    g_fo = ml.set_global_functions(ext["QM"]["F0F2"], ext["nk"]["F0F2"], lon, lat, modip)
    g_m = ml.set_global_functions(ext["QM"]["M3000"], ext["nk"]["M3000"], lon, lat, modip)
    fo = np.stack([(d_fo @ c_fo[:, :, k] @ g_fo).T for k in (0, 1)], axis=-1)   # P.1239 §2 map sum
    m3 = np.stack([(d_m @ c_m[:, :, k] @ g_m).T for k in (0, 1)], axis=-1)
    return fo, m3


def solar_weight(r12):
    """Weight of the R12 = 100 map in P.1239's interpolation [-].

    Parameters
    ----------
    r12 : float
        12-month smoothed sunspot number [-].

    Returns
    -------
    float
        min(R12, 160) / 100: linear in R12 between the maps for R12 = 0 and
        R12 = 100, extrapolated above 100 and held at R12 = 160.

    References
    ----------
    ITU-R P.1239-3 §2 (foF2 and M(3000)F2 linear in R12; the value for
    R12 = 160 used above it; saturation level from memory).
    """
    return min(float(r12), R12_SATURATION) / 100.0


def hmF2_bse1979_km(m3000f2, foF2_mhz, foE_mhz, modip_deg, r12):
    """Height of the F2 peak from M(3000)F2 (Bilitza, Sheikh and Eyfrig 1979).

    Parameters
    ----------
    m3000f2 : array_like
        M(3000)F2 propagation factor [-].
    foF2_mhz, foE_mhz : array_like
        F2 and E critical frequencies [MHz].
    modip_deg : array_like
        Modified dip latitude [deg].
    r12 : float
        12-month smoothed sunspot number [-].

    Returns
    -------
    ndarray
        hmF2 = 1490 / (M(3000)F2 + ΔM) − 176 [km], ΔM = f1 f2 / (x − f3) + f4,
        x = foF2/foE ≥ 1.7.

    References
    ----------
    D. Bilitza, N. M. Sheikh and R. Eyfrig, Telecommun. J. 46 (1979)
    549-553; D. Bilitza et al., Rev. Geophys. 60 (2022) §3.3.1 (IRI's
    BSE-1979 option; coefficients as PyIRI ``hm_IRI``).
    """
    r = float(r12)
    with np.errstate(divide="ignore", invalid="ignore"):
        x = np.maximum(np.where(np.asarray(foE_mhz) > 0, np.asarray(foF2_mhz) / np.asarray(foE_mhz), 1.7), 1.7)
    f1 = 0.00232 * r + 0.222
    f2 = 1.0 - r / 150.0 * np.exp(-(np.asarray(modip_deg, float) / 40.0) ** 2)
    f3 = 1.2 - 0.0116 * np.exp(r / 41.84)
    f4 = 0.096 * (r - 25.0) / 150.0
    dm = f1 * f2 / (x - f3) + f4                                   # BSE-1979 ΔM
    return 1490.0 / (np.asarray(m3000f2, float) + dm) - 176.0


def monthly_ionosphere(lat_deg, lon_deg, year, month, r12, utc_hours=None):
    """foF2, M(3000)F2, hmF2, foE and fH for points and UTC times of a month.

    Parameters
    ----------
    lat_deg, lon_deg : array_like, shape (npoints,)
        Geographic position of each control point [deg].
    year, month : int
        Month of the prediction (the sun and the magnetic field on day 15).
    r12 : float
        12-month smoothed sunspot number [-], 0..~250; held at 160 for the
        F2 maps (P.1239 saturation).
    utc_hours : array_like, optional
        UTC times [h], 0..24, fractional; default 0, 1, ..., 23.

    Returns
    -------
    IonosphereMonth
        Arrays of shape (npoints, ntimes), fH and modip of shape (npoints,).

    Notes
    -----
    foF2 and M(3000)F2 come from the CCIR maps (PyIRI's copy of the
    coefficients and its basis functions), interpolated linearly in R12
    between the R12 = 0 and R12 = 100 maps as P.1239 says. (PyIRI's own
    ``IRI_monthly_mean_par`` interpolates foF2 in IG12, as IRI does.)
    foE is PyIRI's NeQuick-form foE evaluated at the month's solar flux
    Φ(R12) and at the solar zenith angle of each time; hmF2 is BSE-1979 at
    the plan's R12 (saturated as the maps).

    References
    ----------
    ITU-R P.1239-3 §2 (CCIR maps, linear in R12, saturation at 160) and
    eq. (1) (Φ from R12).
    V. Forsythe et al., "PyIRI: Whole-globe approach to the International
    Reference Ionosphere modeling implemented in Python", Space Weather 22
    (2024) (coefficients, basis functions, ``foE``, IGRF-13 modip at 300 km).
    B. Nava, P. Coïsson and S. M. Radicella, J. Atmos. Sol.-Terr. Phys. 70
    (2008) 1856 (the NeQuick foE with the effective zenith angle).
    """
    import PyIRI
    from PyIRI import igrf_library as igrf
    from PyIRI import main_library as ml

    from . import sun

    lat = np.atleast_1d(np.asarray(lat_deg, float)).ravel()
    lon = np.atleast_1d(np.asarray(lon_deg, float)).ravel()
    if lat.shape != lon.shape:
        raise ValueError(f"lat_deg has {lat.size} points but lon_deg has {lon.size}")
    if not (np.all(np.isfinite(lat)) and np.all(np.abs(lat) <= 90)):
        raise ValueError("lat_deg must be finite and within -90..90 degrees")
    if not np.all(np.isfinite(lon)):
        raise ValueError("lon_deg must be finite")
    if not 1 <= int(month) <= 12:
        raise ValueError(f"month must be 1..12, got {month}")
    r12 = float(r12)
    if not np.isfinite(r12) or r12 < 0:
        raise ValueError(f"sunspot number R12 must be >= 0, got {r12}")
    hours = np.arange(24.0) if utc_hours is None else np.asarray(utc_hours, float).ravel()
    if not np.all((hours >= 0) & (hours <= 24)):
        raise ValueError("utc_hours must lie within 0..24 h")
    lon180 = (lon + 180.0) % 360.0 - 180.0

    # IGRF-13 at 300 km on day 15: dip for modip (PyIRI's own choice) and |B| for fH
    dec_year = ml.decimal_year(_dt.datetime(int(year), int(month), 15))
    out = igrf.inclination(PyIRI.coeff_dir, dec_year, lon180, lat, GYRO_HEIGHT_KM, only_inc=False)
    modip = np.asarray(igrf.inc2modip(out[0], lat), float)
    fh = GYRO_MHZ_PER_NT * np.asarray(out[-1], float)

    fo, m3 = ccir_maps(lat, lon180, modip, month, hours)
    w = solar_weight(r12)
    fof2 = fo[..., 0] * (1.0 - w) + fo[..., 1] * w               # P.1239 §2, linear in R12
    m3000 = m3[..., 0] * (1.0 - w) + m3[..., 1] * w

    chi = sun.solar_zenith_deg(lat[:, None], lon180[:, None], int(year), int(month), 15, hours[None, :])
    phi = float(ml.R12_2_F107(r12))                                   # P.1239 eq. 1
    with np.errstate(all="ignore"):
        foe = np.asarray(ml.foE(int(month), ml.solzen_effective(chi), lat[:, None], phi), float)
    foe = np.maximum(np.nan_to_num(foe), 0.0)
    r12_f2 = min(r12, R12_SATURATION)
    hmf2 = hmF2_bse1979_km(m3000, fof2, foe, modip[:, None], r12_f2)
    return IonosphereMonth(
        foF2_mhz=fof2, m3000f2=m3000, hmF2_km=hmf2, foE_mhz=foe,
        solar_zenith_deg=chi, fH_mhz=fh, modip_deg=modip, r12=r12_f2,
        ig12=float(ml.R12_2_IG12(r12_f2)))


def pyiri_version():
    """Version string of the installed PyIRI package [-]."""
    import PyIRI

    return PyIRI.__version__
