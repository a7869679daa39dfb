"""Link predictions for a plan: both directions of every link, every month and solar level, worst case kept.

A net link works only when both stations hear each other, so each link is
predicted in both directions (power, antennas and receiver noise differ) and
the weaker direction counts. Over the months the validity period touches and
over both ends of a solar range, each figure keeps its worst case: lowest
fraction of good days (with the SNR, margin and mode of that case), lowest
MUF and OWF, highest LUF.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from planpack import bandgrid, localtime
from planpack.ionosphere import VIA_NAMES, ChannelSet, LinkSet, methods, predict_month
from planpack.ionosphere.groundwave import GROUND_CONSTANTS
from planpack.ionosphere import landsea
from planpack.ionosphere.iri import r12_from_f107
from planpack.ionosphere.noise import CATEGORIES
from planpack.ionosphere.sun import sunrise_sunset
from planpack.plan.models import Plan

# plan vocabulary -> the propagation package's keys
_SOIL = {"sea": "sea", "fresh-water": "fresh_water", "wet": "wet_ground", "medium-dry": "medium_dry_ground",
         "very-dry": "very_dry_ground", "ice": "ice"}
_NOISE = {"city": "city", "residential": "residential", "rural": "rural", "quiet-rural": "quiet_rural"}


@dataclass(frozen=True)
class LinkPredictions:
    """Worst-case predictions per plan link (n), UTC hour (24) and channel (c)."""

    distance_km: np.ndarray  # (n,)
    azimuth_deg: np.ndarray  # (n,) from the first station of the link
    n_hops: np.ndarray  # (n,)
    muf_mhz: np.ndarray  # (n, 24)
    owf_mhz: np.ndarray  # (n, 24)
    luf_mhz: np.ndarray  # (n, 24), 90 % LUF; NaN where no frequency meets the requirement
    luf_below_floor: np.ndarray  # (n, 24) bool: the 90 % LUF is at or below the band grid's floor
    elevation_deg: np.ndarray  # (n, 24)
    snr_db: np.ndarray  # (n, 24, c)
    margin_db: np.ndarray  # (n, 24, c)
    good_days: np.ndarray  # (n, 24, c)
    via: np.ndarray  # (n, 24, c) int codes of VIA_NAMES
    skip: np.ndarray  # (n, 24, c) bool
    grid_mhz: np.ndarray  # (g,) the band grid
    grid_good_days: np.ndarray  # (n, 24, g) worst case, with each station's own antennas
    grid_margin_db: np.ndarray  # (n, 24, g) median margin of the worst case [dB]
    sun_utc_h: list  # per station (sunrise, sunset) UTC hours or None
    sun_date: str
    assumptions: dict
    scenarios: list  # [(year, month, ssn)]

    def via_name(self, li: int, h: int, c: int) -> str | None:
        return VIA_NAMES[int(self.via[li, h, c])]


def ssn_levels(plan: Plan) -> list[float]:
    """The sunspot numbers R12 to predict for: one, or both ends of a range.

    A flux below about 63.7 sfu converts to a negative R12 by P.1239's relation;
    it is taken as R12 = 0, the quietest sun the ionospheric maps describe.
    """
    sol = plan.net.solar
    if sol.index == "ssn":
        return [float(v) for v in sol.values]
    return [max(0.0, float(np.round(r12_from_f107(v), 1))) for v in sol.values]


def link_set(plan: Plan, setup, pairs: list[tuple[str, str]]) -> LinkSet:
    """The propagation package's input for directed (tx, rx) station pairs.

    Gain tables are per station (one row per station, links index them), on
    the channels and on the band grid.
    """
    stations = list(plan.stations)
    row = {s.id: i for i, s in enumerate(stations)}
    st = {s.id: s for s in stations}
    kinds = {a.id: a.kind for a in plan.antennas}
    gains = np.stack([setup.gain_table(s) for s in stations]).astype(np.float32)
    grid = np.stack([setup.grid_gain_table(s) for s in stations]).astype(np.float32)
    ground = np.stack([setup.ground_gain(s) for s in stations]).astype(np.float32)
    grid_ground = np.stack([setup.grid_ground_gain(s) for s in stations]).astype(np.float32)
    tx = [st[a] for a, _ in pairs]
    rx = [st[b] for _, b in pairs]
    soils = [_land_ground(t, r) for t, r in zip(tx, rx)]
    sections = _path_sections(tx, rx)
    cat = [CATEGORIES[_NOISE[r.noise]] for r in rx]
    vertical = {s.id: setup.vertical(s, kinds) for s in stations}
    return LinkSet(
        tx_lat_deg=np.array([t.at.lat_deg for t in tx]), tx_lon_deg=np.array([t.at.lon_deg for t in tx]),
        rx_lat_deg=np.array([r.at.lat_deg for r in rx]), rx_lon_deg=np.array([r.at.lon_deg for r in rx]),
        tx_power_w=np.array([t.power_w for t in tx]),
        tx_gain_dbi=gains, rx_gain_dbi=gains,
        tx_station=np.array([row[t.id] for t in tx], dtype=np.intp),
        rx_station=np.array([row[r.id] for r in rx], dtype=np.intp),
        tx_grid_gain_dbi=grid, rx_grid_gain_dbi=grid,
        tx_ground_gain_dbi=ground, rx_ground_gain_dbi=ground,
        tx_grid_ground_gain_dbi=grid_ground, rx_grid_ground_gain_dbi=grid_ground,
        vertical=np.array([vertical[t.id] and vertical[r.id] for t, r in zip(tx, rx)], dtype=bool),
        ground_eps_r=np.array([g[0] for g in soils]), ground_sigma_s_m=np.array([g[1] for g in soils]),
        noise_c_db=np.array([k.c_db for k in cat]), noise_d=np.array([k.d for k in cat]),
        noise_margin_db=np.array([r.noise_margin_db for r in rx]),
        noise_upper_decile_db=np.array([k.upper_decile_db for k in cat]),
        noise_lower_decile_db=np.array([k.lower_decile_db for k in cat]),
        path_section_km=None if sections is None else sections[0],
        path_section_sea=None if sections is None else sections[1],
    )


#: Soils that are water: their stations stand at the water's edge, not on land.
_WATER = ("sea", "fresh-water")
#: Ground of a path's land when both stations stand at water: P.527 medium-dry ground, the usual
#: stand-in for land of unknown kind (common practice, no source).
_DEFAULT_LAND = "medium-dry"
#: A station on water soil whose first stretch of path the land mask calls land: that stretch is
#: the coast under the station (the mask's cells are 0.05 deg), counted as water up to this length [km].
_SHORE_KM = 6.0


def _land_ground(t, r) -> tuple[float, float]:
    """Ground constants of a path's land sections: the poorer conductor of the two stations' land soils."""
    land = [s.ground.soil for s in (t, r) if s.ground.soil not in _WATER] or [_DEFAULT_LAND]
    return min((GROUND_CONSTANTS[_SOIL[s]] for s in land), key=lambda g: g[1])


def _path_sections(tx, rx):
    """Land and sea sections of each path from the land mask (None where the mask is not installed).

    Where a station stands on water soil, a short first or last land stretch is its own shore.
    """
    if not tx:
        return None
    try:
        km, sea = landsea.path_sections([t.at.lat_deg for t in tx], [t.at.lon_deg for t in tx],
                                        [r.at.lat_deg for r in rx], [r.at.lon_deg for r in rx])
    except landsea.LandMaskUnavailable:
        return None
    sea = sea.copy()
    counts = (km > 0).sum(axis=1)
    for i, (t, r) in enumerate(zip(tx, rx)):
        if t.ground.soil in _WATER and km[i, 0] <= _SHORE_KM:
            sea[i, 0] = True
        last = counts[i] - 1
        if r.ground.soil in _WATER and last >= 0 and km[i, last] <= _SHORE_KM:
            sea[i, last] = True
    return km, sea


def channel_set(plan: Plan) -> ChannelSet:
    return ChannelSet(freq_mhz=np.array([c.mhz for c in plan.channels]),
                      required_snr_db=np.array([plan.modes[c.mode].snr_db for c in plan.channels]),
                      bandwidth_hz=np.array([plan.modes[c.mode].bandwidth_hz for c in plan.channels]))


def _worse(best: dict | None, new: dict) -> dict:
    """Keep, cell by cell, the worst case of two predictions (already in per-link form)."""
    if best is None:
        return new
    take = new["good_days"] < best["good_days"]
    out = {}
    for k in ("snr_db", "margin_db", "good_days", "via", "skip"):
        out[k] = np.where(take, new[k], best[k])
    out["muf_mhz"] = np.minimum(best["muf_mhz"], new["muf_mhz"])
    out["owf_mhz"] = np.minimum(best["owf_mhz"], new["owf_mhz"])
    out["luf_mhz"] = _nanmax(best["luf_mhz"], new["luf_mhz"])
    out["luf_below_floor"] = np.where(new["luf_mhz"] > best["luf_mhz"], new["luf_below_floor"],
                                      best["luf_below_floor"] & new["luf_below_floor"])
    take_g = new["grid_good_days"] < best["grid_good_days"]
    out["grid_good_days"] = np.where(take_g, new["grid_good_days"], best["grid_good_days"])
    out["grid_margin_db"] = np.where(take_g, new["grid_margin_db"], best["grid_margin_db"])
    out["elevation_deg"] = np.where(new["muf_mhz"] < best["muf_mhz"], new["elevation_deg"], best["elevation_deg"])
    out["n_hops"] = np.maximum(best["n_hops"], new["n_hops"])
    return out


def _nanmax(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    both = np.isnan(a) | np.isnan(b)
    return np.where(both, np.nan, np.fmax(a, b))  # a frequency that never works stays 'none' (NaN)


def _weaker_direction(p, n: int) -> dict:
    """Fold the 2n directed predictions (forward then reverse) into n two-way links."""
    g_f, g_r = p.good_days[:n], p.good_days[n:]
    take = g_r < g_f
    d = {k: np.where(take, getattr(p, k)[n:], getattr(p, k)[:n]) for k in ("snr_db", "margin_db", "good_days", "via", "skip")}
    d["skip"] = p.skip[:n] | p.skip[n:]
    d["muf_mhz"] = np.minimum(p.muf_mhz[:n], p.muf_mhz[n:])
    d["owf_mhz"] = np.minimum(p.owf_mhz[:n], p.owf_mhz[n:])
    d["luf_mhz"] = _nanmax(p.luf_mhz[:n], p.luf_mhz[n:])
    d["luf_below_floor"] = np.where(p.luf_mhz[n:] > p.luf_mhz[:n], p.luf_below_floor[n:],
                                    p.luf_below_floor[:n] & p.luf_below_floor[n:])
    take_g = p.grid_good_days[n:] < p.grid_good_days[:n]
    d["grid_good_days"] = np.where(take_g, p.grid_good_days[n:], p.grid_good_days[:n])
    d["grid_margin_db"] = np.where(take_g, p.grid_margin_db[n:], p.grid_margin_db[:n])
    d["elevation_deg"] = p.elevation_deg[:n]
    d["n_hops"] = np.maximum(p.n_hops[:n], p.n_hops[n:])
    return d


def predict_links(plan: Plan, setup) -> LinkPredictions:
    """Worst-case two-way predictions for every link of the plan."""
    links = list(plan.links)
    n = len(links)
    directed = links + [(b, a) for a, b in links]
    ls = link_set(plan, setup, directed) if n else None
    cs = channel_set(plan)
    months = localtime.months_touched(plan.net.valid_from, plan.net.valid_to)
    levels = ssn_levels(plan)
    worst = None
    first = None
    scenarios = []
    for year, month in months:
        for ssn in levels:
            scenarios.append((year, month, ssn))
            if not n:
                continue
            p = predict_month(ls, cs, year, month, ssn)
            first = first or p
            worst = _worse(worst, _weaker_direction(p, n))
    c = len(plan.channels)
    empty3 = np.zeros((0, 24, c))
    empty2 = np.zeros((0, 24))
    ref = localtime.reference_day(plan.net.valid_from, plan.net.valid_to)
    sun = [sunrise_sunset(s.at.lat_deg, s.at.lon_deg, ref) for s in plan.stations]
    m = methods()
    assumptions = {
        "months": [f"{y:04d}-{mo:02d}" for y, mo in months],
        "solar": {"index": plan.net.solar.index, "values": list(plan.net.solar.values), "ssn_used": levels},
        "scenarios": [{"month": f"{y:04d}-{mo:02d}", "ssn": s} for y, mo, s in scenarios],
        "worst_case": ("each figure is the worst case over the months and solar levels listed, and over the two "
                       "directions of each link (the weaker direction counts)"),
        "models": {k: v for k, v in m.items() if k != "not_modelled"},
        "not_modelled": list(m.get("not_modelled", [])),
        "antenna_gains": "NEC-2 (PyNEC) elevation patterns of each station's antenna over its own ground, azimuth-averaged, "
                         "less mismatch and feedline loss; the better antenna where a station has two",
    }
    g = bandgrid.GRID_POINTS
    if worst is None:
        return LinkPredictions(np.zeros(0), np.zeros(0), np.zeros(0, int), empty2, empty2, empty2,
                               np.zeros((0, 24), bool), empty2, empty3, empty3, empty3, np.zeros((0, 24, c), int),
                               np.zeros((0, 24, c), bool), np.array(bandgrid.GRID_MHZ), np.zeros((0, 24, g)),
                               np.zeros((0, 24, g)), sun, ref.isoformat(), assumptions, scenarios)
    return LinkPredictions(
        distance_km=first.distance_km[:n], azimuth_deg=first.azimuth_deg[:n], n_hops=worst["n_hops"],
        muf_mhz=worst["muf_mhz"], owf_mhz=worst["owf_mhz"], luf_mhz=worst["luf_mhz"],
        luf_below_floor=worst["luf_below_floor"],
        elevation_deg=worst["elevation_deg"], snr_db=worst["snr_db"], margin_db=worst["margin_db"],
        good_days=worst["good_days"], via=worst["via"], skip=worst["skip"],
        grid_mhz=np.array(first.grid_mhz), grid_good_days=worst["grid_good_days"],
        grid_margin_db=worst["grid_margin_db"],
        sun_utc_h=sun, sun_date=ref.isoformat(), assumptions=assumptions, scenarios=scenarios,
    )


__all__ = ["LinkPredictions", "predict_links", "link_set", "channel_set", "ssn_levels"]
