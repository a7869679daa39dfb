"""Atmospheric (lightning) radio noise: a coarse model with ITU-R P.372's structure.

P.372 gives atmospheric noise as world maps of the median noise figure at
1 MHz, Fam(1 MHz), for each season and 4-hour local-time block; curves that
carry Fam(1 MHz) to other frequencies for that season and block; and charts
of the upper and lower deciles Du, Dl. The maps are published as figures,
and no package in the registries carries their numerical form. This module
keeps P.372's structure and replaces the maps with a coarse climate model:

* Fam(1 MHz) = (night level by latitude and local season, for land and for
  sea, mixed by the land fraction within about 1500 km) + (offset of the
  4-hour block from the night level);
* Fa(f) = a(f) · Fam(1 MHz) + b(f) for night, twilight and day blocks, the
  linear form of P.372's frequency curves, which converge at high
  frequencies and, by day, rise a little from 1 MHz to 5-10 MHz;
* Du, Dl by frequency and block class;
* seasons are local: southern-hemisphere winter is June-August.

Every number below is recalled from P.372's figures (from memory), not
copied from them; figure numbers are those of the P.372-7/-8 editions.
The model's median departs from P.372's maps by about 6 dB (one standard
deviation) and by up to 15 dB where a map has regional detail a latitude
band cannot carry (deserts, monsoon coasts, mountains).
Use it to know when lightning noise rules a site, not to the decibel.
"""

from __future__ import annotations

import dataclasses
import functools

import numpy as np

from . import noise

SEASONS = ("winter", "spring", "summer", "autumn")
TIME_BLOCKS = ("00-04", "04-08", "08-12", "12-16", "16-20", "20-24")

#: Latitude knots of the night levels [deg, absolute].
_LAT_KNOTS = np.array([0.0, 10.0, 20.0, 30.0, 40.0, 50.0, 60.0, 70.0, 80.0, 90.0])

#: Night level of Fam(1 MHz) [dB above kT0b] by local season (rows: winter,
#: spring, summer, autumn) at _LAT_KNOTS, for a site ringed by land and by
#: sea. From memory of P.372 Figs. 15a-38a (e.g. about 90-100 dB over
#: tropical Africa and South-East Asia on summer nights, 80-85 dB over the
#: south-eastern United States, 70-75 dB over Europe, 50-60 dB over Europe
#: on winter nights, below 45 dB in the polar winter); uncertainty ±6 dB.
_NIGHT_LAND_DB = np.array([
    [90, 86, 79, 70, 62, 55, 48, 42, 38, 36],
    [90, 90, 86, 79, 71, 63, 55, 48, 42, 40],
    [90, 94, 95, 90, 83, 75, 66, 57, 50, 47],
    [90, 91, 88, 81, 73, 65, 57, 50, 44, 42],
], float)
_NIGHT_SEA_DB = np.array([
    [79, 75, 68, 61, 56, 51, 46, 41, 38, 36],
    [79, 79, 75, 68, 62, 57, 52, 46, 42, 40],
    [79, 82, 81, 76, 70, 65, 59, 53, 49, 47],
    [79, 80, 76, 69, 63, 58, 53, 48, 44, 42],
], float)

#: Offset of each 4-hour block's Fam(1 MHz) from the night level [dB]
#: (00-04 … 20-24 local time): daytime D-region absorption silences distant
#: storms at 1 MHz. From memory of P.372 (day about 30-40 dB below night at
#: low and middle latitudes); uncertainty ±5 dB.
_BLOCK_OFFSET_DB = np.array([-1.0, -9.0, -36.0, -32.0, -12.0, 0.0])

#: Scale of those offsets by absolute latitude [deg] and local season: less
#: day-night contrast toward the poles (polar night, midnight sun). From
#: memory; uncertainty ±0.2.
_SCALE_LAT_KNOTS = np.array([0.0, 45.0, 60.0, 75.0, 90.0])
_OFFSET_SCALE = np.array([
    [1.0, 1.0, 0.70, 0.40, 0.40],
    [1.0, 1.0, 0.80, 0.55, 0.55],
    [1.0, 1.0, 0.85, 0.70, 0.70],
    [1.0, 1.0, 0.80, 0.55, 0.55],
])

#: Block class of each time block: 0 night, 1 twilight, 2 day.
_BLOCK_CLASS = np.array([0, 1, 2, 2, 1, 0])

#: Frequency knots of the frequency dependence [MHz].
_FREQ_KNOTS = np.array([1.0, 2.0, 3.0, 5.0, 7.0, 10.0, 15.0, 20.0, 30.0])
#: Fa(f) = a · Fam(1 MHz) + b [dB] by block class (rows: night, twilight,
#: day). From memory of P.372 Figs. 15b-38b: at night a curve starting at
#: 100 dB falls to about 70 dB at 10 MHz and 40 dB at 30 MHz, one starting
#: at 30 dB to about 24 dB at 10 MHz; by day low curves rise by a few dB to
#: 5-10 MHz. Uncertainty ±4 dB at 10 MHz, ±8 dB at 30 MHz.
_SLOPE_A = np.array([
    [1.0, 0.94, 0.89, 0.81, 0.75, 0.68, 0.58, 0.50, 0.38],
    [1.0, 0.935, 0.88, 0.80, 0.735, 0.655, 0.555, 0.475, 0.355],
    [1.0, 0.93, 0.87, 0.79, 0.72, 0.63, 0.53, 0.45, 0.33],
])
_OFFSET_B = np.array([
    [0.0, 1.0, 1.8, 3.0, 3.6, 4.0, 3.5, 2.5, 0.0],
    [0.0, 2.0, 3.6, 6.0, 7.3, 8.5, 8.3, 7.3, 4.5],
    [0.0, 3.0, 5.5, 9.0, 11.0, 13.0, 13.0, 12.0, 9.0],
])

#: Decile deviations [dB] by block class at 1, 10 and 30 MHz. From memory
#: of P.372 Figs. 15c-38c (Du 7-12 dB, Dl 4-9 dB at HF); uncertainty ±3 dB.
_DECILE_FREQ = np.array([1.0, 10.0, 30.0])
_UPPER_DB = np.array([[7.0, 9.0, 10.5], [8.5, 9.5, 10.5], [10.0, 10.0, 10.5]])
_LOWER_DB = np.array([[6.0, 7.0, 8.0], [6.5, 7.0, 8.0], [7.0, 7.5, 8.0]])

#: Radius over which land and sea are mixed [km]: night-time noise arrives
#: from storms far beyond the horizon (Gaussian weight, one σ).
LAND_SMOOTHING_KM = 1500.0

#: Land in each 5° cell in ninths ('0' all sea … '9' all land), rows from
#: 85-90°N down to 85-90°S, columns from 180°W eastward. Derived from the
#: GLOBE land mask of the global-land-mask package by
#: ``planpack.ionosphere.landsea.coarse_land_fraction(5.0)``; a test checks
#: that it still matches.
LAND_NINTHS_5DEG = (
    "000000000000000000000000000000000000000000000000000000000000000000000000",
    "000000000000000002345643444566642100000010000101100000110000000000000000",
    "000000000001232335674257899999981000002420000001110000246320000110000000",
    "000021000005556244675300189999850000000011000023024458999876662364220000",
    "531799998898878778542762059974312000002889853567887899999999999999998898",
    "011799899999999995224640017500012000059668989999999999999999999999967874",
    "000142003799999995204975000000000013046348999999999999999999999721145000",
    "000000000179999999978999500000000046378899999999999999999999999830040000",
    "000000000017999999999982310000000004999999879999999999999999999720000000",
    "000000000008999999999711000000000057534596338999999999999999994140000000",
    "000000000004999999998000000000000056341134789999999999999998251420000000",
    "000000000000489999881000000000000069996242399999999999999999213100000000",
    "000000000000048961030000000000000599999999889757999999999999200000000000",
    "000000000000012940212000000000002999999999949986028997799762100000000000",
    "000000000000000466400210000000002999999999966972003950189400200000000000",
    "000000000000000001530311000000002999999999997410000800036700300000000000",
    "000000000000000000025998310000000499799999999800000120022002210000000000",
    "000000000000000000006999980000000000029999998200000000035165110000000000",
    "000000000000000000019999998410000000018999992000000000006264313530100000",
    "000000000000000000018999999990000000004999980000000000000221110274110000",
    "000000000000000000003999999940000000003999991200000000000000015130000000",
    "000000000000000000000499999910000000005999951700000000000000499782000001",
    "000000000000000000000199998400000000002999912500000000000018999998100000",
    "000000000000000000000299992000000000000899400000000000000019999999600000",
    "000000000000000000000399950000000000000385000000000000000008744899400000",
    "000000000000000000000698400000000000000000000000000000000000000166000012",
    "000000000000000000000691000000000000000000000000000000000000000002000131",
    "000000000000000000000860000000000000000000000000000000000000000000000200",
    "000000000000000000000630000000000000000000000000000000000000000000000000",
    "000000000000000000000000000000000000000000000000000000000000000000000000",
    "000000000000000000000001100000000000000000000000000000000000000000000000",
    "000000000000000000000133000000000000000000113576440246667675667653310000",
    "000000000011110143333587000000001576788888999999988999999999999999998400",
    "000113689999999999986420004104789999999999999999999999999999999999995100",
    "110036999999999999999774466678999999999999999999999999999999999999996422",
    "999988999999999999999999999999999999999999999999999999999999999999999999",
)
_CELL_DEG = 5.0
_EARTH_RADIUS_KM = 6371.0


def local_season(month, lat_deg):
    """Local season index of a month at a latitude.

    Parameters
    ----------
    month : array_like of int
        Month 1-12.
    lat_deg : array_like
        Latitude [deg]; the southern hemisphere (lat < 0) has its seasons
        six months apart.

    Returns
    -------
    ndarray of int
        0 winter, 1 spring, 2 summer, 3 autumn (see :data:`SEASONS`).

    References
    ----------
    ITU-R P.372, atmospheric noise due to lightning (northern seasons Dec-Feb winter … Sep-Nov autumn;
    in the southern hemisphere, winter is June-August).
    """
    m = np.asarray(month, int)
    if np.any((m < 1) | (m > 12)):
        raise ValueError("month must be 1-12")
    north = (m % 12) // 3                                   # Dec-Feb 0, Mar-May 1, Jun-Aug 2, Sep-Nov 3
    return np.where(np.asarray(lat_deg, float) < 0.0, (north + 2) % 4, north)


def local_mean_time_h(utc_hour, lon_deg):
    """Local mean (solar) time [h] from UTC and longitude.

    Parameters
    ----------
    utc_hour : array_like
        Universal time [h].
    lon_deg : array_like
        East longitude [deg].

    Returns
    -------
    ndarray
        (UTC + lon / 15) mod 24 [h].
    """
    return np.mod(np.asarray(utc_hour, float) + np.asarray(lon_deg, float) / 15.0, 24.0)


@functools.cache
def _smoothed_land_grid() -> np.ndarray:
    land = np.array([[int(ch) for ch in row] for row in LAND_NINTHS_5DEG], float) / 9.0
    n_lat, n_lon = land.shape
    lat_c = np.radians(90.0 - _CELL_DEG * (np.arange(n_lat) + 0.5))
    lon_c = np.radians(-180.0 + _CELL_DEG * (np.arange(n_lon) + 0.5))
    lat_g, lon_g = np.meshgrid(lat_c, lon_c, indexing="ij")
    xyz = np.stack([np.cos(lat_g) * np.cos(lon_g), np.cos(lat_g) * np.sin(lon_g), np.sin(lat_g)], -1).reshape(-1, 3)
    area = np.cos(lat_g).ravel()                            # cell area ∝ cos(lat)
    sigma = LAND_SMOOTHING_KM / _EARTH_RADIUS_KM
    out = np.empty(xyz.shape[0])
    for a in range(0, xyz.shape[0], 256):
        ang = np.arccos(np.clip(xyz[a:a + 256] @ xyz.T, -1.0, 1.0))
        w = area * np.exp(-0.5 * (ang / sigma) ** 2)
        out[a:a + 256] = w @ land.ravel() / w.sum(axis=1)
    grid = out.reshape(n_lat, n_lon)
    grid.setflags(write=False)
    return grid


def land_fraction(lat_deg, lon_deg):
    """Land fraction around a point, weighted over about 1500 km.

    Parameters
    ----------
    lat_deg, lon_deg : array_like
        Latitude [deg] (clipped to ±90) and longitude [deg] (any range).

    Returns
    -------
    ndarray
        Gaussian-weighted (σ = 1500 km) land fraction [0-1] of the 5°
        cells of :data:`LAND_NINTHS_5DEG`, interpolated bilinearly.
    """
    _require_finite(lat_deg=lat_deg, lon_deg=lon_deg)
    grid = _smoothed_land_grid()
    n_lat, n_lon = grid.shape
    fi = np.clip((90.0 - _CELL_DEG / 2 - np.clip(np.asarray(lat_deg, float), -90, 90)) / _CELL_DEG, 0, n_lat - 1)
    fj = np.mod((np.asarray(lon_deg, float) + 180.0 - _CELL_DEG / 2) / _CELL_DEG, n_lon)
    i0 = np.minimum(np.floor(fi).astype(int), n_lat - 2)
    j0 = np.floor(fj).astype(int) % n_lon
    j1 = (j0 + 1) % n_lon
    wi, wj = fi - i0, fj - np.floor(fj)
    return ((1 - wi) * ((1 - wj) * grid[i0, j0] + wj * grid[i0, j1])
            + wi * ((1 - wj) * grid[i0 + 1, j0] + wj * grid[i0 + 1, j1]))


def _require_finite(**values):
    for name, value in values.items():
        if not np.all(np.isfinite(np.asarray(value, float))):
            raise ValueError(f"{name} must be finite")


def _by_season(season, abs_lat, knots, table):
    out = np.zeros(np.broadcast_shapes(np.shape(season), np.shape(abs_lat)))
    for s in range(4):
        out = np.where(season == s, np.interp(abs_lat, knots, table[s]), out)
    return out


def fam_1mhz_db(lat_deg, lon_deg, month, block, land=None):
    """Median atmospheric noise figure at 1 MHz for one 4-hour block.

    Parameters
    ----------
    lat_deg, lon_deg : array_like
        Receiving site [deg].
    month : array_like of int
        Month 1-12.
    block : array_like of int
        Local-time block 0-5 (00-04 … 20-24, see :data:`TIME_BLOCKS`).
    land : array_like, optional
        Land fraction around the site [0-1]; default :func:`land_fraction`.

    Returns
    -------
    ndarray
        Fam(1 MHz) [dB above kT0b].

    References
    ----------
    Structure of ITU-R P.372's atmospheric-noise figures, Figs. 15a-38a
    (map of Fam at 1 MHz per season and time block); values of this
    module's coarse model (from memory, see the module notes).
    """
    lat = np.asarray(lat_deg, float)
    abs_lat = np.minimum(np.abs(lat), 90.0)
    season = local_season(month, lat)
    if land is None:
        land = land_fraction(lat_deg, lon_deg)
    land = np.clip(np.asarray(land, float), 0.0, 1.0)
    night = (land * _by_season(season, abs_lat, _LAT_KNOTS, _NIGHT_LAND_DB)
             + (1.0 - land) * _by_season(season, abs_lat, _LAT_KNOTS, _NIGHT_SEA_DB))
    scale = _by_season(season, abs_lat, _SCALE_LAT_KNOTS, _OFFSET_SCALE)
    return night + scale * _BLOCK_OFFSET_DB[np.asarray(block, int)]


def _per_class_at(freq, knots, table, clamp):
    """Each class's row of a table, interpolated in log f at freq: (3,) + freq.shape."""
    u = np.log10(np.asarray(freq, float))
    uk = np.log10(knots)
    idx = np.clip(np.searchsorted(uk, u) - 1, 0, uk.size - 2)
    w = (u - uk[idx]) / (uk[idx + 1] - uk[idx])
    if clamp:
        w = np.clip(w, 0.0, 1.0)                             # held at the end values
    return table[:, idx] * (1.0 - w) + table[:, idx + 1] * w  # linear extrapolation unless clamped


def _select(cls, per_class):
    return np.choose(cls, tuple(per_class))


def frequency_dependence_db(freq_mhz, fam1_db, block):
    """Median atmospheric noise figure at a frequency from its 1 MHz value.

    Parameters
    ----------
    freq_mhz : array_like
        Frequency [MHz]; the model is made for 1-30 MHz and extrapolated
        linearly in log f outside it.
    fam1_db : array_like
        Fam(1 MHz) [dB above kT0b].
    block : array_like of int
        Local-time block 0-5.

    Returns
    -------
    ndarray
        Fa(f) = a(f) Fam(1 MHz) + b(f) [dB above kT0b].

    References
    ----------
    Structure of ITU-R P.372's atmospheric-noise figures, Figs. 15b-38b
    (variation of Fa with frequency, one curve per Fam(1 MHz));
    coefficients of this module (from memory).
    """
    cls = _BLOCK_CLASS[np.asarray(block, int)]
    a = _select(cls, _per_class_at(freq_mhz, _FREQ_KNOTS, _SLOPE_A, clamp=False))
    b = _select(cls, _per_class_at(freq_mhz, _FREQ_KNOTS, _OFFSET_B, clamp=False))
    return a * np.asarray(fam1_db, float) + b


def deciles_db(freq_mhz, block):
    """Upper and lower decile deviations of atmospheric noise.

    Parameters
    ----------
    freq_mhz : array_like
        Frequency [MHz] (held at the 1 and 30 MHz values outside 1-30 MHz).
    block : array_like of int
        Local-time block 0-5.

    Returns
    -------
    upper_db, lower_db : ndarray
        Du and Dl [dB].

    References
    ----------
    Structure of ITU-R P.372's atmospheric-noise figures, Figs. 15c-38c; values from memory.
    """
    cls = _BLOCK_CLASS[np.asarray(block, int)]
    return (_select(cls, _per_class_at(freq_mhz, _DECILE_FREQ, _UPPER_DB, clamp=True)),
            _select(cls, _per_class_at(freq_mhz, _DECILE_FREQ, _LOWER_DB, clamp=True)))


def atmospheric_noise_db(freq_mhz, lat_deg, lon_deg, month, utc_hour, land=None, smooth_time=True):
    """Median atmospheric noise figure and its deciles at a site and hour.

    Parameters
    ----------
    freq_mhz : array_like
        Frequency [MHz] (model made for 1-30 MHz).
    lat_deg, lon_deg : array_like
        Receiving site [deg]; any latitude including the poles, any
        longitude.
    month : array_like of int
        Month 1-12 (the local season follows from it and the hemisphere).
    utc_hour : array_like
        Universal time [h]; local mean time is UTC + lon/15.
    land : array_like, optional
        Land fraction around the site [0-1]; default :func:`land_fraction`
        (land within about 1500 km, from the GLOBE mask).
    smooth_time : bool
        True (default): interpolate linearly in local time between the
        centres of the 4-hour blocks (02, 06, … 22 h), so that no hour jumps
        at a block edge. False: use the block that holds the hour, as P.372
        tabulates it.

    Returns
    -------
    fa, upper, lower : ndarray
        Median Fa [dB above kT0b], upper and lower decile deviations Du, Dl
        [dB]; all inputs broadcast together.

    Notes
    -----
    A coarse climate model with P.372's structure; see the module notes and
    :func:`describe` for its sources and uncertainty (about 6 dB, up to
    15 dB). Fam(1 MHz) is worked out on the shape of the site, month and
    hour inputs only, so for many links compute it per receiving site.

    References
    ----------
    ITU-R P.372, atmospheric noise due to lightning (Fam(1 MHz) maps,
    frequency curves and deciles by season and 4-hour block).
    """
    _require_finite(freq_mhz=freq_mhz, lat_deg=lat_deg, lon_deg=lon_deg, utc_hour=utc_hour)
    if np.any(np.asarray(freq_mhz, float) <= 0):
        raise ValueError("freq_mhz must be > 0")
    lt = local_mean_time_h(utc_hour, lon_deg)
    if land is None:
        land = land_fraction(lat_deg, lon_deg)
    if smooth_time:
        pos = np.mod(lt - 2.0, 24.0) / 4.0                   # 0 at 02 h, block centres at integers
        b0 = np.floor(pos).astype(int) % 6
        w = pos - np.floor(pos)
        pairs = ((b0, 1.0 - w), ((b0 + 1) % 6, w))
    else:
        pairs = ((np.floor(lt / 4.0).astype(int) % 6, 1.0),)
    slope = _per_class_at(freq_mhz, _FREQ_KNOTS, _SLOPE_A, clamp=False)
    offset = _per_class_at(freq_mhz, _FREQ_KNOTS, _OFFSET_B, clamp=False)
    upper = _per_class_at(freq_mhz, _DECILE_FREQ, _UPPER_DB, clamp=True)
    lower = _per_class_at(freq_mhz, _DECILE_FREQ, _LOWER_DB, clamp=True)
    fa = du = dl = 0.0
    for block, weight in pairs:
        cls = _BLOCK_CLASS[block]
        fam1 = fam_1mhz_db(lat_deg, lon_deg, month, block, land)              # P.372 Fig. a
        fa = fa + weight * (_select(cls, slope) * fam1 + _select(cls, offset))  # P.372 Fig. b
        du = du + weight * _select(cls, upper)                                 # P.372 Fig. c
        dl = dl + weight * _select(cls, lower)
    fa, du, dl = np.broadcast_arrays(np.asarray(fa, float), np.asarray(du, float), np.asarray(dl, float))
    return fa.copy(), du.copy(), dl.copy()


@dataclasses.dataclass(frozen=True)
class AtmosphericExcess:
    """When atmospheric noise probably rules a receiving site in one month.

    Attributes
    ----------
    month : int
        Month 1-12.
    utc_hours : tuple of int
        UTC hours at which the atmospheric median exceeds the man-made
        median by more than the threshold on at least one frequency.
    worst_excess_db : float
        Largest excess of atmospheric over man-made median [dB].
    worst_freq_mhz : float
        Frequency of the largest excess [MHz].
    worst_utc_hour : int
        UTC hour of the largest excess.
    """

    month: int
    utc_hours: tuple[int, ...]
    worst_excess_db: float
    worst_freq_mhz: float
    worst_utc_hour: int


def atmospheric_dominance(lat_deg, lon_deg, months, freq_mhz, man_made_c_db, man_made_d,
                          threshold_db: float = 6.0, land=None) -> list[AtmosphericExcess]:
    """Months and hours in which lightning noise probably dominates a site.

    Parameters
    ----------
    lat_deg, lon_deg : float
        Receiving site [deg].
    months : iterable of int
        Months 1-12 of the plan.
    freq_mhz : array_like
        Frequencies in use [MHz].
    man_made_c_db, man_made_d : float
        P.372 man-made coefficients of the site [dB], [dB/decade].
    threshold_db : float
        Excess of the atmospheric median over the man-made median that
        counts as dominating [dB]; 6 dB means atmospheric noise is at least
        four times the man-made power, so the total rises by 7 dB or more.
    land : float, optional
        Land fraction around the site [0-1]; default :func:`land_fraction`.

    Returns
    -------
    list of AtmosphericExcess
        One per month with at least one such hour, in the order given.

    References
    ----------
    ITU-R P.372 (atmospheric noise due to lightning; man-made noise, Table 1);
    the threshold is this function's parameter (common practice, no source).
    """
    f = np.atleast_1d(np.asarray(freq_mhz, float))
    hours = np.arange(24)
    man = noise.man_made_noise_db(f, man_made_c_db, man_made_d)               # (c,)
    out = []
    for month in months:
        fa, _, _ = atmospheric_noise_db(f[None, :], lat_deg, lon_deg, int(month), hours[:, None], land)
        excess = fa - man[None, :]                                           # (24, c)
        hot = np.flatnonzero((excess > threshold_db).any(axis=1))
        if hot.size:
            h, c = np.unravel_index(np.argmax(excess), excess.shape)
            out.append(AtmosphericExcess(int(month), tuple(int(x) for x in hot), float(excess[h, c]),
                                         float(f[c]), int(h)))
    return out


def describe() -> str:
    """One paragraph on the atmospheric noise model, for a plan's assumptions."""
    return ("Atmospheric (lightning) noise: a coarse model with the structure of ITU-R P.372's "
            "atmospheric noise due to lightning - median Fam at 1 MHz by local season (southern seasons flipped) and 4-hour local-time block "
            "(interpolated between block centres), from night levels by latitude for land and sea mixed by "
            f"the land fraction within about {LAND_SMOOTHING_KM:g} km (GLOBE land mask), carried to each "
            "frequency by P.372-shaped curves Fa = a(f) Fam + b(f), with upper and lower deciles by frequency "
            "and time of day; summed with man-made and galactic noise by P.372 §8. The values are recalled "
            "from memory of P.372's maps and curves, not copied: expect about 6 dB of error, up to 15 dB "
            "where the maps show regional detail.")
