"""Monthly median ionosphere at control points, from PyIRI's CCIR maps.

PyIRI evaluates the CCIR numerical maps (the coefficients that ITU-R
P.1239 adopts for foF2 and M(3000)F2) at two solar levels, IG12 = 0 and
IG12 = 100 (R12 = 0 and 100 for M(3000)F2). This module calls it once for all
points and all 24 UTC hours of a month and interpolates to the plan's
sunspot number exactly as PyIRI's own ``solar_interpolation_of_dictionary_F2``
does: foF2 and foE linearly in IG12, M(3000)F2 and hmF2 linearly in R12.
"""

from __future__ import annotations

import dataclasses
import datetime as _dt
import logging

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
    """Monthly median ionospheric characteristics at points × UTC hours.

    Attributes
    ----------
    foF2_mhz, m3000f2, hmF2_km, foE_mhz : ndarray, shape (npoints, nhours)
        F2 critical frequency [MHz], M(3000)F2 propagation factor [-],
        F2 peak height [km] and E critical frequency [MHz].
    solar_zenith_deg : ndarray, shape (npoints, nhours)
        Solar zenith angle on day 15 of the month [deg] (PyIRI's own).
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


def monthly_ionosphere(lat_deg, lon_deg, year, month, r12, utc_hours=None):
    """foF2, M(3000)F2, hmF2, foE and fH for points and UTC hours of a month.

    Parameters
    ----------
    lat_deg, lon_deg : array_like, shape (npoints,)
        Geographic position of each control point [deg].
    year, month : int
        Month of the prediction.
    r12 : float
        12-month smoothed sunspot number [-], 0..~250; held at 160 for the
        F2 maps (P.1239 saturation).
    utc_hours : array_like, optional
        UTC hours [h]; default 0, 1, ..., 23.

    Returns
    -------
    IonosphereMonth
        Arrays of shape (npoints, nhours), fH of shape (npoints,).

    References
    ----------
    V. Forsythe et al., "PyIRI: Whole-globe approach to the International
    Reference Ionosphere modeling implemented in Python", Space Weather 22
    (2024), ``IRI_monthly_mean_par`` (CCIR coefficients, ``ccir_or_ursi=0``).
    ITU-R P.1239-3, CCIR maps of foF2 and M(3000)F2, linear in the solar index.
    D. Bilitza et al., Rev. Geophys. 60 (2022), §3.3 (hmF2 from M(3000)F2, BSE-1979).
    """
    import PyIRI
    from PyIRI import main_library as ml

    lat = np.atleast_1d(np.asarray(lat_deg, float)).ravel()
    lon = np.atleast_1d(np.asarray(lon_deg, float)).ravel()
    if lat.shape != lon.shape:
        raise ValueError(f"lat_deg has {lat.size} points but lon_deg has {lon.size}")
    if not (np.all(np.isfinite(lat)) and np.all(np.abs(lat) <= 90)):
        raise ValueError("lat_deg must be finite and within -90..90 degrees")
    if not 1 <= int(month) <= 12:
        raise ValueError(f"month must be 1..12, got {month}")
    r12 = float(r12)
    if not np.isfinite(r12) or r12 < 0:
        raise ValueError(f"sunspot number R12 must be >= 0, got {r12}")
    hours = np.arange(24.0) if utc_hours is None else np.asarray(utc_hours, float).ravel()
    lon180 = (lon + 180.0) % 360.0 - 180.0

    logging.getLogger("pyiri_logger").setLevel(logging.ERROR)
    with np.errstate(all="ignore"):
        f2, _f1, e, _es, _sun, mag = ml.IRI_monthly_mean_par(
            int(year), int(month), hours, lon180, lat, PyIRI.coeff_dir, ccir_or_ursi=0)

    r12_f2 = min(r12, R12_SATURATION)
    ig12 = float(ml.R12_2_IG12(r12_f2))
    w_ig = ig12 / 100.0        # PyIRI solar_interpolate(solidx='IG12', 0..100)
    w_r = r12_f2 / 100.0       # PyIRI solar_interpolate(solidx='R12', 0..100)
    ig12_e = float(ml.R12_2_IG12(r12))
    w_ig_e = ig12_e / 100.0

    def interp(arr, w):
        a = np.asarray(arr, float)            # (nhours, npoints, 2)
        return (a[..., 0] * (1.0 - w) + a[..., 1] * w).T   # (npoints, nhours)

    fof2 = interp(f2["fo"], w_ig)
    m3000 = interp(f2["M3000"], w_r)
    hmf2 = interp(f2["hm"], w_r)
    foe = interp(e["fo"], w_ig_e)
    solzen = np.asarray(e["solzen"], float)[..., 0].T
    fh = gyrofrequency_mhz(lat, lon180, year, month)
    return IonosphereMonth(
        foF2_mhz=fof2, m3000f2=m3000, hmF2_km=hmf2, foE_mhz=np.maximum(foe, 0.0),
        solar_zenith_deg=solzen, fH_mhz=fh,
        modip_deg=np.asarray(mag["modip"], float).ravel(), r12=r12_f2, ig12=ig12)


def pyiri_version():
    """Version string of the installed PyIRI package [-]."""
    import PyIRI

    return PyIRI.__version__
