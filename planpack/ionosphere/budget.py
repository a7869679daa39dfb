"""Hour-by-hour link predictions: the entry point that compile.py calls.

For each link, each UTC hour of a month and each frequency, this module puts
the published pieces together in the structure of ITU-R P.533 (paths up to
about 2000 km, one control point at mid-path):

* ground wave, E modes and F2 modes, each with its own ray geometry, losses
  and antenna gains at the ray's elevation;
* median SNR = received power − noise power in the channel's bandwidth;
* the fraction of days the channel works, from the MUF deciles (P.1239) and
  the signal and noise deciles (P.372 / P.533 §10);
* the mode that carries the channel (``via``) and whether the link sits in
  a skip zone.

Whole hours. The ionosphere, the sun and the budget are evaluated at the 48
half-hours of the day (h:00 and h:30, :data:`SAMPLE_UTC_H`); the figure of
hour slot h is the worst of the samples at h:00, h:30 and h+1:00, so that a
channel promised for an hour holds from its first minute to its last.

Frequencies. Figures come for the plan's channels and for the shared band
grid (:mod:`planpack.bandgrid`), each with its own antenna gain tables; the
grid carries the LUF, usable windows and the frequency window of a gap.
:func:`predict_link_hours` evaluates any other set of frequencies (request
candidates) for chosen (link, hour) pairs, with gains interpolated between
grid points.

Two functions are the seams where the noise and the ground-wave models
plug in: :func:`received_noise` and :func:`ground_wave_basic_loss`.

Everything is numpy, float32 in the (link × sample × frequency) arrays,
chunked over links to keep memory flat.
"""

from __future__ import annotations

import dataclasses
import datetime as _dt

import numpy as np
from scipy.special import ndtr

from planpack import bandgrid

from . import absorption, atmospheric, geodesy, groundwave, iri, muf, noise, sun

#: Integer codes of the mode that carries a channel, and their names.
VIA_NONE, VIA_GROUND, VIA_E, VIA_F2 = 0, 1, 2, 3
VIA_NAMES = {VIA_NONE: None, VIA_GROUND: "ground", VIA_E: "E", VIA_F2: "F2"}

#: Below this fraction of good days a channel counts as not carried at all.
NOT_CARRIED_BELOW = 0.01

#: Finite floor for SNR figures where no signal arrives [dB].
SNR_FLOOR_DB = -99.0

#: Day-to-day deviation of the sky-wave signal: upper and lower decile from
#: the monthly median [dB] (ITU-R P.842-6 Table 2 / P.533-14 §10, geomagnetic
#: latitude below 60°; from memory). The ground wave is taken as steady.
SKY_SIGNAL_UPPER_DECILE_DB = 6.0
SKY_SIGNAL_LOWER_DECILE_DB = 8.0

#: Reliability at which the LUF (like the OWF) is given [-].
LUF_RELIABILITY = 0.9

#: Sample times of the day [h UTC]: every half hour. Hour slot h is the
#: worst of samples 2h, 2h + 1 and 2h + 2 (mod 48), i.e. h:00, h:30, h+1:00.
SAMPLES_PER_HOUR = 2
SAMPLE_UTC_H = np.arange(24 * SAMPLES_PER_HOUR) / SAMPLES_PER_HOUR
SAMPLE_UTC_H.flags.writeable = False

#: Frequency grid of the band-wide figures and the LUF [MHz] (the shared grid).
LUF_GRID_MHZ = bandgrid.GRID_MHZ

#: Cells (link × sample × frequency) handled per chunk: bounds the
#: temporaries to a few tens of MB and keeps them near the cache.
_TARGET_CELLS_PER_CHUNK = 400_000

_F32 = np.float32


def _as(name, value, shape, dtype=float):
    arr = np.asarray(value, dtype=dtype)
    if arr.shape != shape:
        raise ValueError(f"{name}: expected an array of shape {shape}, got {arr.shape}")
    if arr.dtype.kind == "f" and not np.all(np.isfinite(arr)):
        raise ValueError(f"{name}: every value must be finite")
    return arr


def _gain_table(name, value, rows, columns):
    """A gain table (rows, columns, 91) as C-ordered float32 [dBi], checked."""
    arr = np.asarray(value)
    want = f"({'stations' if rows is None else rows}, {columns}, 91)"
    if arr.ndim != 3 or arr.shape[2] != 91 or (rows is not None and arr.shape[0] != rows) \
            or (columns is not None and arr.shape[1] != columns):
        raise ValueError(f"{name}: expected gain tables of shape {want}, got {arr.shape}")
    arr = np.ascontiguousarray(arr, dtype=_F32)
    if not np.all(np.isfinite(arr)):
        raise ValueError(f"{name}: every gain must be finite")
    return arr


@dataclasses.dataclass(frozen=True)
class ChannelSet:
    """The c channels (or any set of frequencies) to predict.

    Attributes
    ----------
    freq_mhz : ndarray (c,)
        Carrier (dial) frequency [MHz], 1..40.
    required_snr_db : ndarray (c,)
        SNR the channel's mode needs in its bandwidth [dB].
    bandwidth_hz : ndarray (c,)
        Receiver noise bandwidth [Hz].
    """

    freq_mhz: np.ndarray
    required_snr_db: np.ndarray
    bandwidth_hz: np.ndarray

    def __post_init__(self):
        f = np.atleast_1d(np.asarray(self.freq_mhz, float))
        c = f.shape
        if f.ndim != 1 or f.size == 0:
            raise ValueError("freq_mhz: expected a non-empty 1-D array of frequencies")
        object.__setattr__(self, "freq_mhz", _as("freq_mhz", f, c))
        object.__setattr__(self, "required_snr_db", _as("required_snr_db", np.atleast_1d(self.required_snr_db), c))
        object.__setattr__(self, "bandwidth_hz", _as("bandwidth_hz", np.atleast_1d(self.bandwidth_hz), c))
        if np.any((self.freq_mhz < 1.0) | (self.freq_mhz > 40.0)):
            raise ValueError("freq_mhz: HF prediction covers 1-40 MHz; got "
                             f"{self.freq_mhz.min():g}..{self.freq_mhz.max():g} MHz")
        if np.any(self.bandwidth_hz <= 0):
            raise ValueError("bandwidth_hz: every bandwidth must be > 0 Hz")

    @property
    def size(self):
        return self.freq_mhz.size


@dataclasses.dataclass(frozen=True)
class LinkSet:
    """The n directed links to predict, with their antennas and receiving noise.

    Gain tables come in one of two forms:

    * per station (preferred, small): ``tx_station`` and ``rx_station`` give
      each link's row in the tables; pass the same station array as
      ``tx_gain_dbi`` and ``rx_gain_dbi`` (it is stored once);
    * per link (``tx_station`` and ``rx_station`` left out): row i of the
      tables belongs to link i.

    Attributes
    ----------
    tx_lat_deg, tx_lon_deg, rx_lat_deg, rx_lon_deg : ndarray (n,)
        End points [deg]; the receiver's position also places its noise.
    tx_power_w : ndarray (n,)
        Power delivered to the transmitting antenna [W].
    tx_gain_dbi, rx_gain_dbi : ndarray (k, c, 91)
        Azimuth-averaged gain at elevation 0..90° in 1° steps on each of the
        c channels [dBi], including the real ground under the antenna and
        the loss between set and antenna; k = stations or links. Stored as
        float32.
    vertical : ndarray (n,) of bool
        True when the antennas are vertically polarised (for ground wave).
    ground_eps_r, ground_sigma_s_m : ndarray (n,)
        Ground constants along the path [-], [S/m] (ITU-R P.527).
    noise_c_db, noise_d : ndarray (n,)
        P.372 man-made noise coefficients at the receiver [dB], [dB/decade].
    noise_margin_db : ndarray (n,)
        Extra noise the plan declares at the receiver [dB].
    tx_ground_gain_dbi, rx_ground_gain_dbi : ndarray (k, c), optional
        Gain credited for the ground wave [dBi] (4.77 dBi for a short
        monopole on perfect ground). Default: the table's peak, but never
        more than 4.77 dBi.
    noise_upper_decile_db, noise_lower_decile_db : ndarray (n,), optional
        Day-to-day deciles of the man-made noise [dB]; default from the
        P.372 environment whose c is nearest.
    tx_station, rx_station : ndarray (n,) of int, optional
        Row of each link's transmitting and receiving antenna in the gain
        tables (per-station form).
    tx_grid_gain_dbi, rx_grid_gain_dbi : ndarray (k, g, 91), optional
        The same gains on the band grid :data:`planpack.bandgrid.GRID_MHZ`
        (g = 41) [dBi], same rows as the channel tables. Without them the
        grid uses the table of the nearest channel.
    tx_grid_ground_gain_dbi, rx_grid_ground_gain_dbi : ndarray (k, g), optional
        Ground-wave gains on the band grid [dBi]; default as for channels.
    path_section_km : ndarray (n, s), optional
        Lengths of the land and sea sections of each path, transmitter to
        receiver, padded with 0 [km] (:func:`planpack.ionosphere.landsea.path_sections`).
    path_section_sea : ndarray (n, s) of bool, optional
        True for a sea section (ITU-R P.527 sea); land sections take
        ``ground_eps_r`` and ``ground_sigma_s_m``. Without sections the whole
        path is of that ground.
    """

    tx_lat_deg: np.ndarray
    tx_lon_deg: np.ndarray
    rx_lat_deg: np.ndarray
    rx_lon_deg: np.ndarray
    tx_power_w: np.ndarray
    tx_gain_dbi: np.ndarray
    rx_gain_dbi: np.ndarray
    vertical: np.ndarray
    ground_eps_r: np.ndarray
    ground_sigma_s_m: np.ndarray
    noise_c_db: np.ndarray
    noise_d: np.ndarray
    noise_margin_db: np.ndarray
    tx_ground_gain_dbi: np.ndarray | None = None
    rx_ground_gain_dbi: np.ndarray | None = None
    noise_upper_decile_db: np.ndarray | None = None
    noise_lower_decile_db: np.ndarray | None = None
    tx_station: np.ndarray | None = None
    rx_station: np.ndarray | None = None
    tx_grid_gain_dbi: np.ndarray | None = None
    rx_grid_gain_dbi: np.ndarray | None = None
    tx_grid_ground_gain_dbi: np.ndarray | None = None
    rx_grid_ground_gain_dbi: np.ndarray | None = None
    path_section_km: np.ndarray | None = None
    path_section_sea: np.ndarray | None = None
    # ground-wave losses already computed for this link set: they depend on neither month nor sun
    _memo: dict = dataclasses.field(default_factory=dict, init=False, compare=False, repr=False)

    def __post_init__(self):
        lat = np.atleast_1d(np.asarray(self.tx_lat_deg, float))
        if lat.ndim != 1:
            raise ValueError("tx_lat_deg: expected a 1-D array, one value per link")
        n = lat.shape
        for name in ("tx_lat_deg", "tx_lon_deg", "rx_lat_deg", "rx_lon_deg", "tx_power_w",
                     "ground_eps_r", "ground_sigma_s_m", "noise_c_db", "noise_d", "noise_margin_db"):
            object.__setattr__(self, name, _as(name, np.atleast_1d(getattr(self, name)), n))
        object.__setattr__(self, "vertical", _as("vertical", np.atleast_1d(self.vertical), n, bool))
        for name in ("tx_lat_deg", "rx_lat_deg"):
            if np.any(np.abs(getattr(self, name)) > 90):
                raise ValueError(f"{name}: latitude must be within -90..90 degrees")
        if np.any(self.tx_power_w <= 0):
            raise ValueError("tx_power_w: transmitter power must be > 0 W")
        if np.any(self.ground_eps_r < 1) or np.any(self.ground_sigma_s_m <= 0):
            raise ValueError("ground_eps_r must be >= 1 and ground_sigma_s_m > 0 S/m")
        for name in ("noise_upper_decile_db", "noise_lower_decile_db"):
            if getattr(self, name) is not None:
                object.__setattr__(self, name, _as(name, getattr(self, name), n))
                if np.any(getattr(self, name) <= 0):
                    raise ValueError(f"{name}: decile deviations must be > 0 dB")

        per_station = self.tx_station is not None or self.rx_station is not None
        if per_station and (self.tx_station is None or self.rx_station is None):
            raise ValueError("tx_station and rx_station: give both (per-station tables) or neither (per-link)")
        rows = None if per_station else n[0]
        same = self.rx_gain_dbi is self.tx_gain_dbi
        gt = _gain_table("tx_gain_dbi", self.tx_gain_dbi, rows, None)
        c = gt.shape[1]
        gr = gt if same else _gain_table("rx_gain_dbi", self.rx_gain_dbi, rows, c)
        object.__setattr__(self, "tx_gain_dbi", gt)
        object.__setattr__(self, "rx_gain_dbi", gr)
        if per_station:
            for name, tab in (("tx_station", gt), ("rx_station", gr)):
                idx = np.asarray(getattr(self, name))
                if idx.shape != n or idx.dtype.kind not in "iu":
                    raise ValueError(f"{name}: expected {n[0]} integer row indices, got {idx.dtype} {idx.shape}")
                if idx.size and (idx.min() < 0 or idx.max() >= tab.shape[0]):
                    raise ValueError(f"{name}: row indices must lie within 0..{tab.shape[0] - 1}")
                object.__setattr__(self, name, idx.astype(np.intp))
        for name, tab in (("tx_ground_gain_dbi", gt), ("rx_ground_gain_dbi", gr)):
            if getattr(self, name) is not None:
                object.__setattr__(self, name, _as(name, getattr(self, name), tab.shape[:2]))

        if (self.tx_grid_gain_dbi is None) != (self.rx_grid_gain_dbi is None):
            raise ValueError("tx_grid_gain_dbi and rx_grid_gain_dbi: give both or neither")
        if self.tx_grid_gain_dbi is not None:
            g = bandgrid.GRID_POINTS
            same = self.rx_grid_gain_dbi is self.tx_grid_gain_dbi
            ggt = _gain_table("tx_grid_gain_dbi", self.tx_grid_gain_dbi, gt.shape[0], g)
            ggr = ggt if same else _gain_table("rx_grid_gain_dbi", self.rx_grid_gain_dbi, gr.shape[0], g)
            object.__setattr__(self, "tx_grid_gain_dbi", ggt)
            object.__setattr__(self, "rx_grid_gain_dbi", ggr)
        if (self.path_section_km is None) != (self.path_section_sea is None):
            raise ValueError("path_section_km and path_section_sea: give both or neither")
        if self.path_section_km is not None:
            km = np.asarray(self.path_section_km, float)
            if km.ndim != 2 or km.shape[0] != n[0] or not np.all(np.isfinite(km)) or np.any(km < 0):
                raise ValueError(f"path_section_km: expected finite lengths >= 0 km of shape ({n[0]}, sections)")
            object.__setattr__(self, "path_section_km", km)
            object.__setattr__(self, "path_section_sea", _as("path_section_sea", self.path_section_sea, km.shape, bool))
        for name, tab in (("tx_grid_ground_gain_dbi", self.tx_grid_gain_dbi),
                          ("rx_grid_ground_gain_dbi", self.rx_grid_gain_dbi)):
            if getattr(self, name) is not None:
                if tab is None:
                    raise ValueError(f"{name}: needs the grid gain tables too")
                object.__setattr__(self, name, _as(name, getattr(self, name), tab.shape[:2]))

    @property
    def size(self):
        return self.tx_lat_deg.size

    @property
    def channel_count(self):
        """Number of channels the gain tables hold [-]."""
        return self.tx_gain_dbi.shape[1]

    @property
    def has_grid_tables(self):
        """True when gains on the band grid were given."""
        return self.tx_grid_gain_dbi is not None

    def tx_rows(self):
        """Row of each link's transmitting antenna in the tables, (n,) int."""
        return np.arange(self.size) if self.tx_station is None else self.tx_station

    def rx_rows(self):
        """Row of each link's receiving antenna in the tables, (n,) int."""
        return np.arange(self.size) if self.rx_station is None else self.rx_station

    def subset(self, index):
        """The links picked by ``index`` (integer indices or a boolean mask), as a LinkSet.

        Per-station tables are shared, not copied; per-link tables are sliced.
        """
        idx = np.arange(self.size)[index]
        per_link = {f.name: getattr(self, f.name)[idx] for f in dataclasses.fields(self)
                    if f.name in _PER_LINK_FIELDS and getattr(self, f.name) is not None}
        if self.tx_station is not None:
            return dataclasses.replace(self, **per_link, tx_station=self.tx_station[idx],
                                       rx_station=self.rx_station[idx])
        tables = {name: getattr(self, name)[idx] for name in _TABLE_FIELDS if getattr(self, name) is not None}
        if self.rx_gain_dbi is self.tx_gain_dbi:
            tables["rx_gain_dbi"] = tables["tx_gain_dbi"]
        if self.tx_grid_gain_dbi is not None and self.rx_grid_gain_dbi is self.tx_grid_gain_dbi:
            tables["rx_grid_gain_dbi"] = tables["tx_grid_gain_dbi"]
        return dataclasses.replace(self, **per_link, **tables)


_PER_LINK_FIELDS = ("tx_lat_deg", "tx_lon_deg", "rx_lat_deg", "rx_lon_deg", "tx_power_w", "vertical",
                    "ground_eps_r", "ground_sigma_s_m", "noise_c_db", "noise_d", "noise_margin_db",
                    "noise_upper_decile_db", "noise_lower_decile_db", "path_section_km", "path_section_sea")
_TABLE_FIELDS = ("tx_gain_dbi", "rx_gain_dbi", "tx_ground_gain_dbi", "rx_ground_gain_dbi",
                 "tx_grid_gain_dbi", "rx_grid_gain_dbi", "tx_grid_ground_gain_dbi", "rx_grid_ground_gain_dbi")


@dataclasses.dataclass(frozen=True)
class MonthPrediction:
    """Predictions for n links × 24 UTC hour slots (0..23) of one month.

    Every per-hour figure is the worst over the hour: the samples at h:00,
    h:30 and h+1:00 (:data:`SAMPLE_UTC_H`).

    Per link (n,): ``distance_km``, ``azimuth_deg`` (at the transmitter),
    ``n_hops`` (F2 hops, the most any sample needs), ``n_hops_e``,
    ``control_lat_deg``, ``control_lon_deg``.

    Per link and hour (n, 24): ``muf_mhz`` (path basic MUF, the higher of
    the E and F2 MUFs; lowest over the hour), ``muf_f2_mhz``, ``muf_e_mhz``
    (lowest over the hour); ``owf_mhz`` (lower decile of the MUF, exceeded
    on 90 % of days; lowest over the hour); ``luf_mhz`` (lowest frequency
    whose sky-wave SNR meets the requirement on 90 % of days, on the band
    grid refined between grid points; highest over the hour; NaN if none);
    ``luf_below_floor`` (bool: that frequency is the grid's floor,
    :data:`planpack.bandgrid.GRID_LOW_KHZ`, so the true LUF is at or below
    it). At the hour's limiting sample (lowest path MUF): ``foF2_mhz``,
    ``foE_mhz``, ``m3000f2``, ``hmF2_km``, ``fH_mhz`` at the control point;
    ``reflection_height_km``; ``solar_zenith_deg``; ``elevation_deg`` (F2
    ray), ``elevation_e_deg``.

    Per link, hour and channel (n, 24, c), from the hour's worst sample
    (fewest good days, then lowest SNR): ``snr_db`` (median, of the
    carrying mode), ``margin_db`` (snr − required), ``good_days`` (0..1),
    ``via`` (int8, see :data:`VIA_NAMES`), ``skip`` (bool).

    Per link, hour and band-grid frequency (n, 24, g), the same rule:
    ``grid_good_days`` (0..1) and ``grid_margin_db`` (median SNR of the
    best mode − ``grid_required_snr_db`` in ``grid_bandwidth_hz``) at
    ``grid_mhz`` (g,).

    Per link and sample (n, 48): ``sample_foF2_mhz``, ``sample_muf_mhz`` at
    ``sample_utc_h`` (48,), for checks and charts.
    """

    year: int
    month: int
    ssn: float
    distance_km: np.ndarray
    azimuth_deg: np.ndarray
    n_hops: np.ndarray
    n_hops_e: np.ndarray
    control_lat_deg: np.ndarray
    control_lon_deg: np.ndarray
    foF2_mhz: np.ndarray
    foE_mhz: np.ndarray
    m3000f2: np.ndarray
    hmF2_km: np.ndarray
    fH_mhz: np.ndarray
    reflection_height_km: np.ndarray
    solar_zenith_deg: np.ndarray
    muf_mhz: np.ndarray
    muf_f2_mhz: np.ndarray
    muf_e_mhz: np.ndarray
    owf_mhz: np.ndarray
    luf_mhz: np.ndarray
    elevation_deg: np.ndarray
    elevation_e_deg: np.ndarray
    snr_db: np.ndarray
    margin_db: np.ndarray
    good_days: np.ndarray
    via: np.ndarray
    skip: np.ndarray
    luf_below_floor: np.ndarray
    grid_mhz: np.ndarray
    grid_good_days: np.ndarray
    grid_margin_db: np.ndarray
    grid_required_snr_db: float
    grid_bandwidth_hz: float
    sample_utc_h: np.ndarray
    sample_foF2_mhz: np.ndarray
    sample_muf_mhz: np.ndarray


@dataclasses.dataclass(frozen=True)
class LinkHourPrediction:
    """Predictions of chosen (link, hour) pairs on a set of k frequencies.

    Each figure is the worst over the hour (samples h:00, h:30, h+1:00),
    as in :class:`MonthPrediction`.

    Attributes
    ----------
    link_index, utc_hour : ndarray (p,) of int
        The pairs: link row in the LinkSet and UTC hour slot 0..23.
    freq_mhz : ndarray (k,)
        The frequencies [MHz].
    good_days : ndarray (p, k) float32
        Fraction of days the frequency works, 0..1.
    snr_db, margin_db : ndarray (p, k) float32
        Median SNR of the carrying mode and its margin over the requirement [dB].
    via : ndarray (p, k) int8
        Carrying mode, see :data:`VIA_NAMES`.
    muf_mhz, owf_mhz : ndarray (p,)
        Path MUF and OWF, lowest over the hour [MHz].
    """

    link_index: np.ndarray
    utc_hour: np.ndarray
    freq_mhz: np.ndarray
    good_days: np.ndarray
    snr_db: np.ndarray
    margin_db: np.ndarray
    via: np.ndarray
    muf_mhz: np.ndarray
    owf_mhz: np.ndarray


def reliability(margin_db, upper_decile_db, lower_decile_db):
    """Probability that a quantity with decile deviations exceeds its threshold.

    Parameters
    ----------
    margin_db : array_like
        Median minus threshold [dB].
    upper_decile_db, lower_decile_db : array_like
        Deviations of the upper and lower decile from the median [dB].

    Returns
    -------
    ndarray
        Probability 0..1, 0.5 at zero margin, 0.9 when the margin equals
        the lower decile deviation.

    References
    ----------
    ITU-R P.533-14 §10 (basic circuit reliability: the SNR distribution is
    two half-normals fitted to the deciles).
    """
    m = np.asarray(margin_db)
    sigma = np.where(m >= 0, lower_decile_db, upper_decile_db) / muf.Z90
    with np.errstate(divide="ignore", invalid="ignore"):
        z = np.where(sigma > 0, m / np.where(sigma > 0, sigma, 1.0), np.sign(m) * np.inf)
    return ndtr(z)


def combined_deciles_db(signal_upper_db, signal_lower_db, noise_upper_db, noise_lower_db):
    """Decile deviations of the SNR from those of the signal and the noise.

    Parameters
    ----------
    signal_upper_db, signal_lower_db : array_like
        Upper and lower decile deviations of the signal [dB].
    noise_upper_db, noise_lower_db : array_like
        Upper and lower decile deviations of the noise [dB].

    Returns
    -------
    upper_db, lower_db : ndarray
        SNR deciles: √(Su² + Nl²) and √(Sl² + Nu²) [dB].

    References
    ----------
    ITU-R P.533-14 §10, eqs. for DU and DL (signal and noise independent).
    """
    # P.533 §10: SNR upper decile from signal upper & noise lower, and vice versa
    return np.hypot(signal_upper_db, noise_lower_db), np.hypot(signal_lower_db, noise_upper_db)


# ---------------------------------------------------------------------------------------------
# The two seams: noise at the receiver and the ground wave. Each is one function of plain
# arrays, so that a better model (P.372 atmospheric noise by place, season and time block;
# a smooth-earth ground wave over mixed land and sea) replaces it without touching the rest.
# ---------------------------------------------------------------------------------------------

def received_noise(freq_mhz, bandwidth_hz, rx_lat_deg, rx_lon_deg, month, utc_h, foF2_rx_mhz,
                   man_made_c_db, man_made_d, man_made_upper_db, man_made_lower_db, margin_db):
    """External noise power at each receiver and its day-to-day deciles.

    Parameters
    ----------
    freq_mhz, bandwidth_hz : ndarray (F,)
        Frequencies [MHz] and receiver noise bandwidths [Hz].
    rx_lat_deg, rx_lon_deg : ndarray (m,)
        Receiver positions [deg]: they place the atmospheric noise.
    month : int
        Month 1..12 (season).
    utc_h : ndarray (m, S) or (S,)
        UTC time of each sample [h]: atmospheric noise follows local time.
    foF2_rx_mhz : ndarray (m, S)
        F2 critical frequency over the receiver [MHz]; galactic noise reaches
        the ground only above it.
    man_made_c_db, man_made_d : ndarray (m,)
        P.372 man-made noise coefficients [dB], [dB/decade].
    man_made_upper_db, man_made_lower_db : ndarray (m,)
        Decile deviations of the man-made noise [dB].
    margin_db : ndarray (m,)
        Extra noise the plan declares at the receiver [dB].

    Returns
    -------
    noise_dbw, upper_db, lower_db : ndarray (m, S, F), float32
        Median noise power in each bandwidth [dBW] and the decile deviations
        of the summed noise [dB].

    Notes
    -----
    Man-made, galactic (above foF2 only) and atmospheric noise, each with its
    own deciles, are summed by P.372 §8; the plan's noise margin is added on
    top. Rows that share a receiver and sample times are computed once (a
    net has far fewer receivers than links).

    References
    ----------
    ITU-R P.372-16 §5 (galactic), §6 (man-made, Tables 1-2), atmospheric
    noise (see :mod:`planpack.ionosphere.atmospheric`), §8 (combination of
    noises); §2 (Pn = Fa + 10 log b - 204 dBW).
    """
    f = np.asarray(freq_mhz, float)
    m = np.size(rx_lat_deg)
    fof2 = np.asarray(foF2_rx_mhz, float).reshape(m, -1)
    utc = np.broadcast_to(np.asarray(utc_h, float), fof2.shape)
    per_row = [np.asarray(a, float).reshape(m) for a in
               (rx_lat_deg, rx_lon_deg, man_made_c_db, man_made_d, man_made_upper_db, man_made_lower_db, margin_db)]
    key = np.column_stack(per_row + [utc])
    _, first, back = np.unique(key, axis=0, return_index=True, return_inverse=True)
    lat, lon, c_db, d, up_mm, lo_mm, margin = (a[first][:, None, None] for a in per_row)
    u_utc = utc[first][:, :, None]
    f3 = f[None, None, :]
    atm = atmospheric.atmospheric_noise_db(f3, lat, lon, int(month), u_utc)           # P.372 atmospheric
    fa, up, lo = noise.external_noise_db(f3, c_db, d, up_mm, lo_mm, foF2_mhz=fof2[first][:, :, None],
                                         atmospheric=atm)                              # P.372 §8
    bw_term = (10.0 * np.log10(np.asarray(bandwidth_hz, float)) + noise.KT0_DBW_HZ)[None, None, :]
    pn = fa + margin + bw_term                                                         # P.372 §2
    back = np.ravel(back)
    return pn.astype(_F32)[back], up.astype(_F32)[back], lo.astype(_F32)[back]


def ground_wave_basic_loss(distance_km, freq_mhz, eps_r, sigma_s_m, vertical,
                           tx_lat_deg, tx_lon_deg, rx_lat_deg, rx_lon_deg, *, sections=None):
    """Basic transmission loss of the ground wave between ideal radiators.

    Parameters
    ----------
    distance_km : ndarray (m,)
        Path length [km].
    freq_mhz : ndarray (F,)
        Frequencies [MHz].
    eps_r, sigma_s_m : ndarray (m,)
        Ground constants of the path's land [-], [S/m].
    vertical : ndarray (m,) of bool
        Vertical polarisation at both ends.
    tx_lat_deg, tx_lon_deg, rx_lat_deg, rx_lon_deg : ndarray (m,)
        End points [deg].
    sections : (ndarray (m, s), ndarray (m, s) of bool), optional
        Land and sea sections of each path [km] and which are sea; without
        them the whole path is of the given ground.

    Returns
    -------
    ndarray (m, F)
        Loss [dB] over a smooth round earth; add the two antennas'
        ground-wave gains to get the received power.

    References
    ----------
    :func:`planpack.ionosphere.groundwave.ground_wave_loss_db` (one ground) and
    :func:`planpack.ionosphere.groundwave.mixed_path_loss_db` (Millington's
    method for land and sea sections, ITU-R P.368 §4).
    """
    f = np.asarray(freq_mhz, float)
    if f.size > _GROUND_WAVE_POINTS:
        # many frequencies (request candidates): the loss is smooth in log f, so compute it on a
        # log grid across them and interpolate; each distinct frequency costs a residue-series solve
        fg = np.geomspace(f.min(), f.max(), _GROUND_WAVE_POINTS)
        at = ground_wave_basic_loss(distance_km, fg, eps_r, sigma_s_m, vertical, tx_lat_deg, tx_lon_deg,
                                    rx_lat_deg, rx_lon_deg, sections=sections)
        x, xg = np.log(f), np.log(fg)
        finite = np.isfinite(at)
        return np.stack([np.interp(x, xg[ok], row[ok]) if ok.sum() > 1 else np.full(f.size, np.inf)
                         for row, ok in zip(at, finite)]) if len(at) else np.zeros((0, f.size))
    if sections is not None:
        km, sea = sections
        if np.any(np.asarray(sea, bool) & (np.asarray(km) > 0)):
            return groundwave.mixed_path_loss_db(km, sea, eps_r, sigma_s_m, f, vertical)
    return groundwave.ground_wave_loss_db(np.asarray(distance_km, float)[:, None], f[None, :],
                                          np.asarray(eps_r, float)[:, None],
                                          np.asarray(sigma_s_m, float)[:, None],
                                          np.asarray(vertical, bool)[:, None])


#: Above this many frequencies the ground wave is computed on a log grid across them and
#: interpolated (it is smooth in log f; tests/ionosphere/test_budget.py bounds the error).
_GROUND_WAVE_POINTS = 48


def _ground_loss(links, lk, dist, freq):
    """The ground-wave loss of rows ``lk`` [dB], (m, F), computed once per link set."""
    key = (np.asarray(lk).tobytes(), np.asarray(freq, float).tobytes())
    hit = links._memo.get(key)
    if hit is not None:
        return hit
    sections = None
    if links.path_section_km is not None:
        sections = (links.path_section_km[lk], links.path_section_sea[lk])
    loss = ground_wave_basic_loss(dist, freq, links.ground_eps_r[lk], links.ground_sigma_s_m[lk],
                                  links.vertical[lk], links.tx_lat_deg[lk], links.tx_lon_deg[lk],
                                  links.rx_lat_deg[lk], links.rx_lon_deg[lk], sections=sections)
    if len(links._memo) < 4096:
        links._memo[key] = loss
    return loss


# ---------------------------------------------------------------------------------------------
# Paths: geometry, ionosphere and MUFs per link and sample time
# ---------------------------------------------------------------------------------------------

@dataclasses.dataclass(frozen=True)
class _Paths:
    """Per link (n,) and per link × sample (n, S) quantities that do not depend on frequency."""

    utc_h: np.ndarray            # (S,) sample times [h]
    dist: np.ndarray             # (n,) [km]
    azi: np.ndarray              # (n,) [deg]
    cp_lat: np.ndarray           # (n,) [deg]
    cp_lon: np.ndarray
    fh: np.ndarray               # (n,) [MHz]
    ne: np.ndarray               # (n,) E hops
    e_ok: np.ndarray             # (n,) bool, E modes counted
    elev_e: np.ndarray           # (n,) [deg]
    fof2: np.ndarray             # (n, S) [MHz]
    foe: np.ndarray
    m3000: np.ndarray
    hmf2: np.ndarray
    chi: np.ndarray              # (n, S) solar zenith at the control point [deg]
    fof2_rx: np.ndarray          # (n, S) over the receiver [MHz]
    hr: np.ndarray               # (n, S) F2 mirror height [km]
    nf: np.ndarray               # (n, S) F2 hops
    elev_f: np.ndarray           # (n, S) [deg]
    muf_f2: np.ndarray           # (n, S) [MHz]
    muf_e: np.ndarray
    fs: np.ndarray               # (n, S) E screening frequency of the F2 ray [MHz]
    base_f2: np.ndarray          # (n, S) Pt − 20 log p' − Lg − Lz, F2 [dBW]
    base_e: np.ndarray           # (n, S) the same, E
    absorb_f2: np.ndarray        # (n, S) absorption path factor, F2 [dB MHz^1.98]
    absorb_e: np.ndarray

    @property
    def muf(self):
        return np.maximum(self.muf_f2, self.muf_e)

    @property
    def owf(self):
        return np.maximum(muf.owf_mhz(self.muf_f2), muf.owf_mhz(self.muf_e, muf.E_LOWER_DECILE_RATIO))


def _paths(links: LinkSet, year, month, ssn, utc_h) -> _Paths:
    """Geometry, ionosphere and MUFs of every link at the sample times (P.533 §2-§5)."""
    n = links.size
    utc_h = np.asarray(utc_h, float)
    dist, azi1, _ = geodesy.inverse(links.tx_lat_deg, links.tx_lon_deg, links.rx_lat_deg, links.rx_lon_deg)
    # the control point from the same end in both directions, so that A->B and B->A share it exactly
    swap = (links.tx_lat_deg > links.rx_lat_deg) | ((links.tx_lat_deg == links.rx_lat_deg)
                                                     & (links.tx_lon_deg > links.rx_lon_deg))
    a_lat = np.where(swap, links.rx_lat_deg, links.tx_lat_deg)
    a_lon = np.where(swap, links.rx_lon_deg, links.tx_lon_deg)
    b_lat = np.where(swap, links.tx_lat_deg, links.rx_lat_deg)
    b_lon = np.where(swap, links.tx_lon_deg, links.rx_lon_deg)
    cp_lat, cp_lon = geodesy.midpoint(a_lat, a_lon, b_lat, b_lon)            # P.533 §2, Table 1
    cp_lat, cp_lon = np.atleast_1d(cp_lat), np.atleast_1d(cp_lon)

    # the ionosphere once per distinct point: control points and receivers
    pts = np.concatenate([np.stack([cp_lat, cp_lon], 1), np.stack([links.rx_lat_deg, links.rx_lon_deg], 1)])
    uniq, inv = np.unique(np.round(pts, 9), axis=0, return_inverse=True)
    inv = inv.ravel()
    ion = iri.monthly_ionosphere(uniq[:, 0], uniq[:, 1], year, month, ssn, utc_hours=utc_h)
    cp, rx = inv[:n], inv[n:]
    fof2, foe, m3000, hmf2 = ion.foF2_mhz[cp], ion.foE_mhz[cp], ion.m3000f2[cp], ion.hmF2_km[cp]
    chi, fh, fof2_rx = ion.solar_zenith_deg[cp], ion.fH_mhz[cp], ion.foF2_mhz[rx]

    # F2 rays, (n, S)
    hr = muf.reflection_height_km(m3000)                                      # P.533 §5.1
    longest_f2 = np.minimum(geodesy.MAX_HOP_F2_KM, geodesy.max_hop_km(hr))
    nf = geodesy.hop_count(dist[:, None], longest_f2)
    hop_f = dist[:, None] / nf
    elev_f = geodesy.elevation_angle_deg(hop_f, hr)
    inc100_f = geodesy.incidence_angle_deg(elev_f, geodesy.D_LAYER_HEIGHT_KM)
    slant_f = nf * geodesy.slant_range_km(hop_f, hr)
    muf_f2 = muf.f2_basic_muf_mhz(hop_f, fof2, m3000, foe, fh[:, None])        # P.1240 eq. 1
    fs = muf.e_screening_frequency_mhz(elev_f, foe)                           # P.533 §4

    # E rays, (n,): the E layer's height is fixed
    ne = geodesy.hop_count(dist, geodesy.MAX_HOP_E_KM)
    e_ok = dist <= 2 * geodesy.MAX_HOP_E_KM                                   # P.533: E modes to 4000 km
    hop_e = dist / ne
    elev_e = geodesy.elevation_angle_deg(hop_e, geodesy.E_LAYER_HEIGHT_KM)
    inc100_e = geodesy.incidence_angle_deg(elev_e, geodesy.D_LAYER_HEIGHT_KM)
    slant_e = ne * geodesy.slant_range_km(hop_e, geodesy.E_LAYER_HEIGHT_KM)
    muf_e = np.where(e_ok[:, None], muf.e_basic_muf_mhz(hop_e[:, None], foe), 0.0)

    # the frequency-independent part of each mode's received power (P.533 §6) and of its
    # absorption (George & Bradley eq. 1), so that per frequency only a few terms remain
    pt_dbw = 10.0 * np.log10(links.tx_power_w)[:, None]
    base_f2 = (pt_dbw - 20.0 * np.log10(np.maximum(slant_f, 1e-3))
               - absorption.ground_reflection_loss_db(nf) - absorption.LZ_DB)
    base_e = np.broadcast_to(pt_dbw - 20.0 * np.log10(np.maximum(slant_e, 1e-3))[:, None]
                             - absorption.ground_reflection_loss_db(ne)[:, None] - absorption.LZ_DB, nf.shape)
    absorb_f2 = absorption.absorption_path_factor_db(chi, ssn, inc100_f, nf)
    absorb_e = absorption.absorption_path_factor_db(chi, ssn, inc100_e[:, None], ne[:, None])
    return _Paths(utc_h=utc_h, dist=dist, azi=azi1, cp_lat=cp_lat, cp_lon=cp_lon, fh=fh, ne=ne, e_ok=e_ok,
                  elev_e=elev_e, fof2=fof2, foe=foe, m3000=m3000, hmf2=hmf2, chi=chi, fof2_rx=fof2_rx, hr=hr,
                  nf=nf, elev_f=elev_f, muf_f2=muf_f2, muf_e=muf_e, fs=fs, base_f2=base_f2,
                  base_e=np.ascontiguousarray(base_e), absorb_f2=absorb_f2, absorb_e=absorb_e)


# ---------------------------------------------------------------------------------------------
# Frequency blocks: frequencies, requirements and where their antenna gains come from
# ---------------------------------------------------------------------------------------------

@dataclasses.dataclass(frozen=True)
class _Block:
    """F frequencies with their requirement and antenna gain source."""

    freq: np.ndarray             # (F,) [MHz]
    req: np.ndarray              # (F,) required SNR [dB]
    bw: np.ndarray               # (F,) [Hz]
    tx_tab: np.ndarray           # (k, T, 91) float32 [dBi]
    rx_tab: np.ndarray
    tx_gg: np.ndarray            # (k, T) ground-wave gains [dBi]
    rx_gg: np.ndarray
    col0: np.ndarray             # (F,) table column of each frequency
    col1: np.ndarray             # (F,) second column when interpolating
    w: np.ndarray | None         # (F,) weight of col1, None for exact columns


def _ground_gains(tab, given):
    if given is not None:
        return np.asarray(given, _F32)
    return np.minimum(tab.max(axis=2), _F32(groundwave.SHORT_MONOPOLE_GAIN_DBI))


def _channel_block(links, channels):
    cols = np.arange(channels.size)
    return _Block(channels.freq_mhz, channels.required_snr_db.astype(_F32), channels.bandwidth_hz,
                  links.tx_gain_dbi, links.rx_gain_dbi,
                  _ground_gains(links.tx_gain_dbi, links.tx_ground_gain_dbi),
                  _ground_gains(links.rx_gain_dbi, links.rx_ground_gain_dbi), cols, cols, None)


def _grid_block(links, channels, freq, req, bw):
    """The band grid; gains from the grid tables, or the nearest channel's table without them."""
    g = freq.size
    req = np.full(g, req, _F32)
    bw = np.full(g, bw)
    if links.has_grid_tables:
        cols = np.arange(g)
        return _Block(freq, req, bw, links.tx_grid_gain_dbi, links.rx_grid_gain_dbi,
                      _ground_gains(links.tx_grid_gain_dbi, links.tx_grid_ground_gain_dbi),
                      _ground_gains(links.rx_grid_gain_dbi, links.rx_grid_ground_gain_dbi), cols, cols, None)
    cols = np.argmin(np.abs(np.log(freq)[:, None] - np.log(channels.freq_mhz)[None, :]), axis=1)
    ch = _channel_block(links, channels)
    return dataclasses.replace(ch, freq=freq, req=req, bw=bw, col0=cols, col1=cols)


def _interpolated_block(links, channels):
    """Arbitrary frequencies, gains interpolated linearly in log f between band-grid tables."""
    grid = np.log(bandgrid.GRID_MHZ)
    x = np.clip(np.log(channels.freq_mhz), grid[0], grid[-1])
    col0 = np.clip(np.searchsorted(grid, x, side="right") - 1, 0, grid.size - 2)
    w = ((x - grid[col0]) / (grid[col0 + 1] - grid[col0])).astype(_F32)
    return _Block(channels.freq_mhz, channels.required_snr_db.astype(_F32), channels.bandwidth_hz,
                  links.tx_grid_gain_dbi, links.rx_grid_gain_dbi,
                  _ground_gains(links.tx_grid_gain_dbi, links.tx_grid_ground_gain_dbi),
                  _ground_gains(links.rx_grid_gain_dbi, links.rx_grid_ground_gain_dbi), col0, col0 + 1, w)


# ---------------------------------------------------------------------------------------------
# The budget on a block of rows (links or link-hour pairs) × samples × frequencies
# ---------------------------------------------------------------------------------------------

@dataclasses.dataclass(frozen=True)
class _Rows:
    """m rows (a link each) × S samples, gathered from the paths and the LinkSet."""

    link: np.ndarray             # (m,) link index
    tx_row: np.ndarray           # (m,) row in the tx tables
    rx_row: np.ndarray
    utc_h: np.ndarray            # (m, S) [h]
    p: dict                      # name -> (m, S) or (m,) arrays from _Paths


_ROW_FIELDS_2D = ("fof2_rx", "elev_f", "muf_f2", "muf_e", "fs", "base_f2", "base_e", "absorb_f2", "absorb_e")
_ROW_FIELDS_1D = ("dist", "fh", "e_ok", "elev_e")


def _rows(links, paths, link, samples=None):
    """Rows for links ``link`` (m,) at sample columns ``samples`` ((m, S) ints; None = all)."""
    link = np.asarray(link)
    if samples is None:
        take2 = {k: getattr(paths, k)[link] for k in _ROW_FIELDS_2D}
        utc = np.broadcast_to(paths.utc_h, (link.size, paths.utc_h.size))
    else:
        take2 = {k: getattr(paths, k)[link[:, None], samples] for k in _ROW_FIELDS_2D}
        utc = paths.utc_h[samples]
    take = {k: getattr(paths, k)[link] for k in _ROW_FIELDS_1D}
    return _Rows(link=link, tx_row=links.tx_rows()[link], rx_row=links.rx_rows()[link], utc_h=utc,
                 p={**take, **take2})


def _gain_lookup(tab, rows, cols, elev_deg):
    """Gain tables (k, T, 91) at rows (m,), columns (F,) and elevations (m, S) -> (m, S, F) [dBi].

    Linear in elevation between the 1° table points.
    """
    el = np.clip(np.asarray(elev_deg, _F32), 0.0, 90.0)
    i0 = np.minimum(el.astype(np.int32), 89)
    t = (el - i0)[:, :, None]
    k, ncol, nel = tab.shape
    flat = tab.reshape(-1)
    itype = np.int32 if flat.size < 2**31 - 2 else np.int64
    start = ((rows.astype(itype) * ncol)[:, None] + cols.astype(itype)[None, :]) * nel     # (m, F)
    idx = start[:, None, :] + i0[:, :, None].astype(itype)                               # (m, S, F)
    g0 = flat[idx]
    idx += 1
    g1 = flat[idx]
    g1 -= g0
    g1 *= t
    g0 += g1
    return g0


def _gains(tab, rows, blk, elev_deg):
    g = _gain_lookup(tab, rows, blk.col0, elev_deg)
    if blk.w is not None:
        g1 = _gain_lookup(tab, rows, blk.col1, elev_deg)
        g += (g1 - g) * blk.w
    return g


def _ground_gain(gg, rows, blk):
    g = gg[rows][:, blk.col0]
    if blk.w is not None:
        g = g + (gg[rows][:, blk.col1] - g) * blk.w
    return g


#: Coefficients of the logistic approximation to the normal distribution function:
#: Φ(z) ≈ 1 / (1 + exp(−z (a + b z²))), |error| < 1.5e-4 (Bowling et al. 2009).
_PHI_A = _F32(1.5976)
_PHI_B = _F32(1.5976 * 0.04417)


def normal_cdf_fast(z):
    """Standard normal distribution function, fast and in float32.

    Parameters
    ----------
    z : ndarray
        Standard deviates [-] (±inf allowed).

    Returns
    -------
    ndarray
        Φ(z), float32, within 1.5e-4 of the exact value everywhere.

    References
    ----------
    S. R. Bowling, M. T. Khasawneh, S. Kaewkuekool and B. R. Cho, "A
    logistic approximation to the cumulative normal distribution", J. Ind.
    Eng. Manag. 2(1) (2009) 114-127, eq. (8): Φ(z) ≈ 1/(1 + e^(−1.5976 z
    (1 + 0.04417 z²))), maximum absolute error 1.4e-4.
    """
    z = np.asarray(z, _F32)
    y = z * z
    y *= _PHI_B
    y += _PHI_A
    y *= z
    np.negative(y, out=y)
    with np.errstate(over="ignore"):
        np.exp(y, out=y)                         # Bowling et al. eq. 8
    y += 1.0
    np.reciprocal(y, out=y)
    return y


def _p_above(ratio, lower_ratio, upper_ratio):
    """P(MUF > f) from f/MUF, as :func:`muf.muf_exceedance_probability`, in float32 (P.533 §10)."""
    k_lo = _F32(muf.Z90 / (1.0 - lower_ratio))
    k_hi = _F32(muf.Z90 / (upper_ratio - 1.0))
    z = 1.0 - ratio
    z *= np.where(ratio < 1.0, k_lo, k_hi)
    return normal_cdf_fast(z)


def _p_reliable(margin, k_pos, k_neg):
    """P(SNR ≥ required) from the median margin and Z90 / decile for each side (P.533 §10)."""
    return normal_cdf_fast(margin * np.where(margin >= 0, k_pos, k_neg))


def _evaluate(links, r: _Rows, blk: _Block, month, ssn, *, skip=False, luf=False):
    """The link budget for rows × samples × the block's frequencies.

    Returns a dict of (m, S, F) arrays: ``good`` (0..1), ``snr`` (median SNR of the carrying
    mode, floored) and ``via``; with ``skip`` the skip-zone flag; with ``luf`` the sky-wave
    margin over the 90 % requirement (median SNR − required − lower-decile deviation).
    """
    p = r.p
    f = blk.freq.astype(_F32)
    f3 = f[None, None, :]
    req = blk.req[None, None, :]
    lbf_f = (32.45 + 20.0 * np.log10(blk.freq)).astype(_F32)[None, None, :]     # P.533 eq. 19, f term
    absf = absorption.absorption_frequency_factor(blk.freq[None, :], p["fh"][:, None]).astype(_F32)[:, None, :]

    # F2 modes: median received power before any above-MUF loss (P.533 §6)
    elev_f = p["elev_f"]
    pf2 = _gains(blk.tx_tab, r.tx_row, blk, elev_f)
    pf2 += _gains(blk.rx_tab, r.rx_row, blk, elev_f)
    pf2 += p["base_f2"].astype(_F32)[:, :, None]
    pf2 -= lbf_f
    pf2 -= p["absorb_f2"].astype(_F32)[:, :, None] * absf                          # George & Bradley eq. 1
    pf2[f3 < p["fs"].astype(_F32)[:, :, None]] = -np.inf                          # E screening, P.533 §4

    # E modes: the ray's elevation is fixed, the absorption follows the sun
    elev_e = p["elev_e"][:, None]
    ge = _gains(blk.tx_tab, r.tx_row, blk, elev_e)
    ge += _gains(blk.rx_tab, r.rx_row, blk, elev_e)
    pe = p["base_e"].astype(_F32)[:, :, None] - lbf_f
    pe -= p["absorb_e"].astype(_F32)[:, :, None] * absf
    pe += ge

    lk = r.link
    up_mm, lo_mm = _man_made_deciles(links, lk)
    pn, n_up, n_lo = received_noise(blk.freq, blk.bw, links.rx_lat_deg[lk], links.rx_lon_deg[lk], month,
                                    r.utc_h, p["fof2_rx"], links.noise_c_db[lk], links.noise_d[lk],
                                    up_mm, lo_mm, links.noise_margin_db[lk])
    pf2 -= pn                                                                     # SNR, P.533 §7
    pe -= pn
    snr_f2_clear, snr_e_clear = pf2, pe

    sky_up, sky_lo = combined_deciles_db(_F32(SKY_SIGNAL_UPPER_DECILE_DB), _F32(SKY_SIGNAL_LOWER_DECILE_DB),
                                         n_up, n_lo)
    k_pos = _F32(muf.Z90) / sky_lo
    k_neg = _F32(muf.Z90) / sky_up

    with np.errstate(divide="ignore"):
        inv_f2 = np.where(p["muf_f2"] > 0, 1.0 / p["muf_f2"], np.inf).astype(_F32)[:, :, None]
        inv_e = np.where(p["muf_e"] > 0, 1.0 / p["muf_e"], np.inf).astype(_F32)[:, :, None]
    r_f2 = f3 * inv_f2
    r_e = f3 * inv_e
    ex_f2 = np.maximum(r_f2 - 1.0, 0.0)
    ex_e = np.maximum(r_e - 1.0, 0.0)
    snr_f2 = snr_f2_clear - _F32(36.0) * np.sqrt(ex_f2)                              # P.533 eq. 25
    snr_e = snr_e_clear - _F32(130.0) * ex_e * ex_e                                  # P.533 eq. 24
    del ex_f2, ex_e

    p_f2 = _p_above(r_f2, muf.F2_LOWER_DECILE_RATIO, muf.F2_UPPER_DECILE_RATIO)
    p_f2 *= _p_reliable(snr_f2_clear - req, k_pos, k_neg)
    p_e = _p_above(r_e, muf.E_LOWER_DECILE_RATIO, muf.E_UPPER_DECILE_RATIO)
    p_e *= _p_reliable(snr_e_clear - req, k_pos, k_neg)
    p_e *= p["e_ok"][:, None, None]

    # ground wave: steady signal, only the noise varies (its lower decile bounds the SNR's upper)
    lg = _ground_loss(links, lk, p["dist"], blk.freq)
    pg = (10.0 * np.log10(links.tx_power_w[lk])[:, None] + _ground_gain(blk.tx_gg, r.tx_row, blk)
          + _ground_gain(blk.rx_gg, r.rx_row, blk) - lg).astype(_F32)
    snr_g = pg[:, None, :] - pn
    del pn
    if np.any(snr_g > req - 40.0):
        p_g = _p_reliable(snr_g - req, _F32(muf.Z90) / n_up, _F32(muf.Z90) / n_lo)
    else:                                       # nowhere within 40 dB of the requirement
        p_g = np.zeros_like(snr_g)

    floor = _F32(SNR_FLOOR_DB)
    np.maximum(snr_g, floor, out=snr_g)
    np.maximum(snr_f2, floor, out=snr_f2)
    np.maximum(snr_e, floor, out=snr_e)
    out = {}
    if luf:
        out["luf"] = np.maximum(snr_f2, snr_e) - req - sky_lo                     # ≥ 0: 90 % of days
    # the best mode: most good days (to the per cent), then highest SNR
    score_g = np.round(p_g * 100.0) * 1000.0 + (snr_g - floor)
    score_e = np.round(p_e * 100.0) * 1000.0 + (snr_e - floor)
    score_f = np.round(p_f2 * 100.0) * 1000.0 + (snr_f2 - floor)
    best_e = score_e > score_g
    good = np.where(best_e, p_e, p_g)
    snr = np.where(best_e, snr_e, snr_g)
    via = np.where(best_e, np.int8(VIA_E), np.int8(VIA_GROUND))
    best_f = score_f > np.maximum(score_e, score_g)
    good = np.where(best_f, p_f2, good)
    snr = np.where(best_f, snr_f2, snr)
    via = np.where(best_f, np.int8(VIA_F2), via)
    carried = good >= NOT_CARRIED_BELOW
    out["snr"] = np.where(carried, snr, np.maximum(np.maximum(snr_g, snr_e), snr_f2))
    out["via"] = np.where(carried, via, np.int8(VIA_NONE))
    out["good"] = good.astype(_F32, copy=False)
    if skip:
        above_sky = (r_f2 > 1.0) & (r_e > 1.0)
        out["skip"] = above_sky & (snr_g < req)
    return out


def _man_made_deciles(links, lk):
    up = links.noise_upper_decile_db
    lo = links.noise_lower_decile_db
    if up is None or lo is None:
        d_up, d_lo = noise.man_made_deciles_db(links.noise_c_db[lk])
        up = d_up if up is None else up[lk]
        lo = d_lo if lo is None else lo[lk]
    else:
        up, lo = up[lk], lo[lk]
    return up, lo


# ---------------------------------------------------------------------------------------------
# Whole hours: the worst of the samples at h:00, h:30 and h+1:00
# ---------------------------------------------------------------------------------------------

def _hour_triples(x):
    """(m, 48, ...) samples -> three (m, 24, ...) views: h:00, h:30 and h+1:00."""
    first = x[:, 0::2]
    return first, x[:, 1::2], np.roll(first, -1, axis=1)


def _worst_sample(good, snr):
    """Index 0..2 of the worst of three samples: fewest good days, then lowest SNR."""
    (g0, g1, g2), (s0, s1, s2) = good, snr
    worse1 = (g1 < g0) | ((g1 == g0) & (s1 < s0))
    gb = np.where(worse1, g1, g0)
    sb = np.where(worse1, s1, s0)
    pick = worse1.astype(np.int8)
    worse2 = (g2 < gb) | ((g2 == gb) & (s2 < sb))
    pick[worse2] = 2
    return pick


def _pick(triple, pick):
    a0, a1, a2 = triple
    return np.where(pick == 2, a2, np.where(pick == 1, a1, a0))


def _lowest_crossing(grid, margin):
    """Lowest grid frequency where margin ≥ 0, refined linearly in log f [MHz]; NaN if none."""
    ok = margin >= 0
    any_ok = ok.any(axis=-1)
    k = np.argmax(ok, axis=-1)
    km1 = np.maximum(k - 1, 0)
    m1 = np.take_along_axis(margin, k[..., None], -1)[..., 0].astype(float)
    m0 = np.take_along_axis(margin, km1[..., None], -1)[..., 0].astype(float)
    lg1, lg0 = np.log(grid[k]), np.log(grid[km1])
    with np.errstate(divide="ignore", invalid="ignore"):
        t = np.where((k > 0) & np.isfinite(m0) & (m1 > m0), (0.0 - m0) / (m1 - m0), 1.0)
    t = np.clip(np.nan_to_num(t, nan=1.0), 0.0, 1.0)
    luf = np.exp(lg0 + t * (lg1 - lg0))
    luf = np.where(k == 0, grid[0], luf)
    return np.where(any_ok, luf, np.nan)


# ---------------------------------------------------------------------------------------------
# Public entry points
# ---------------------------------------------------------------------------------------------

def _check_common(links, year, month, ssn):
    if not 1 <= int(month) <= 12:
        raise ValueError(f"month must be 1..12, got {month}")
    ssn = float(ssn)
    if not np.isfinite(ssn) or ssn < 0 or ssn > 400:
        raise ValueError(f"ssn: sunspot number must be within 0..400, got {ssn}")
    return int(year), int(month), ssn


def grid_requirement(channels: ChannelSet):
    """The requirement the band-grid figures are given for, by default.

    Parameters
    ----------
    channels : ChannelSet
        The plan's channels.

    Returns
    -------
    required_snr_db, bandwidth_hz : float
        Those of the most demanding channel: the highest required signal
        power, SNR + 10 log10(bandwidth) [dB], [Hz]. Cautious, and
        independent of the order the channels are listed in.
    """
    need = channels.required_snr_db + 10.0 * np.log10(channels.bandwidth_hz)
    k = int(np.argmax(need))
    return float(channels.required_snr_db[k]), float(channels.bandwidth_hz[k])


def _chunk(n_rows, cells_per_row):
    return max(1, _TARGET_CELLS_PER_CHUNK // max(1, cells_per_row))


class _Clock:
    """Adds the seconds between laps to named stages of a dict (or does nothing)."""

    def __init__(self, timings):
        import time

        self._now = time.perf_counter
        self._d = timings
        self._t = self._now()

    def lap(self, stage):
        if self._d is None:
            return
        t = self._now()
        self._d[stage] = self._d.get(stage, 0.0) + (t - self._t)
        self._t = t


def _empty_month(year, month, ssn, c, grid, req_g, bw_g):
    z1, z2, z3, zg = np.zeros(0), np.zeros((0, 24)), np.zeros((0, 24, c), _F32), np.zeros((0, 24, grid.size), _F32)
    return MonthPrediction(
        year=year, month=month, ssn=ssn, distance_km=z1, azimuth_deg=z1, n_hops=z1.astype(int),
        n_hops_e=z1.astype(int), control_lat_deg=z1, control_lon_deg=z1, foF2_mhz=z2, foE_mhz=z2, m3000f2=z2,
        hmF2_km=z2, fH_mhz=z2, reflection_height_km=z2, solar_zenith_deg=z2, muf_mhz=z2, muf_f2_mhz=z2,
        muf_e_mhz=z2, owf_mhz=z2, luf_mhz=z2.astype(_F32), elevation_deg=z2, elevation_e_deg=z2, snr_db=z3,
        margin_db=z3, good_days=z3, via=z3.astype(np.int8), skip=z3.astype(bool),
        luf_below_floor=z2.astype(bool), grid_mhz=grid.copy(), grid_good_days=zg, grid_margin_db=zg,
        grid_required_snr_db=req_g, grid_bandwidth_hz=bw_g, sample_utc_h=np.array(SAMPLE_UTC_H),
        sample_foF2_mhz=np.zeros((0, SAMPLE_UTC_H.size)), sample_muf_mhz=np.zeros((0, SAMPLE_UTC_H.size)))


def predict_month(links: LinkSet, channels: ChannelSet, year: int, month: int, ssn: float,
                  luf_required_snr_db: float | None = None,
                  luf_bandwidth_hz: float | None = None, *,
                  timings: dict | None = None) -> MonthPrediction:
    """Predict every link × UTC hour × channel (and band-grid frequency) for one month.

    Parameters
    ----------
    links : LinkSet
        n directed links with antennas, ground and receiving noise.
    channels : ChannelSet
        c channels; the link set's channel gain tables must have c columns.
    year, month : int
        Month of the prediction.
    ssn : float
        12-month smoothed sunspot number R12 [-].
    luf_required_snr_db, luf_bandwidth_hz : float, optional
        Requirement of the band-grid figures (LUF, ``grid_good_days``,
        ``grid_margin_db``) [dB], [Hz]; default :func:`grid_requirement`.
    timings : dict, optional
        If given, filled with the seconds each stage took (for benchmarks).

    Returns
    -------
    MonthPrediction
        Figures per hour slot, each the worst over the hour's samples
        (h:00, h:30, h+1:00).

    References
    ----------
    ITU-R P.533-14 (structure: §2 control points, §3 MUF, §5 field strength
    and losses, §6 received power, §7 SNR, §9 LUF, §10 reliability); the
    component models are cited in each module.
    """
    n, c = links.size, channels.size
    if links.channel_count != c:
        raise ValueError(f"tx_gain_dbi has {links.channel_count} channels but the channel set has {c}")
    year, month, ssn = _check_common(links, year, month, ssn)
    req_g, bw_g = grid_requirement(channels)
    if luf_required_snr_db is not None:
        req_g = float(luf_required_snr_db)
    if luf_bandwidth_hz is not None:
        bw_g = float(luf_bandwidth_hz)
    if not (np.isfinite(req_g) and np.isfinite(bw_g) and bw_g > 0):
        raise ValueError("luf_required_snr_db must be finite and luf_bandwidth_hz > 0 Hz")

    grid = np.asarray(bandgrid.GRID_MHZ, float)
    g = grid.size
    clock = _Clock(timings)
    if n == 0:
        return _empty_month(year, month, ssn, c, grid, req_g, bw_g)
    paths = _paths(links, year, month, ssn, SAMPLE_UTC_H)
    ch_blk = _channel_block(links, channels)
    gr_blk = _grid_block(links, channels, grid, req_g, bw_g)
    clock.lap("paths_and_ionosphere")

    snr_out = np.empty((n, 24, c), _F32)
    good_out = np.empty((n, 24, c), _F32)
    via_out = np.empty((n, 24, c), np.int8)
    skip_out = np.empty((n, 24, c), bool)
    ggood_out = np.empty((n, 24, g), _F32)
    gmargin_out = np.empty((n, 24, g), _F32)
    luf_out = np.empty((n, 24), _F32)

    step = _chunk(n, SAMPLE_UTC_H.size * max(c, g))
    for a in range(0, n, step):
        s = slice(a, min(n, a + step))
        rows = _rows(links, paths, np.arange(s.start, s.stop))

        ev = _evaluate(links, rows, ch_blk, month, ssn, skip=True)
        clock.lap("channels")
        good3, snr3 = _hour_triples(ev["good"]), _hour_triples(ev["snr"])
        pick = _worst_sample(good3, snr3)
        good_out[s] = _pick(good3, pick)
        snr_out[s] = _pick(snr3, pick)
        via_out[s] = _pick(_hour_triples(ev["via"]), pick)
        skip_out[s] = _pick(_hour_triples(ev["skip"]), pick)
        del ev
        clock.lap("whole_hours")

        ev = _evaluate(links, rows, gr_blk, month, ssn, luf=True)
        clock.lap("band_grid")
        good3, snr3 = _hour_triples(ev["good"]), _hour_triples(ev["snr"])
        pick = _worst_sample(good3, snr3)
        ggood_out[s] = _pick(good3, pick)
        gmargin_out[s] = _pick(snr3, pick) - gr_blk.req
        l0, l1, l2 = _hour_triples(_lowest_crossing(grid, ev["luf"]))          # per sample, (m, 48)
        luf_h = np.fmax(np.fmax(l0, l1), l2)
        luf_out[s] = np.where(np.isnan(l0) | np.isnan(l1) | np.isnan(l2), np.nan, luf_h)
        del ev
        clock.lap("whole_hours")

    # per hour: lowest MUF and OWF, the ionosphere of the limiting sample
    muf_path = paths.muf
    lim = np.argmin(np.stack(_hour_triples(muf_path)), axis=0)

    def at_lim(x):
        return _pick(_hour_triples(x), lim)

    def lowest(x):
        return np.minimum(np.minimum(*_hour_triples(x)[:2]), _hour_triples(x)[2])

    n_s = SAMPLE_UTC_H.size
    clock.lap("whole_hours")
    return MonthPrediction(
        year=year, month=month, ssn=ssn,
        distance_km=paths.dist, azimuth_deg=paths.azi, n_hops=paths.nf.max(axis=1), n_hops_e=paths.ne,
        control_lat_deg=paths.cp_lat, control_lon_deg=paths.cp_lon,
        foF2_mhz=at_lim(paths.fof2), foE_mhz=at_lim(paths.foe), m3000f2=at_lim(paths.m3000),
        hmF2_km=at_lim(paths.hmf2), fH_mhz=np.broadcast_to(paths.fh[:, None], (n, 24)).copy(),
        reflection_height_km=at_lim(paths.hr), solar_zenith_deg=at_lim(paths.chi),
        muf_mhz=lowest(muf_path), muf_f2_mhz=lowest(paths.muf_f2), muf_e_mhz=lowest(paths.muf_e),
        owf_mhz=lowest(paths.owf), luf_mhz=luf_out,
        elevation_deg=at_lim(paths.elev_f),
        elevation_e_deg=np.broadcast_to(paths.elev_e[:, None], (n, 24)).copy(),
        snr_db=snr_out, margin_db=snr_out - channels.required_snr_db[None, None, :].astype(_F32),
        good_days=good_out, via=via_out, skip=skip_out,
        luf_below_floor=np.isfinite(luf_out) & (luf_out <= grid[0] * (1 + 1e-6)),
        grid_mhz=grid.copy(), grid_good_days=ggood_out, grid_margin_db=gmargin_out,
        grid_required_snr_db=req_g, grid_bandwidth_hz=bw_g,
        sample_utc_h=np.array(SAMPLE_UTC_H), sample_foF2_mhz=paths.fof2.reshape(n, n_s),
        sample_muf_mhz=muf_path.reshape(n, n_s))


def predict_link_hours(links: LinkSet, channels: ChannelSet, year: int, month: int, ssn: float,
                       link_index, utc_hour, *, gains: str = "grid") -> LinkHourPrediction:
    """Predict chosen (link, hour) pairs on any set of frequencies, such as request candidates.

    Parameters
    ----------
    links : LinkSet
        The directed links.
    channels : ChannelSet
        k frequencies with their requirement (any frequencies within 1.5..30 MHz).
    year, month : int
        Month of the prediction.
    ssn : float
        12-month smoothed sunspot number R12 [-].
    link_index, utc_hour : array_like (p,) of int
        The pairs: row in ``links`` and UTC hour slot 0..23.
    gains : {"grid", "channels"}
        "grid": antenna gains interpolated linearly in log f between the
        band-grid tables (the links must carry them); "channels": the
        links' channel tables, one per frequency of ``channels``.

    Returns
    -------
    LinkHourPrediction
        (p, k) figures, each the worst over the hour as in
        :func:`predict_month`.

    Notes
    -----
    Cost grows with p × k only: the ionosphere is evaluated for the links
    the pairs name, and the budget for their three samples each.
    """
    year, month, ssn = _check_common(links, year, month, ssn)
    li = np.atleast_1d(np.asarray(link_index))
    hr = np.atleast_1d(np.asarray(utc_hour))
    if li.ndim != 1 or hr.shape != li.shape or li.dtype.kind not in "iu" or hr.dtype.kind not in "iu":
        raise ValueError("link_index and utc_hour: expected two 1-D integer arrays of the same length")
    if li.size and (li.min() < 0 or li.max() >= links.size):
        raise ValueError(f"link_index: rows must lie within 0..{links.size - 1}")
    if hr.size and (hr.min() < 0 or hr.max() > 23):
        raise ValueError("utc_hour: hour slots must lie within 0..23")
    if gains == "grid":
        if not links.has_grid_tables:
            raise ValueError("gains='grid' needs band-grid gain tables (tx_grid_gain_dbi, rx_grid_gain_dbi)")
        if np.any((channels.freq_mhz < bandgrid.GRID_MHZ[0] * 0.999) | (channels.freq_mhz > bandgrid.GRID_MHZ[-1] * 1.001)):
            raise ValueError(f"freq_mhz: gains on the band grid cover {bandgrid.GRID_MHZ[0]:g}.."
                             f"{bandgrid.GRID_MHZ[-1]:g} MHz")
        blk = _interpolated_block(links, channels)
    elif gains == "channels":
        if links.channel_count != channels.size:
            raise ValueError(f"gains='channels': the links carry {links.channel_count} channel tables "
                             f"but {channels.size} frequencies were given")
        blk = _channel_block(links, channels)
    else:
        raise ValueError(f"gains must be 'grid' or 'channels', got {gains!r}")

    p, k = li.size, channels.size
    if p == 0:
        e = np.zeros((0, k), _F32)
        return LinkHourPrediction(link_index=li, utc_hour=hr, freq_mhz=channels.freq_mhz.copy(), good_days=e,
                                  snr_db=e, margin_db=e, via=e.astype(np.int8), muf_mhz=np.zeros(0),
                                  owf_mhz=np.zeros(0))
    used, inv = np.unique(li, return_inverse=True)
    sub = links.subset(used)
    paths = _paths(sub, year, month, ssn, SAMPLE_UTC_H)
    samples = (2 * hr[:, None] + np.arange(3)[None, :]) % SAMPLE_UTC_H.size       # h:00, h:30, h+1:00
    good = np.empty((p, k), _F32)
    snr = np.empty((p, k), _F32)
    via = np.empty((p, k), np.int8)
    step = _chunk(p, 3 * k)
    for a in range(0, p, step):
        s = slice(a, min(p, a + step))
        rows = _rows(sub, paths, inv[s], samples[s])
        ev = _evaluate(sub, rows, blk, month, ssn)
        trip = lambda x: (x[:, 0], x[:, 1], x[:, 2])                                # noqa: E731
        pick = _worst_sample(trip(ev["good"]), trip(ev["snr"]))
        good[s] = _pick(trip(ev["good"]), pick)
        snr[s] = _pick(trip(ev["snr"]), pick)
        via[s] = _pick(trip(ev["via"]), pick)
    muf_s = paths.muf[inv[:, None], samples]
    owf_s = paths.owf[inv[:, None], samples]
    return LinkHourPrediction(link_index=li, utc_hour=hr, freq_mhz=channels.freq_mhz.copy(), good_days=good,
                              snr_db=snr, margin_db=snr - channels.required_snr_db[None, :].astype(_F32),
                              via=via, muf_mhz=muf_s.min(axis=1), owf_mhz=owf_s.min(axis=1))


def station_sun_times(lat_deg, lon_deg, year, month, day=15):
    """Sunrise and sunset of stations on a day, UTC hours or None.

    Parameters
    ----------
    lat_deg, lon_deg : sequence of float
        Station positions [deg].
    year, month, day : int
        Local date (default the 15th, the day the monthly model uses).

    Returns
    -------
    list of (sunrise_utc_h, sunset_utc_h)
        UTC clock hours [h] or None (polar day / night), one per station.

    References
    ----------
    See :func:`planpack.ionosphere.sun.sunrise_sunset`.
    """
    date = _dt.date(int(year), int(month), int(day))
    return [sun.sunrise_sunset(la, lo, date) for la, lo in zip(lat_deg, lon_deg)]


def methods():
    """What the link predictions rest on, for the plan's ``assumptions``.

    Returns
    -------
    dict
        Plain JSON-ready description: models with their sources, library
        versions, fixed constants and what is not modelled.
    """
    import geographiclib
    import scipy

    g = bandgrid.GRID_MHZ
    return {
        "structure": "ITU-R P.533-14 for paths up to about 2000 km: one control point at mid-path, "
                     "E and F2 modes plus a smooth-earth ground wave; the best mode carries each channel",
        "whole_hours": "ionosphere, sun and budget evaluated every half hour (48 samples a day); each hour "
                       "slot's figures are the worst of its samples at h:00, h:30 and h+1:00: good days, SNR, "
                       "margin and mode from the sample with the fewest good days, the lowest MUF and OWF, "
                       "the highest LUF",
        "ionosphere": "CCIR maps of foF2 and M(3000)F2 (ITU-R P.1239), evaluated with PyIRI's coefficients and "
                      "basis functions at each sample time, linear in R12 between the R12 = 0 and R12 = 100 maps "
                      f"as P.1239 says, R12 held at {iri.R12_SATURATION:g}; modip from IGRF-13 at 300 km; "
                      "foE by PyIRI's NeQuick formula at the month's solar flux and each sample's solar zenith "
                      "angle; hmF2 by BSE-1979; day 15 of the month",
        "solar_index": "sunspot number R12; F10.7 <-> R12 by ITU-R P.1239 eq. 1 (PyIRI F107_2_R12, R12_2_F107)",
        "gyrofrequency": "IGRF-13 total field at 300 km via PyIRI, fH = 27.99 GHz/T x |B|",
        "geometry": "WGS84 geodesics by Vincenty (1975), geographiclib for near-antipodal points; "
                    "spherical earth R0 = 6371 km for ray angles; F2 mirror height 1490/M(3000)F2 - 176 km; "
                    f"E at {geodesy.E_LAYER_HEIGHT_KM:g} km; minimum elevation {geodesy.MIN_ELEVATION_DEG:g} deg; "
                    f"hops up to {geodesy.MAX_HOP_F2_KM:g} km (F2) and {geodesy.MAX_HOP_E_KM:g} km (E)",
        "muf": "F2: ITU-R P.1240 / P.533 distance formula (B, Cd, dmax <= 4000 km, + fH/2 (1 - d/dmax)); "
               "E: foE sec i110; F2 modes screened below 1.05 foE sec i (P.533 §4); "
               "path MUF = the higher of E and F2; operational-to-basic MUF ratio not applied",
        "owf": f"90 % figure: the lower decile of the MUF, {muf.F2_LOWER_DECILE_RATIO:g} x F2 MUF and "
               f"{muf.E_LOWER_DECILE_RATIO:g} x E MUF. These are fixed ratios (upper deciles "
               f"{muf.F2_UPPER_DECILE_RATIO:g} and {muf.E_UPPER_DECILE_RATIO:g}): P.1239's decile tables by "
               "season, time and solar activity are not available offline to this package, so the day-to-day "
               "spread of the F2 MUF is understated at night and at solar minimum",
        "luf": "90 % figure: the lowest frequency whose better sky-wave mode's SNR meets the requirement on 90 % of "
               "days (median SNR - required >= the SNR's lower-decile deviation), searched on the band grid "
               f"({g.size} log points {g[0]:g}-{g[-1]:g} MHz) and refined linearly in log f between grid points; "
               "'below the grid floor' when the lowest grid frequency already works; requirement of the most "
               "demanding channel (highest SNR + 10 log bandwidth)",
        "band_grid": "the LUF and the per-frequency figures of the band grid use each antenna's gains on the grid "
                     "where given, otherwise the nearest channel's; other frequencies interpolate linearly in "
                     "log f between grid points",
        "absorption": "George & Bradley (1974) / CCIR Report 252-2: 677.2 sec i I / ((f + fH)^1.98 + 10.2) per hop, "
                      "I = (1 + 0.0037 R12) cos^1.3(0.881 chi) with a 0.02 night floor, chi at the control point "
                      "at each sample time",
        "losses": f"free space over the slant path (P.533 eq. 19); above-MUF loss P.533 eqs. 24-25; "
                  f"{absorption.GROUND_REFLECTION_LOSS_DB:g} dB per extra hop; catch-all Lz = {absorption.LZ_DB:g} dB",
        "noise": "ITU-R P.372: man-made Fam = c - d log10 f for the receiver's environment, galactic "
                 "52 - 23 log10 f above the receiver's foF2 at each sample time, and atmospheric noise at the "
                 "receiver's place, month and local time, each with its own deciles, summed by P.372 §8; "
                 "then the plan's per-station noise margin on top",
        "atmospheric_noise": atmospheric.describe(),
        "ground_wave": groundwave.describe() + " Antennas credited at most 4.77 dBi (short monopole on perfect "
                       "ground): a station's whips where it has any, which it rigs for the ground wave (vertical "
                       "polarisation when both ends have one); a station on sea or fresh-water soil has its own "
                       "shore counted as water.",
        "good_days": "P(MUF above f) from the MUF deciles x P(SNR >= required) from signal deciles "
                     f"+{SKY_SIGNAL_UPPER_DECILE_DB:g}/-{SKY_SIGNAL_LOWER_DECILE_DB:g} dB and P.372 noise deciles "
                     "(P.533 §10); ground wave: noise deciles only; the best mode counts",
        "not_modelled": [
            "the day-to-day spread of the F2 MUF by season, time of day and solar activity (P.1239 decile "
            "tables): fixed decile ratios are used",
            "sporadic E, F1 layer modes and scatter beyond the above-MUF loss",
            "auroral and polar-cap absorption, geomagnetic storms, solar flares (sudden ionospheric disturbances)",
            "the P.533 two-control-point method for paths over 2000 km (mid-path point used)",
            "deviative absorption near the E-layer critical frequency",
            "terrain and buildings on the ground-wave path (a smooth earth is assumed)",
            "within-the-hour fading (left to the required SNR)",
        ],
        "libraries": {
            "PyIRI": iri.pyiri_version(),
            "numpy": np.__version__,
            "scipy": scipy.__version__,
            "geographiclib": geographiclib.__version__,
        },
    }
