"""Path geometry: WGS84 geodesics, hop counts and curved-earth ray angles.

Two jobs live here, both purely geometric:

* where the path runs on the ellipsoid (distance, azimuths, midpoint), by
  Vincenty's inverse and direct formulae, vectorised with numpy;
* how a ray that reflects at a given height meets the ground and the layer
  (elevation, angle of incidence, slant range, hop count), on a spherical
  earth of mean radius, as ITU-R P.533 does.

Conventions: angles in degrees, distances in kilometres.
"""

from __future__ import annotations

import numpy as np

#: WGS84 semi-major axis [m] and flattening [-] (NIMA TR8350.2, Table 3.1).
WGS84_A_M = 6378137.0
WGS84_F = 1.0 / 298.257223563
WGS84_B_M = WGS84_A_M * (1.0 - WGS84_F)

#: Mean earth radius used for ray geometry [km] (ITU-R P.533-14 §2, R0).
EARTH_RADIUS_KM = 6371.0

#: Height of the layers assumed for E modes and the D-layer crossing [km]
#: (ITU-R P.533-14 §5.1 and §5.2.1).
E_LAYER_HEIGHT_KM = 110.0
D_LAYER_HEIGHT_KM = 100.0

#: Longest single hop counted for E and F2 modes [km] (ITU-R P.533-14 §5.1,
#: §5.2: E modes to 2000 km, the F2 hop limited to 4000 km).
MAX_HOP_E_KM = 2000.0
MAX_HOP_F2_KM = 4000.0

#: Lowest elevation a ray may leave the ground at [deg] (ITU-R P.533-14
#: §5.2.1, minimum elevation angle 3 deg; from memory).
MIN_ELEVATION_DEG = 3.0

_MAX_ITER = 200
_NEAR_ANTIPODAL_KM = 19000.0
_TOL = 1e-12


def _vincenty_terms(cos2_alpha):
    u2 = cos2_alpha * (WGS84_A_M**2 - WGS84_B_M**2) / WGS84_B_M**2
    big_a = 1 + u2 / 16384 * (4096 + u2 * (-768 + u2 * (320 - 175 * u2)))
    big_b = u2 / 1024 * (256 + u2 * (-128 + u2 * (74 - 47 * u2)))
    return big_a, big_b


def _delta_sigma(big_b, sin_s, cos_s, cos2sm):
    return big_b * sin_s * (cos2sm + big_b / 4 * (
        cos_s * (-1 + 2 * cos2sm**2)
        - big_b / 6 * cos2sm * (-3 + 4 * sin_s**2) * (-3 + 4 * cos2sm**2)))


def _inverse_terms(lam, su1, cu1, su2, cu2):
    # Vincenty (1975) eqs. (14)-(17): sigma and alpha for a trial longitude difference
    sl, cl = np.sin(lam), np.cos(lam)
    sin_s = np.hypot(cu2 * sl, cu1 * su2 - su1 * cu2 * cl)
    cos_s = su1 * su2 + cu1 * cu2 * cl
    sigma = np.arctan2(sin_s, cos_s)
    with np.errstate(invalid="ignore", divide="ignore"):
        sin_a = np.where(sin_s > 0, cu1 * cu2 * sl / sin_s, 0.0)
        cos2_a = 1 - sin_a**2
        cos2sm = np.where(cos2_a > 0, cos_s - 2 * su1 * su2 / np.where(cos2_a > 0, cos2_a, 1.0), 0.0)
    return sin_s, cos_s, sigma, sin_a, cos2_a, cos2sm


def inverse(lat1_deg, lon1_deg, lat2_deg, lon2_deg):
    """Geodesic distance and azimuths between two points on WGS84.

    Parameters
    ----------
    lat1_deg, lon1_deg : array_like
        Geodetic latitude and longitude of the first point [deg].
    lat2_deg, lon2_deg : array_like
        Geodetic latitude and longitude of the second point [deg].

    Returns
    -------
    distance_km : ndarray
        Length of the geodesic [km].
    azi1_deg : ndarray
        Forward azimuth at the first point, clockwise from north [deg].
    azi2_deg : ndarray
        Forward azimuth at the second point (direction of travel) [deg].

    Notes
    -----
    Vincenty's iteration does not converge for nearly antipodal points;
    those few are handed to geographiclib (Karney 2013), which is exact
    everywhere. Accuracy elsewhere is better than 1 mm.

    References
    ----------
    T. Vincenty, "Direct and inverse solutions of geodesics on the ellipsoid
    with application of nested equations", Survey Review 23(176), 88-93,
    1975, eqs. (13)-(18) and the inverse iteration of §4.
    C. F. F. Karney, "Algorithms for geodesics", J. Geodesy 87, 43-55, 2013.
    """
    lat1, lon1, lat2, lon2 = np.broadcast_arrays(
        *(np.asarray(x, dtype=float) for x in (lat1_deg, lon1_deg, lat2_deg, lon2_deg)))
    shape = lat1.shape
    lat1, lon1, lat2, lon2 = (a.ravel() for a in (lat1, lon1, lat2, lon2))
    f = WGS84_F
    big_l = np.deg2rad(((lon2 - lon1) + 180.0) % 360.0 - 180.0)
    u1 = np.arctan((1 - f) * np.tan(np.deg2rad(lat1)))
    u2 = np.arctan((1 - f) * np.tan(np.deg2rad(lat2)))
    su1, cu1, su2, cu2 = np.sin(u1), np.cos(u1), np.sin(u2), np.cos(u2)

    lam = big_l.copy()
    converged = np.zeros(lam.shape, dtype=bool)
    for _ in range(_MAX_ITER):
        sin_s, cos_s, sigma, sin_a, cos2_a, cos2sm = _inverse_terms(lam, su1, cu1, su2, cu2)
        c = f / 16 * cos2_a * (4 + f * (4 - 3 * cos2_a))
        lam_new = big_l + (1 - c) * f * sin_a * (
            sigma + c * sin_s * (cos2sm + c * cos_s * (-1 + 2 * cos2sm**2)))
        converged = np.abs(lam_new - lam) < _TOL
        lam = lam_new
        if converged.all():
            break

    sin_s, cos_s, sigma, sin_a, cos2_a, cos2sm = _inverse_terms(lam, su1, cu1, su2, cu2)
    sl, cl = np.sin(lam), np.cos(lam)
    big_a, big_b = _vincenty_terms(cos2_a)
    dist_m = WGS84_B_M * big_a * (sigma - _delta_sigma(big_b, sin_s, cos_s, cos2sm))
    azi1 = np.rad2deg(np.arctan2(cu2 * sl, cu1 * su2 - su1 * cu2 * cl))
    azi2 = np.rad2deg(np.arctan2(cu1 * sl, -su1 * cu2 + cu1 * su2 * cl))

    bad = ~converged | ~np.isfinite(dist_m)
    if bad.any():
        from geographiclib.geodesic import Geodesic

        for idx in np.flatnonzero(bad):
            g = Geodesic.WGS84.Inverse(float(lat1[idx]), float(lon1[idx]),
                                       float(lat2[idx]), float(lon2[idx]))
            dist_m[idx] = g["s12"]
            azi1[idx] = g["azi1"]
            azi2[idx] = g["azi2"]
    return ((dist_m / 1000.0).reshape(shape), (azi1 % 360.0).reshape(shape),
            (azi2 % 360.0).reshape(shape))


def direct(lat1_deg, lon1_deg, azi1_deg, distance_km):
    """Point reached along a geodesic from a start point, azimuth and length.

    Parameters
    ----------
    lat1_deg, lon1_deg : array_like
        Start point, geodetic latitude and longitude [deg].
    azi1_deg : array_like
        Azimuth at the start point, clockwise from north [deg].
    distance_km : array_like
        Length travelled along the geodesic [km].

    Returns
    -------
    lat2_deg, lon2_deg : ndarray
        End point [deg], longitude in [-180, 180).

    References
    ----------
    T. Vincenty, Survey Review 23(176), 1975, direct solution, eqs. (1)-(11).
    """
    lat1, lon1, azi1, s = np.broadcast_arrays(
        *(np.asarray(x, dtype=float) for x in (lat1_deg, lon1_deg, azi1_deg, distance_km)))
    f = WGS84_F
    s_m = s * 1000.0
    a1 = np.deg2rad(azi1)
    sa1, ca1 = np.sin(a1), np.cos(a1)
    tan_u1 = (1 - f) * np.tan(np.deg2rad(lat1))
    cu1 = 1 / np.sqrt(1 + tan_u1**2)
    su1 = tan_u1 * cu1
    sigma1 = np.arctan2(tan_u1, ca1)                       # Vincenty eq. (1)
    sin_a = cu1 * sa1                                      # eq. (2)
    cos2_a = 1 - sin_a**2
    big_a, big_b = _vincenty_terms(cos2_a)                 # eqs. (3), (4)
    sigma = s_m / (WGS84_B_M * big_a)
    for _ in range(_MAX_ITER):
        cos2sm = np.cos(2 * sigma1 + sigma)                # eq. (5)
        sin_s, cos_s = np.sin(sigma), np.cos(sigma)
        sigma_new = s_m / (WGS84_B_M * big_a) + _delta_sigma(big_b, sin_s, cos_s, cos2sm)  # eqs. (6), (7)
        done = np.all(np.abs(sigma_new - sigma) < _TOL)
        sigma = sigma_new
        if done:
            break
    cos2sm = np.cos(2 * sigma1 + sigma)
    sin_s, cos_s = np.sin(sigma), np.cos(sigma)
    lat2 = np.arctan2(su1 * cos_s + cu1 * sin_s * ca1,
                      (1 - f) * np.hypot(sin_a, su1 * sin_s - cu1 * cos_s * ca1))   # eq. (8)
    lam = np.arctan2(sin_s * sa1, cu1 * cos_s - su1 * sin_s * ca1)                  # eq. (9)
    c = f / 16 * cos2_a * (4 + f * (4 - 3 * cos2_a))                                 # eq. (10)
    big_l = lam - (1 - c) * f * sin_a * (
        sigma + c * sin_s * (cos2sm + c * cos_s * (-1 + 2 * cos2sm**2)))            # eq. (11)
    lon2 = (lon1 + np.rad2deg(big_l) + 180.0) % 360.0 - 180.0
    return np.rad2deg(lat2), lon2


def midpoint(lat1_deg, lon1_deg, lat2_deg, lon2_deg):
    """Point halfway along the geodesic between two points on WGS84.

    Parameters
    ----------
    lat1_deg, lon1_deg, lat2_deg, lon2_deg : array_like
        End points of the path [deg].

    Returns
    -------
    lat_deg, lon_deg : ndarray
        The midpoint [deg]; the control point of a path up to 2000 km
        (ITU-R P.533-14 §3, Table 1).

    References
    ----------
    Vincenty (1975), inverse then direct solution at half the distance.
    """
    return point_along(lat1_deg, lon1_deg, lat2_deg, lon2_deg, 0.5)


def point_along(lat1_deg, lon1_deg, lat2_deg, lon2_deg, fraction):
    """Point at a fraction of the way along the geodesic from point 1 to 2.

    Parameters
    ----------
    lat1_deg, lon1_deg, lat2_deg, lon2_deg : array_like
        End points of the path [deg].
    fraction : array_like
        Fraction of the path length from point 1 [-], 0..1.

    Returns
    -------
    lat_deg, lon_deg : ndarray
        The point [deg].

    References
    ----------
    Vincenty (1975), inverse and direct solutions.
    """
    lat1, lon1, lat2, lon2, frac = np.broadcast_arrays(
        *(np.asarray(x, float) for x in (lat1_deg, lon1_deg, lat2_deg, lon2_deg, fraction)))
    dist_km, azi1, _ = inverse(lat1, lon1, lat2, lon2)
    lat, lon = direct(lat1, lon1, azi1, dist_km * frac)
    # Near the antipode the azimuth is ill-conditioned; use Karney's exact solution there.
    far = np.atleast_1d(dist_km > _NEAR_ANTIPODAL_KM)
    if far.any():
        from geographiclib.geodesic import Geodesic

        lat, lon = np.atleast_1d(lat).copy(), np.atleast_1d(lon).copy()
        a1, o1, a2, o2, fr = (np.atleast_1d(x) for x in (lat1, lon1, lat2, lon2, frac))
        for i in np.flatnonzero(far):
            line = Geodesic.WGS84.InverseLine(a1[i], o1[i], a2[i], o2[i])
            pos = line.Position(line.s13 * fr[i])
            lat[i], lon[i] = pos["lat2"], (pos["lon2"] + 180.0) % 360.0 - 180.0
        lat, lon = lat.reshape(dist_km.shape), lon.reshape(dist_km.shape)
    return lat, lon


def elevation_angle_deg(hop_km, height_km):
    """Elevation of a ray mirrored at a height, for one hop on a spherical earth.

    Parameters
    ----------
    hop_km : array_like
        Ground length of one hop [km].
    height_km : array_like
        Equivalent (mirror) reflection height [km].

    Returns
    -------
    ndarray
        Elevation angle above the horizon at the ground [deg]; negative when
        the hop is longer than the layer's horizon allows.

    References
    ----------
    ITU-R P.533-14 §5.1 (elevation angle, equation number not checked): Δ = arctan(cot(d/2R0) − R0/(R0 + h) cosec(d/2R0)).
    K. Davies, Ionospheric Radio (1990), §6.2, curved-earth geometry.
    """
    theta = np.asarray(hop_km, float) / (2 * EARTH_RADIUS_KM)
    ratio = EARTH_RADIUS_KM / (EARTH_RADIUS_KM + np.asarray(height_km, float))
    theta = np.maximum(theta, 1e-9)
    # P.533 §5.1 elevation angle
    return np.rad2deg(np.arctan2(np.cos(theta) - ratio, np.sin(theta)))


def incidence_angle_deg(elevation_deg, height_km):
    """Angle of incidence at a height for a ray leaving the ground at an elevation.

    Parameters
    ----------
    elevation_deg : array_like
        Elevation angle at the ground [deg].
    height_km : array_like
        Height at which the angle is wanted [km].

    Returns
    -------
    ndarray
        Angle between the ray and the vertical at that height [deg].

    References
    ----------
    ITU-R P.533-14 §5.2.1 (sec i at the height, from Snell's law on a
    sphere): sin i = R0 cos Δ / (R0 + h). Davies (1990) §6.2.
    """
    s = EARTH_RADIUS_KM * np.cos(np.deg2rad(elevation_deg)) / (
        EARTH_RADIUS_KM + np.asarray(height_km, float))
    return np.rad2deg(np.arcsin(np.clip(s, -1.0, 1.0)))


def slant_range_km(hop_km, height_km):
    """Ray path length of one hop, up to the mirror height and back [km].

    Parameters
    ----------
    hop_km : array_like
        Ground length of the hop [km].
    height_km : array_like
        Mirror reflection height [km].

    Returns
    -------
    ndarray
        Slant range of the hop [km].

    References
    ----------
    ITU-R P.533-14 §5.2.1 (slant range in the free-space term, eqs. 18-19): p' = 2 R0 Σ sin(d/2R0) / cos(Δ + d/2R0).
    """
    theta = np.maximum(np.asarray(hop_km, float) / (2 * EARTH_RADIUS_KM), 1e-9)
    delta = np.deg2rad(elevation_angle_deg(hop_km, height_km))
    # P.533 §5.2.1 slant range (one hop); at vertical incidence this tends to 2h.
    return 2 * EARTH_RADIUS_KM * np.sin(theta) / np.cos(delta + theta)


def max_hop_km(height_km, min_elevation_deg=MIN_ELEVATION_DEG):
    """Longest hop a layer at a height allows with rays at or above an elevation.

    Parameters
    ----------
    height_km : array_like
        Mirror reflection height [km].
    min_elevation_deg : float
        Lowest usable elevation angle [deg].

    Returns
    -------
    ndarray
        Ground length of the longest hop [km].

    References
    ----------
    Davies (1990) §6.2: the triangle earth centre - ground - reflection
    point gives i = 90° − Δ − θ with sin i = R0 cos Δ / (R0 + h).
    """
    delta = np.deg2rad(min_elevation_deg)
    i = np.deg2rad(incidence_angle_deg(min_elevation_deg, height_km))
    theta = np.pi / 2 - delta - i
    return 2 * EARTH_RADIUS_KM * theta


def hop_count(distance_km, longest_hop_km):
    """Fewest equal hops that cover a path [-].

    Parameters
    ----------
    distance_km : array_like
        Ground length of the path [km].
    longest_hop_km : array_like
        Longest single hop allowed [km].

    Returns
    -------
    ndarray of int
        Number of hops, at least 1.

    References
    ----------
    ITU-R P.533-14 §5.2: the lowest-order mode whose hop fits the layer.
    """
    d = np.asarray(distance_km, float)
    return np.maximum(1, np.ceil(d / np.asarray(longest_hop_km, float) - 1e-9)).astype(int)
