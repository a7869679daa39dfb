"""Position of the sun: solar zenith angle, declination, sunrise and sunset.

The NOAA solar calculator algorithm, itself a simplification of Meeus,
accurate to about a minute of time and a few hundredths of a degree
between 1800 and 2100, which is far better than the ionospheric models
that use it need.
"""

from __future__ import annotations

import datetime as _dt

import numpy as np

#: Solar zenith angle at which the upper limb touches the horizon, allowing
#: 34' of refraction and 16' of semi-diameter [deg] (NOAA solar calculator).
SUNRISE_ZENITH_DEG = 90.833

_J2000 = 2451545.0


def julian_day(year, month, day, utc_hour=0.0):
    """Julian day of a UTC instant (Gregorian calendar).

    Parameters
    ----------
    year, month, day : int or array_like
        Calendar date.
    utc_hour : array_like
        Hour of the UTC day [h], fractional.

    Returns
    -------
    ndarray
        Julian day [d].

    References
    ----------
    J. Meeus, Astronomical Algorithms, 2nd ed. (1998), ch. 7, eq. (7.1).
    """
    y = np.asarray(year, dtype=float)
    m = np.asarray(month, dtype=float)
    d = np.asarray(day, dtype=float) + np.asarray(utc_hour, dtype=float) / 24.0
    jan_feb = m <= 2
    y = np.where(jan_feb, y - 1, y)
    m = np.where(jan_feb, m + 12, m)
    a = np.floor(y / 100)
    b = 2 - a + np.floor(a / 4)
    # Meeus eq. 7.1
    return np.floor(365.25 * (y + 4716)) + np.floor(30.6001 * (m + 1)) + d + b - 1524.5


def declination_and_equation_of_time(jd):
    """Solar declination and the equation of time.

    Parameters
    ----------
    jd : array_like
        Julian day [d].

    Returns
    -------
    declination_deg : ndarray
        Apparent declination of the sun [deg].
    equation_of_time_min : ndarray
        Apparent minus mean solar time [min].

    References
    ----------
    NOAA Global Monitoring Laboratory, "Solar Calculation Details" (the
    NOAA_Solar_Calculations spreadsheet), after J. Meeus, Astronomical
    Algorithms (1998), ch. 25 (eqs. 25.2-25.8) and ch. 28 (eq. 28.3).
    """
    t = (np.asarray(jd, float) - _J2000) / 36525.0            # Meeus eq. 25.1
    l0 = (280.46646 + t * (36000.76983 + 0.0003032 * t)) % 360.0   # eq. 25.2
    m = 357.52911 + t * (35999.05029 - 0.0001537 * t)          # eq. 25.3
    e = 0.016708634 - t * (0.000042037 + 0.0000001267 * t)     # eq. 25.4
    mr = np.deg2rad(m)
    c = (np.sin(mr) * (1.914602 - t * (0.004817 + 0.000014 * t))
         + np.sin(2 * mr) * (0.019993 - 0.000101 * t)
         + np.sin(3 * mr) * 0.000289)                           # equation of centre
    true_long = l0 + c
    omega = np.deg2rad(125.04 - 1934.136 * t)
    app_long = true_long - 0.00569 - 0.00478 * np.sin(omega)   # apparent longitude
    eps0 = 23.0 + (26.0 + (21.448 - t * (46.815 + t * (0.00059 - t * 0.001813))) / 60.0) / 60.0  # eq. 22.2
    eps = np.deg2rad(eps0 + 0.00256 * np.cos(omega))           # eq. 25.8
    decl = np.arcsin(np.sin(eps) * np.sin(np.deg2rad(app_long)))  # eq. 25.7
    y = np.tan(eps / 2) ** 2
    l0r = np.deg2rad(l0)
    eot = 4.0 * np.rad2deg(y * np.sin(2 * l0r) - 2 * e * np.sin(mr)
                           + 4 * e * y * np.sin(mr) * np.cos(2 * l0r)
                           - 0.5 * y * y * np.sin(4 * l0r)
                           - 1.25 * e * e * np.sin(2 * mr))     # Meeus eq. 28.3
    return np.rad2deg(decl), eot


def solar_zenith_deg(lat_deg, lon_deg, year, month, day, utc_hour):
    """Solar zenith angle, without refraction.

    Parameters
    ----------
    lat_deg, lon_deg : array_like
        Observer's latitude and longitude, east positive [deg].
    year, month, day : int
        UTC date.
    utc_hour : array_like
        Hour of the UTC day [h]; broadcasts against the position arrays.

    Returns
    -------
    ndarray
        Angle between the sun and the local vertical [deg], 0..180.

    References
    ----------
    NOAA "Solar Calculation Details" (true solar time, hour angle, zenith);
    J. Meeus, Astronomical Algorithms (1998), ch. 13, eq. (13.6).
    """
    jd = julian_day(year, month, day, utc_hour)
    decl, eot = declination_and_equation_of_time(jd)
    lat = np.deg2rad(np.asarray(lat_deg, float))
    tst_min = np.asarray(utc_hour, float) * 60.0 + eot + 4.0 * np.asarray(lon_deg, float)
    hour_angle = np.deg2rad(tst_min / 4.0 - 180.0)
    dr = np.deg2rad(decl)
    # Meeus eq. 13.6 (altitude), expressed as the zenith angle
    cos_z = np.sin(lat) * np.sin(dr) + np.cos(lat) * np.cos(dr) * np.cos(hour_angle)
    return np.rad2deg(np.arccos(np.clip(cos_z, -1.0, 1.0)))


def sun_times_utc(lat_deg, lon_deg, date, zenith_deg=SUNRISE_ZENITH_DEG):
    """Sunrise and sunset of a date as UTC clock hours, vectorised.

    Parameters
    ----------
    lat_deg, lon_deg : array_like
        Station latitude and longitude, east positive [deg].
    date : datetime.date
        The local calendar date; the events are those around the solar noon
        of that date at the station's longitude.
    zenith_deg : float
        Zenith angle of the sun that defines the event [deg].

    Returns
    -------
    sunrise_utc_h, sunset_utc_h : ndarray
        UTC clock hour of each event [h], in [0, 24); NaN during polar day
        or polar night.
    polar_day : ndarray of bool
        True where the sun stays up all day (False during polar night).

    References
    ----------
    NOAA "Solar Calculation Details" (sunrise hour angle, solar noon), with
    two refinements of declination and equation of time at the event.
    """
    lat = np.asarray(lat_deg, float)
    lon = np.asarray(lon_deg, float)
    lat, lon = np.broadcast_arrays(lat, lon)
    base_jd = julian_day(date.year, date.month, date.day, 0.0)

    def event(sign):
        t_min = np.full(lat.shape, 720.0) - 4.0 * lon           # first guess: mean noon
        ha = np.zeros(lat.shape)
        for _ in range(3):
            decl, eot = declination_and_equation_of_time(base_jd + t_min / 1440.0)
            dr, latr = np.deg2rad(decl), np.deg2rad(lat)
            with np.errstate(invalid="ignore", divide="ignore"):
                cos_ha = (np.cos(np.deg2rad(zenith_deg)) / (np.cos(latr) * np.cos(dr))
                          - np.tan(latr) * np.tan(dr))
            ha = np.rad2deg(np.arccos(np.clip(cos_ha, -1.0, 1.0)))
            noon = 720.0 - 4.0 * lon - eot
            t_min = noon + sign * 4.0 * ha
        return t_min, cos_ha

    rise, cos_ha = event(-1.0)
    set_, _ = event(+1.0)
    none = np.abs(cos_ha) > 1.0
    polar_day = none & (cos_ha < -1.0)
    rise_h = np.where(none, np.nan, (rise / 60.0) % 24.0)
    set_h = np.where(none, np.nan, (set_ / 60.0) % 24.0)
    return rise_h, set_h, polar_day


def sunrise_sunset(lat_deg, lon_deg, date):
    """Sunrise and sunset for one station as UTC fractional hours.

    Parameters
    ----------
    lat_deg, lon_deg : float
        Station position, east positive [deg].
    date : datetime.date
        Local calendar date.

    Returns
    -------
    (sunrise_utc_h, sunset_utc_h) : tuple of float or None
        UTC clock hours [h] in [0, 24), or None for each event that does not
        happen (polar day or polar night).

    References
    ----------
    See :func:`sun_times_utc`.
    """
    if not isinstance(date, _dt.date):
        raise TypeError(f"date must be a datetime.date, got {type(date).__name__}")
    rise, set_, _ = sun_times_utc(float(lat_deg), float(lon_deg), date)
    rise, set_ = float(rise), float(set_)
    return (None if np.isnan(rise) else rise, None if np.isnan(set_) else set_)
