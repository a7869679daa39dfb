"""Hour-by-hour link predictions: the entry point that compile.py calls.

For each link, each UTC hour of a month and each channel, this module puts
the published pieces together in the structure of ITU-R P.533 (paths up to
about 2000 km, one control point at mid-path):

* ground wave (Norton flat earth), E modes and F2 modes, each with its own
  ray geometry, losses and antenna gains at the ray's elevation;
* median SNR = received power − noise power in the channel's bandwidth;
* the fraction of days the channel works, from the MUF deciles (P.1239) and
  the signal and noise deciles (P.372 / P.533 §10);
* the mode that carries the channel (``via``) and whether the link sits in
  a skip zone.

Everything is numpy, chunked over links to keep memory flat.
"""

from __future__ import annotations

import dataclasses
import datetime as _dt

import numpy as np
from scipy.special import ndtr

from . import absorption, geodesy, groundwave, iri, muf, noise, sun

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

#: Frequency grid searched for the LUF [MHz].
LUF_GRID_MHZ = np.geomspace(1.5, 30.0, 41)

#: Links handled per chunk (bounds the size of the temporaries).
_TARGET_CELLS_PER_CHUNK = 120_000


def _as(name, value, shape, dtype=float):
    arr = np.asarray(value, dtype=dtype)
    if arr.shape != shape:
        raise ValueError(f"{name}: expected an array of shape {shape}, got {arr.shape}")
    if arr.dtype.kind == "f" and not np.all(np.isfinite(arr)):
        raise ValueError(f"{name}: every value must be finite")
    return arr


@dataclasses.dataclass(frozen=True)
class ChannelSet:
    """The c channels to predict.

    Attributes
    ----------
    freq_mhz : ndarray (c,)
        Carrier (dial) frequency [MHz], 1.5..30.
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
    """The n links to predict, with their antennas and receiving noise.

    Attributes
    ----------
    tx_lat_deg, tx_lon_deg, rx_lat_deg, rx_lon_deg : ndarray (n,)
        End points [deg].
    tx_power_w : ndarray (n,)
        Power delivered to the transmitting antenna [W].
    tx_gain_dbi, rx_gain_dbi : ndarray (n, c, 91)
        Azimuth-averaged gain at elevation 0..90° in 1° steps, per channel
        [dBi], including the real ground under each antenna.
    vertical : ndarray (n,) of bool
        True when the antennas are vertically polarised (for ground wave).
    ground_eps_r, ground_sigma_s_m : ndarray (n,)
        Ground constants along the path [-], [S/m] (ITU-R P.527).
    noise_c_db, noise_d : ndarray (n,)
        P.372 man-made noise coefficients at the receiver [dB], [dB/decade].
    noise_margin_db : ndarray (n,)
        Extra noise the plan declares at the receiver [dB].
    tx_ground_gain_dbi, rx_ground_gain_dbi : ndarray (n, c), optional
        Gain credited for the ground wave [dBi] (4.77 dBi for a short
        monopole on perfect ground). Default: the table's peak, but never
        more than 4.77 dBi.
    noise_upper_decile_db, noise_lower_decile_db : ndarray (n,), optional
        Day-to-day deciles of the man-made noise [dB]; default from the
        P.372 environment whose c is nearest.
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
        gt = np.asarray(self.tx_gain_dbi, float)
        if gt.ndim != 3 or gt.shape[0] != n[0] or gt.shape[2] != 91:
            raise ValueError(f"tx_gain_dbi: expected shape ({n[0]}, channels, 91), got {gt.shape}")
        object.__setattr__(self, "tx_gain_dbi", _as("tx_gain_dbi", gt, gt.shape))
        object.__setattr__(self, "rx_gain_dbi", _as("rx_gain_dbi", self.rx_gain_dbi, gt.shape))
        for name in ("tx_ground_gain_dbi", "rx_ground_gain_dbi"):
            if getattr(self, name) is not None:
                object.__setattr__(self, name, _as(name, getattr(self, name), gt.shape[:2]))
        for name in ("noise_upper_decile_db", "noise_lower_decile_db"):
            if getattr(self, name) is not None:
                object.__setattr__(self, name, _as(name, getattr(self, name), n))

    @property
    def size(self):
        return self.tx_lat_deg.size


@dataclasses.dataclass(frozen=True)
class MonthPrediction:
    """Predictions for n links × 24 UTC hours (0..23) × c channels.

    Per link (n,): ``distance_km``, ``azimuth_deg`` (at the transmitter),
    ``n_hops`` (F2 hops, the most any hour needs), ``n_hops_e``,
    ``control_lat_deg``, ``control_lon_deg``.

    Per link and hour (n, 24): ``foF2_mhz``, ``foE_mhz``, ``m3000f2``,
    ``hmF2_km``, ``fH_mhz`` at the control point; ``reflection_height_km``;
    ``solar_zenith_deg``; ``muf_mhz`` (path basic MUF, the higher of the E
    and F2 MUFs), ``muf_f2_mhz``, ``muf_e_mhz``; ``owf_mhz`` (lower decile
    of the MUF); ``luf_mhz`` (lowest frequency where the median sky-wave
    SNR meets the LUF requirement; NaN if none); ``elevation_deg`` (F2 ray),
    ``elevation_e_deg``.

    Per link, hour and channel (n, 24, c): ``snr_db`` (median, of the
    carrying mode), ``margin_db`` (snr − required), ``good_days`` (0..1),
    ``via`` (int8, see :data:`VIA_NAMES`), ``skip`` (bool).
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
    m = np.asarray(margin_db, float)
    sigma = np.where(m >= 0, lower_decile_db, upper_decile_db) / muf.Z90
    with np.errstate(divide="ignore", invalid="ignore"):
        z = np.where(sigma > 0, m / np.where(sigma > 0, sigma, 1.0), np.sign(m) * np.inf)
    return ndtr(z)


def _gain_at(table, elev_deg):
    """Gain tables (m, c, 91) read at elevations (m, 24) -> (m, 24, c) [dBi]."""
    el = np.clip(elev_deg, 0.0, 90.0)
    i0 = np.minimum(np.floor(el).astype(np.intp), 89)
    w = (el - i0)[:, :, None]
    m = table.shape[0]
    rows = np.arange(m)[:, None]
    g0 = table[rows, :, i0]            # (m, 24, c)
    g1 = table[rows, :, i0 + 1]
    return g0 * (1.0 - w) + g1 * w


def _sky_mode(freq, pt_dbw, gt, gr, slant_km, inc100_deg, n_hops, fh, chi, r12, lz_db=absorption.LZ_DB):
    """Median received power of one sky-wave mode before any above-MUF loss [dBW]."""
    f = freq[None, None, :]
    lbf = absorption.free_space_loss_db(f, slant_km[:, :, None])             # P.533 eq. 19
    li = absorption.d_layer_absorption_db(f, fh[:, None, None], chi[:, :, None], r12,
                                          inc100_deg[:, :, None], n_hops[:, :, None])  # P.533 eq. 20 form
    lg = absorption.ground_reflection_loss_db(n_hops)[:, :, None]            # Lg
    return pt_dbw[:, None, None] + gt + gr - lbf - li - lg - lz_db            # P.533 §6


def _noise(freq, bw, c_db, d, margin, foF2_rx, up_mm, lo_mm):
    """Noise power [dBW] and its decile deviations [dB], (m, 24, c)."""
    f = freq[None, None, :]
    fam = noise.man_made_noise_db(f, c_db[:, None, None], d[:, None, None])
    fag = noise.galactic_noise_db(f, foF2_rx[:, :, None])
    fa = noise.combine_noise_db(fam, fag) + margin[:, None, None]
    gal_dominant = fag > fam
    up = np.where(gal_dominant, noise.CATEGORIES["galactic"].upper_decile_db, up_mm[:, None, None])
    lo = np.where(gal_dominant, noise.CATEGORIES["galactic"].lower_decile_db, lo_mm[:, None, None])
    return noise.noise_power_dbw(fa, bw[None, None, :]), up, lo


def _combine_deciles(sig_up, sig_lo, noise_up, noise_lo):
    # P.533 §10: SNR upper decile from signal upper & noise lower, and vice versa
    return np.hypot(sig_up, noise_lo), np.hypot(sig_lo, noise_up)


def predict_month(links: LinkSet, channels: ChannelSet, year: int, month: int, ssn: float,
                  luf_required_snr_db: float | None = None,
                  luf_bandwidth_hz: float | None = None) -> MonthPrediction:
    """Predict every link × UTC hour × channel for one month and solar level.

    Parameters
    ----------
    links : LinkSet
        n links with antennas, ground and receiving noise.
    channels : ChannelSet
        c channels; ``links.tx_gain_dbi.shape[1]`` must equal c.
    year, month : int
        Month of the prediction.
    ssn : float
        12-month smoothed sunspot number R12 [-].
    luf_required_snr_db, luf_bandwidth_hz : float, optional
        Requirement used for the LUF [dB], [Hz]; default: the first channel's.

    Returns
    -------
    MonthPrediction

    References
    ----------
    ITU-R P.533-14 (structure: §2 control points, §3 MUF, §5 field strength
    and losses, §6 received power, §7 SNR, §9 LUF, §10 reliability); the
    component models are cited in each module.
    """
    n, c = links.size, channels.size
    if links.tx_gain_dbi.shape[1] != c:
        raise ValueError(f"tx_gain_dbi has {links.tx_gain_dbi.shape[1]} channels but the "
                         f"channel set has {c}")
    if not 1 <= int(month) <= 12:
        raise ValueError(f"month must be 1..12, got {month}")
    ssn = float(ssn)
    if not np.isfinite(ssn) or ssn < 0 or ssn > 400:
        raise ValueError(f"ssn: sunspot number must be within 0..400, got {ssn}")
    req_luf = float(channels.required_snr_db[0] if luf_required_snr_db is None else luf_required_snr_db)
    bw_luf = float(channels.bandwidth_hz[0] if luf_bandwidth_hz is None else luf_bandwidth_hz)

    # --- path geometry (P.533 §2) -------------------------------------------------
    dist, azi1, _ = geodesy.inverse(links.tx_lat_deg, links.tx_lon_deg, links.rx_lat_deg, links.rx_lon_deg)
    cp_lat, cp_lon = geodesy.direct(links.tx_lat_deg, links.tx_lon_deg, azi1, dist / 2.0)

    # --- ionosphere at the control points and over the receivers, one PyIRI call ---
    rx_key = np.round(np.stack([links.rx_lat_deg, links.rx_lon_deg], axis=1), 4)
    rx_unique, rx_index = np.unique(rx_key, axis=0, return_inverse=True)
    rx_index = rx_index.ravel()
    ion = iri.monthly_ionosphere(np.concatenate([cp_lat, rx_unique[:, 0]]),
                                 np.concatenate([cp_lon, rx_unique[:, 1]]), year, month, ssn)
    fof2, foe = ion.foF2_mhz[:n], ion.foE_mhz[:n]
    m3000, hmf2 = ion.m3000f2[:n], ion.hmF2_km[:n]
    fh = ion.fH_mhz[:n]
    fof2_rx = ion.foF2_mhz[n:][rx_index]
    hours = np.arange(24.0)
    chi = sun.solar_zenith_deg(cp_lat[:, None], cp_lon[:, None], int(year), int(month), 15, hours[None, :])

    # --- ray geometry and MUFs, (n, 24) -------------------------------------------
    hr = muf.reflection_height_km(m3000)
    longest_f2 = np.minimum(geodesy.MAX_HOP_F2_KM, geodesy.max_hop_km(hr))
    nf = geodesy.hop_count(dist[:, None], longest_f2)
    hop_f = dist[:, None] / nf
    elev_f = geodesy.elevation_angle_deg(hop_f, hr)
    inc100_f = geodesy.incidence_angle_deg(elev_f, geodesy.D_LAYER_HEIGHT_KM)
    slant_f = nf * geodesy.slant_range_km(hop_f, hr)
    muf_f2 = muf.f2_basic_muf_mhz(hop_f, fof2, m3000, foe, fh[:, None])
    fs = muf.e_screening_frequency_mhz(elev_f, foe)

    ne = geodesy.hop_count(dist, geodesy.MAX_HOP_E_KM)
    e_ok = dist <= 2 * geodesy.MAX_HOP_E_KM                      # P.533: E modes to 4000 km
    hop_e = dist / ne
    elev_e1 = geodesy.elevation_angle_deg(hop_e, geodesy.E_LAYER_HEIGHT_KM)
    elev_e = np.broadcast_to(elev_e1[:, None], (n, 24))
    inc100_e = np.broadcast_to(geodesy.incidence_angle_deg(elev_e1, geodesy.D_LAYER_HEIGHT_KM)[:, None], (n, 24))
    slant_e = np.broadcast_to((ne * geodesy.slant_range_km(hop_e, geodesy.E_LAYER_HEIGHT_KM))[:, None], (n, 24))
    ne2 = np.broadcast_to(ne[:, None], (n, 24))
    muf_e = np.where(e_ok[:, None], muf.e_basic_muf_mhz(hop_e[:, None], foe), 0.0)
    muf_path = np.maximum(muf_f2, muf_e)
    owf = np.maximum(muf.owf_mhz(muf_f2), muf.owf_mhz(muf_e, muf.E_LOWER_DECILE_RATIO))

    # --- per-link constants ---------------------------------------------------------
    pt_dbw = 10.0 * np.log10(links.tx_power_w)
    if links.noise_upper_decile_db is None or links.noise_lower_decile_db is None:
        up_mm, lo_mm = noise.man_made_deciles_db(links.noise_c_db)
    if links.noise_upper_decile_db is not None:
        up_mm = links.noise_upper_decile_db
    if links.noise_lower_decile_db is not None:
        lo_mm = links.noise_lower_decile_db
    cap = groundwave.SHORT_MONOPOLE_GAIN_DBI
    gg_t = (np.minimum(links.tx_gain_dbi.max(axis=2), cap)
            if links.tx_ground_gain_dbi is None else links.tx_ground_gain_dbi)
    gg_r = (np.minimum(links.rx_gain_dbi.max(axis=2), cap)
            if links.rx_ground_gain_dbi is None else links.rx_ground_gain_dbi)
    freq, req, bw = channels.freq_mhz, channels.required_snr_db, channels.bandwidth_hz
    luf_chan = np.argmin(np.abs(LUF_GRID_MHZ[:, None] - freq[None, :]), axis=1)

    snr_out = np.empty((n, 24, c), np.float32)
    good_out = np.empty((n, 24, c), np.float32)
    via_out = np.empty((n, 24, c), np.int8)
    skip_out = np.empty((n, 24, c), bool)
    luf_out = np.empty((n, 24), np.float32)

    step = max(1, _TARGET_CELLS_PER_CHUNK // (24 * max(c, LUF_GRID_MHZ.size)))
    for a in range(0, n, step):
        s = slice(a, min(n, a + step))
        args = dict(fh=fh[s], chi=chi[s], r12=ssn)

        def sky(fr, gt_tab, gr_tab):
            pf2 = _sky_mode(fr, pt_dbw[s], _gain_at(gt_tab, elev_f[s]), _gain_at(gr_tab, elev_f[s]),
                            slant_f[s], inc100_f[s], nf[s], **args)
            pe = _sky_mode(fr, pt_dbw[s], _gain_at(gt_tab, elev_e[s]), _gain_at(gr_tab, elev_e[s]),
                           slant_e[s], inc100_e[s], ne2[s], **args)
            screened = fr[None, None, :] < fs[s][:, :, None]           # P.533 §4
            pf2 = np.where(screened, -np.inf, pf2)
            pe = np.where(e_ok[s][:, None, None], pe, -np.inf)
            return pf2, pe

        # channels
        pf2, pe = sky(freq, links.tx_gain_dbi[s], links.rx_gain_dbi[s])
        pn, n_up, n_lo = _noise(freq, bw, links.noise_c_db[s], links.noise_d[s], links.noise_margin_db[s],
                                fof2_rx[s], up_mm[s], lo_mm[s])
        f3 = freq[None, None, :]
        lm_f2 = absorption.above_muf_loss_db(f3, muf_f2[s][:, :, None], "F2")   # P.533 eq. 25
        lm_e = absorption.above_muf_loss_db(f3, muf_e[s][:, :, None], "E")      # P.533 eq. 24
        snr_f2_clear, snr_e_clear = pf2 - pn, pe - pn
        snr_f2, snr_e = snr_f2_clear - lm_f2, snr_e_clear - lm_e
        sky_up, sky_lo = _combine_deciles(SKY_SIGNAL_UPPER_DECILE_DB, SKY_SIGNAL_LOWER_DECILE_DB, n_up, n_lo)
        p_f2 = (muf.muf_exceedance_probability(f3, muf_f2[s][:, :, None])
                * reliability(snr_f2_clear - req, sky_up, sky_lo))
        p_e = (muf.muf_exceedance_probability(f3, muf_e[s][:, :, None],
                                              muf.E_LOWER_DECILE_RATIO, muf.E_UPPER_DECILE_RATIO)
               * reliability(snr_e_clear - req, sky_up, sky_lo))
        p_e = np.where(e_ok[s][:, None, None], p_e, 0.0)

        lg = groundwave.ground_wave_loss_db(dist[s][:, None], freq[None, :], links.ground_eps_r[s][:, None],
                                            links.ground_sigma_s_m[s][:, None], links.vertical[s][:, None])
        pg = pt_dbw[s][:, None] + gg_t[s] + gg_r[s] - lg                       # (m, c)
        snr_g = pg[:, None, :] - pn
        p_g = reliability(snr_g - req, n_lo, n_up)       # steady signal: only the noise varies

        snrs = np.stack([np.maximum(snr_g, SNR_FLOOR_DB), np.maximum(snr_e, SNR_FLOOR_DB),
                         np.maximum(snr_f2, SNR_FLOOR_DB)])
        probs = np.stack([p_g, p_e, p_f2])
        score = np.round(probs * 100.0) * 1000.0 + (snrs - SNR_FLOOR_DB)
        best = np.argmax(score, axis=0)
        gd = np.take_along_axis(probs, best[None], 0)[0]
        snr_best = np.take_along_axis(snrs, best[None], 0)[0]
        carried = gd >= NOT_CARRIED_BELOW
        snr_out[s] = np.where(carried, snr_best, snrs.max(axis=0))
        good_out[s] = gd
        via_out[s] = np.where(carried, best + 1, VIA_NONE)
        above_sky = (f3 > muf_f2[s][:, :, None]) & (f3 > muf_e[s][:, :, None])
        skip_out[s] = above_sky & (snr_g < req)

        # LUF on a frequency grid, gains from the nearest channel's table
        g = LUF_GRID_MHZ
        lf2, le = sky(g, links.tx_gain_dbi[s][:, luf_chan], links.rx_gain_dbi[s][:, luf_chan])
        pn_g, _, _ = _noise(g, np.full(g.size, bw_luf), links.noise_c_db[s], links.noise_d[s],
                            links.noise_margin_db[s], fof2_rx[s], up_mm[s], lo_mm[s])
        g3 = g[None, None, :]
        m_sky = np.maximum(lf2 - absorption.above_muf_loss_db(g3, muf_f2[s][:, :, None], "F2"),
                           le - absorption.above_muf_loss_db(g3, muf_e[s][:, :, None], "E")) - pn_g - req_luf
        luf_out[s] = _lowest_crossing(g, m_sky)

    return MonthPrediction(
        year=int(year), month=int(month), ssn=ssn,
        distance_km=dist, azimuth_deg=azi1, n_hops=nf.max(axis=1), n_hops_e=ne,
        control_lat_deg=cp_lat, control_lon_deg=cp_lon,
        foF2_mhz=fof2, foE_mhz=foe, m3000f2=m3000, hmF2_km=hmf2,
        fH_mhz=np.broadcast_to(fh[:, None], (n, 24)).copy(),
        reflection_height_km=hr, solar_zenith_deg=chi,
        muf_mhz=muf_path, muf_f2_mhz=muf_f2, muf_e_mhz=muf_e, owf_mhz=owf, luf_mhz=luf_out,
        elevation_deg=elev_f, elevation_e_deg=np.array(elev_e),
        snr_db=snr_out, margin_db=snr_out - req[None, None, :].astype(np.float32),
        good_days=good_out, via=via_out, skip=skip_out)


def _lowest_crossing(grid, margin):
    """Lowest grid frequency where margin ≥ 0, refined linearly in log f [MHz]; NaN if none."""
    ok = margin >= 0
    any_ok = ok.any(axis=2)
    k = np.argmax(ok, axis=2)
    km1 = np.maximum(k - 1, 0)
    m1 = np.take_along_axis(margin, k[..., None], 2)[..., 0]
    m0 = np.take_along_axis(margin, km1[..., None], 2)[..., 0]
    lg1, lg0 = np.log(grid[k]), np.log(grid[km1])
    with np.errstate(divide="ignore", invalid="ignore"):
        t = np.where((k > 0) & np.isfinite(m0) & (m1 > m0), (0.0 - m0) / (m1 - m0), 1.0)
    t = np.clip(np.nan_to_num(t, nan=1.0), 0.0, 1.0)
    luf = np.exp(lg0 + t * (lg1 - lg0))
    luf = np.where(k == 0, grid[0], luf)
    return np.where(any_ok, luf, np.nan)


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

    return {
        "structure": "ITU-R P.533-14 for paths up to about 2000 km: one control point at mid-path, "
                     "E and F2 modes plus Norton ground wave; the best mode carries each channel",
        "ionosphere": "PyIRI IRI_monthly_mean_par (CCIR foF2 and M(3000)F2 maps, as in ITU-R P.1239), "
                      "linear in IG12 (foF2, foE) and R12 (M(3000)F2, hmF2) between PyIRI's two solar "
                      f"levels as PyIRI does; R12 held at {iri.R12_SATURATION:g} for F2; day 15 of the month",
        "solar_index": "sunspot number R12; IG12 from R12 by PyIRI R12_2_IG12 (IRI-2020); "
                       "F10.7 <-> R12 by ITU-R P.1239 eq. 1 (PyIRI F107_2_R12)",
        "gyrofrequency": "IGRF-13 total field at 300 km via PyIRI, fH = 27.99 GHz/T x |B|",
        "geometry": "WGS84 geodesics by Vincenty (1975), geographiclib for near-antipodal points; "
                    "spherical earth R0 = 6371 km for ray angles; F2 mirror height 1490/M(3000)F2 - 176 km; "
                    f"E at {geodesy.E_LAYER_HEIGHT_KM:g} km; minimum elevation {geodesy.MIN_ELEVATION_DEG:g} deg; "
                    f"hops up to {geodesy.MAX_HOP_F2_KM:g} km (F2) and {geodesy.MAX_HOP_E_KM:g} km (E)",
        "muf": "F2: ITU-R P.1240 / P.533 distance formula (B, Cd, dmax <= 4000 km, + fH/2 (1 - d/dmax)); "
               "E: foE sec i110; F2 modes screened below 1.05 foE sec i (P.533 §4); "
               "path MUF = the higher of E and F2; operational-to-basic MUF ratio not applied",
        "owf": f"lower decile of the MUF: {muf.F2_LOWER_DECILE_RATIO:g} x F2 MUF, "
               f"{muf.E_LOWER_DECILE_RATIO:g} x E MUF (fixed ratios)",
        "absorption": "George & Bradley (1974) / CCIR Report 252-2: 677.2 sec i I / ((f + fH)^1.98 + 10.2) per hop, "
                      "I = (1 + 0.0037 R12) cos^1.3(0.881 chi) with a 0.02 night floor, chi at the control point",
        "losses": f"free space over the slant path (P.533 eq. 19); above-MUF loss P.533 eqs. 24-25; "
                  f"{absorption.GROUND_REFLECTION_LOSS_DB:g} dB per extra hop; catch-all Lz = {absorption.LZ_DB:g} dB",
        "noise": "ITU-R P.372 man-made Fam = c - d log10 f for the receiver's environment, plus galactic "
                 "52 - 23 log10 f above the receiver's foF2, summed as powers, plus the plan's noise margin",
        "ground_wave": "Sommerfeld-Norton flat-earth attenuation (scipy wofz) with ITU-R P.527 ground constants, "
                       "out to 80/f^(1/3) km; antennas credited at most 4.77 dBi (short monopole on perfect ground)",
        "good_days": "P(MUF above f) from the MUF deciles x P(SNR >= required) from signal deciles "
                     f"+{SKY_SIGNAL_UPPER_DECILE_DB:g}/-{SKY_SIGNAL_LOWER_DECILE_DB:g} dB and P.372 noise deciles "
                     "(P.533 §10); ground wave: noise deciles only; the best mode counts",
        "luf": "lowest frequency on a 1.5-30 MHz grid where the median sky-wave SNR meets the first "
               "channel's required SNR, gains from the nearest channel's table",
        "not_modelled": [
            "atmospheric (lightning) noise - covered only by the plan's per-station noise margin",
            "sporadic E, F1 layer modes and scatter beyond the above-MUF loss",
            "auroral and polar-cap absorption, geomagnetic storms, solar flares (sudden ionospheric disturbances)",
            "the P.533 two-control-point method for paths over 2000 km (mid-path point used)",
            "deviative absorption near the E-layer critical frequency",
            "earth curvature for the ground wave beyond the flat-earth limit (counted as no ground wave)",
            "within-the-hour fading (left to the required SNR)",
        ],
        "libraries": {
            "PyIRI": iri.pyiri_version(),
            "numpy": np.__version__,
            "scipy": scipy.__version__,
            "geographiclib": geographiclib.__version__,
        },
    }
