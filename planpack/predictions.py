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

from planpack import localtime
from planpack.ionosphere import VIA_NAMES, ChannelSet, LinkSet, methods, predict_month
from planpack.ionosphere.groundwave import GROUND_CONSTANTS
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
    luf_mhz: np.ndarray  # (n, 24), NaN where no frequency meets the requirement
    elevation_deg: np.ndarray  # (n, 24)
    snr_db: np.ndarray  # (n, 24, c)
    margin_db: np.ndarray  # (n, 24, c)
    good_days: np.ndarray  # (n, 24, c)
    via: np.ndarray  # (n, 24, c) int codes of VIA_NAMES
    skip: np.ndarray  # (n, 24, c) bool
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
    """The propagation package's input for directed (tx, rx) station pairs."""
    st = {s.id: s for s in plan.stations}
    kinds = {a.id: a.kind for a in plan.antennas}
    gains = {s.id: setup.gain_table(s) for s in plan.stations}
    tx = [st[a] for a, _ in pairs]
    rx = [st[b] for _, b in pairs]
    # the ground wave runs over both stations' ground: take the poorer conductor (cautious)
    soils = [min((GROUND_CONSTANTS[_SOIL[t.ground.soil]], GROUND_CONSTANTS[_SOIL[r.ground.soil]]), key=lambda g: g[1])
             for t, r in zip(tx, rx)]
    cat = [CATEGORIES[_NOISE[r.noise]] for r in rx]
    return LinkSet(
        tx_lat_deg=np.array([t.at.lat_deg for t in tx]), tx_lon_deg=np.array([t.at.lon_deg for t in tx]),
        rx_lat_deg=np.array([r.at.lat_deg for r in rx]), rx_lon_deg=np.array([r.at.lon_deg for r in rx]),
        tx_power_w=np.array([t.power_w for t in tx]),
        tx_gain_dbi=np.stack([gains[t.id] for t in tx]), rx_gain_dbi=np.stack([gains[r.id] for r in rx]),
        vertical=np.array([setup.vertical(t, kinds) and setup.vertical(r, kinds) for t, r in zip(tx, rx)]),
        ground_eps_r=np.array([g[0] for g in soils]), ground_sigma_s_m=np.array([g[1] for g in soils]),
        noise_c_db=np.array([k.c_db for k in cat]), noise_d=np.array([k.d for k in cat]),
        noise_margin_db=np.array([r.noise_margin_db for r in rx]),
        noise_upper_decile_db=np.array([k.upper_decile_db for k in cat]),
        noise_lower_decile_db=np.array([k.lower_decile_db for k in cat]),
    )


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
    if worst is None:
        return LinkPredictions(np.zeros(0), np.zeros(0), np.zeros(0, int), empty2, empty2, empty2, empty2, empty3, empty3,
                               empty3, np.zeros((0, 24, c), int), np.zeros((0, 24, c), bool), sun, ref.isoformat(),
                               assumptions, scenarios)
    return LinkPredictions(
        distance_km=first.distance_km[:n], azimuth_deg=first.azimuth_deg[:n], n_hops=worst["n_hops"],
        muf_mhz=worst["muf_mhz"], owf_mhz=worst["owf_mhz"], luf_mhz=worst["luf_mhz"],
        elevation_deg=worst["elevation_deg"], snr_db=worst["snr_db"], margin_db=worst["margin_db"],
        good_days=worst["good_days"], via=worst["via"], skip=worst["skip"],
        sun_utc_h=sun, sun_date=ref.isoformat(), assumptions=assumptions, scenarios=scenarios,
    )


__all__ = ["LinkPredictions", "predict_links", "link_set", "channel_set", "ssn_levels"]
