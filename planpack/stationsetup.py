"""Each station's antennas, solved with NEC-2 over the station's own ground.

A design shared by many stations over the same soil and ground system is
solved once (the antenna package caches by design, ground and channel set).
Every antenna is solved on the plan's channels and on the shared band grid
(:data:`planpack.bandgrid.GRID_KHZ`).

What the link budget calls, for a plan ``Station`` (gains in dBi relative to
the set's output power, so every loss from the set to the antenna is in
them; rows are frequencies, columns elevation 0..90 deg in 1 deg steps):

- ``gain_table(station)`` -> (c, 91) on the plan's channels (exact solves);
- ``grid_gain_table(station)`` -> (g, 91) on ``GRID_KHZ``;
- ``gain_table_at(station, freqs_khz)`` -> (k, 91) at any frequencies in
  1500-30000 kHz (impedance and pattern interpolated, losses exact);
- ``best_antenna(station)`` -> per channel, the antenna to rig and its
  margin in dB over the next one.

Where a station may use more than one antenna, each cell is the better one,
as a team would rig the better antenna for the channel.
"""

from __future__ import annotations

import os
from dataclasses import dataclass

import numpy as np

from planpack.antennas import (AntennaAnalysis, AntennaDesign, AntennaGeometryError, AntennaInputError, GroundSpec,
                               analyse_antennas, station_exposure)
from planpack.bandgrid import GRID_KHZ
from planpack.ionosphere import groundwave
from planpack.plan.diagnostics import Collector
from planpack.plan.models import Antenna, Plan, Station

#: Ground for an antenna that no station uses (it still gets a cut sheet).
DEFAULT_GROUND = GroundSpec("medium-dry", "none")

#: Elevations [deg] over which antennas are compared for a channel: skywave on
#: paths of up to about 600 km from a layer 250-350 km up arrives above about
#: 35 deg (flat-earth geometry, atan(h / (d / 2)); common practice, no source).
COMPARE_ELEVATION_DEG = (35.0, 90.0)

# AntennaDesign field -> the plan key it comes from, to point a diagnostic at it.
_PLAN_KEY = {
    "design_khz": "design_khz", "height_m": "height_m", "apex_deg": "apex_deg", "wire_mm": "wire_mm",
    "length_m": "length_m", "spacing_m": "spacing_m", "resistor_ohm": "resistor_ohm",
    "transformer_ratio": "transformer_ratio", "feed_z0_ohm": "feedline.z0_ohm",
    "feed_length_m": "feedline.length_m", "feed_loss_db_per_100m_at_10mhz": "feedline.loss_db_per_100m_at_10mhz",
    "feed_velocity_factor": "feedline.velocity_factor", "matching": "matching",
    "matching_coil_q": "matching_coil_q",
}


def design_of(a: Antenna) -> AntennaDesign:
    """The antenna package's input from the plan's antenna."""
    fl = a.feedline
    return AntennaDesign(
        kind=a.kind, design_khz=a.design_khz, height_m=a.height_m, apex_deg=a.apex_deg, wire_mm=a.wire_mm,
        length_m=a.length_m, spacing_m=a.spacing_m, resistor_ohm=a.resistor_ohm, transformer_ratio=a.transformer_ratio,
        feed_z0_ohm=fl.z0_ohm if fl else 50.0, feed_length_m=fl.length_m if fl else 0.0,
        feed_loss_db_per_100m_at_10mhz=fl.loss_db_per_100m_at_10mhz if fl else 0.0,
        feed_velocity_factor=fl.velocity_factor if fl else 0.66,
        matching=a.matching, matching_coil_q=a.matching_coil_q,
    )


def ground_of(s: Station, kind: str) -> GroundSpec:
    """The ground under a station's antenna; the ground system matters only to a whip (wire antennas are
    balanced and fed through a balun), so wire antennas share one solution per soil."""
    return GroundSpec(s.ground.soil, s.ground.system if kind == "whip" else "none")


@dataclass(frozen=True)
class AntennaPick:
    """The antenna to rig on one channel at one station.

    antenna : antenna id with the best mean system gain over the compared elevations.
    margin_db : its lead over the next antenna of the station [dB]; None when the station has one antenna.
    figure_db : antenna id -> mean system gain over the compared elevations [dBi from the set's output].
    """

    antenna: str
    margin_db: float | None
    figure_db: dict[str, float]


def _figure_db(system_gain_dbi: np.ndarray, elevation_deg: tuple[float, float]) -> np.ndarray:
    """(f,) power mean of the gain [dBi] over an elevation band, from (f, 91) tables."""
    el = np.arange(system_gain_dbi.shape[-1], dtype=float)
    band = (el >= elevation_deg[0]) & (el <= elevation_deg[1])
    mean = np.mean(10.0 ** (system_gain_dbi[..., band] / 10.0), axis=-1)
    return 10.0 * np.log10(np.maximum(mean, 1e-30))


@dataclass(frozen=True)
class StationAntennas:
    """Solved antennas: per (station, antenna) and the one shown for each antenna id."""

    by_station: dict[tuple[str, str], AntennaAnalysis]
    primary: dict[str, AntennaAnalysis]  # antenna id -> analysis over its first station's ground
    primary_station: dict[str, str | None]
    antennas: dict[str, Antenna]

    def loss(self, antenna_id: str, result: AntennaAnalysis) -> tuple[np.ndarray, np.ndarray]:
        """(c,) loss from the set to the antenna [dB] and whether the plan's matching matches it fully."""
        return np.asarray(result.system_loss_db), np.asarray(result.matched)

    def _results(self, station: Station) -> list[tuple[str, AntennaAnalysis]]:
        return [(a, self.by_station[(station.id, a)]) for a in station.antennas]

    def gain_table(self, station: Station) -> np.ndarray:
        """(c, 91) gain [dBi] from the set's output on the plan's channels, best antenna per channel and elevation."""
        return np.maximum.reduce([np.asarray(r.system_gain_table_dbi) for _, r in self._results(station)])

    def grid_gain_table(self, station: Station) -> np.ndarray:
        """(g, 91) gain [dBi] from the set's output on ``GRID_KHZ``, best antenna per frequency and elevation."""
        return np.maximum.reduce([np.asarray(r.grid_system_gain_table_dbi) for _, r in self._results(station)])

    def gain_table_at(self, station: Station, freqs_khz) -> np.ndarray:
        """(k, 91) gain [dBi] from the set's output at frequencies [kHz] in 1500-30000, best antenna per cell.

        The feed impedance (R and X, in log f) and the gain pattern are
        interpolated between solved frequencies; the matching and feedline
        losses are computed at each exact frequency.
        """
        return np.maximum.reduce([r.figures_at(freqs_khz).system_gain_table_dbi for _, r in self._results(station)])

    def _ground_wave_rows(self, station: Station) -> list[tuple[str, AntennaAnalysis]]:
        """The antennas a station would use for the ground wave: its whips, or all when it has none."""
        rows = self._results(station)
        whips = [(a, r) for a, r in rows if r.design.kind == "whip"]
        return whips or rows

    @staticmethod
    def _ground_wave_gain(tables: list[np.ndarray]) -> np.ndarray:
        # The ground wave leaves along the ground: credit the antenna's peak from the set's output,
        # never more than a short monopole on perfect ground (as the link budget's default does).
        return np.minimum(np.maximum.reduce([np.asarray(t).max(axis=-1) for t in tables]),
                          groundwave.SHORT_MONOPOLE_GAIN_DBI)

    def ground_gain(self, station: Station) -> np.ndarray:
        """(c,) gain [dBi] credited to the ground wave on the plan's channels: from the station's whips,
        which it rigs for the ground wave, or from all its antennas when it has no whip."""
        return self._ground_wave_gain([r.system_gain_table_dbi for _, r in self._ground_wave_rows(station)])

    def grid_ground_gain(self, station: Station) -> np.ndarray:
        """(g,) as :meth:`ground_gain`, on ``GRID_KHZ``."""
        return self._ground_wave_gain([r.grid_system_gain_table_dbi for _, r in self._ground_wave_rows(station)])

    def ground_gain_at(self, station: Station, freqs_khz) -> np.ndarray:
        """(k,) as :meth:`ground_gain`, at frequencies [kHz] in 1500-30000 (see :meth:`gain_table_at`)."""
        return self._ground_wave_gain([r.figures_at(freqs_khz).system_gain_table_dbi
                                       for _, r in self._ground_wave_rows(station)])

    def best_antenna(self, station: Station, elevation_deg: tuple[float, float] = COMPARE_ELEVATION_DEG
                     ) -> list[AntennaPick]:
        """Per plan channel, the antenna the station should rig and its margin over the next one.

        Antennas are compared by their system gain (from the set's output,
        all losses in) averaged in power over ``elevation_deg`` [deg].
        """
        rows = self._results(station)
        figs = {a: _figure_db(np.asarray(r.system_gain_table_dbi), elevation_deg) for a, r in rows}
        picks = []
        for c in range(len(rows[0][1].freqs_khz)):
            order = sorted(figs, key=lambda a: (-figs[a][c], a))
            margin = float(figs[order[0]][c] - figs[order[1]][c]) if len(order) > 1 else None
            picks.append(AntennaPick(order[0], margin, {a: float(figs[a][c]) for a in order}))
        return picks

    def vertical(self, station: Station, kinds: dict[str, str]) -> bool:
        """True when the station has a whip, which it rigs for the ground wave (vertical polarisation)."""
        return any(kinds[a] == "whip" for a in station.antennas)

    def rigging(self, plan: Plan, channel_ids: list[str]) -> dict[str, list[dict]]:
        """Station id -> per channel {channel, antenna, margin_db}: which antenna to rig (JSON-ready)."""
        out = {}
        for s in plan.stations:
            out[s.id] = [{"channel": cid, "antenna": p.antenna,
                          "margin_db": None if p.margin_db is None else round(p.margin_db, 1)}
                         for cid, p in zip(channel_ids, self.best_antenna(s))]
        return out

    def to_dicts(self, plan: Plan, channel_ids: list[str]) -> list[dict]:
        rig = self.rigging(plan, channel_ids)
        out = []
        for a in plan.antennas:
            res = self.primary[a.id]
            d = res.to_dict(channel_ids)
            users = [s for s in plan.stations if a.id in s.antennas]
            for i, ch in enumerate(d["channels"]):
                # the stations that should rig this antenna on this channel (it is their best there)
                ch["rig_at"] = [s.id for s in users if rig[s.id][i]["antenna"] == a.id]
            d = {"id": a.id, "stations": [s.id for s in users], **d}
            d["solved_over"] = {"station": self.primary_station[a.id], "soil": res.ground.soil,
                                "system": res.ground.system}
            d["exposure"] = []
            for s in users:
                r = self.by_station[(s.id, a.id)]
                duty = max(plan.modes[c.mode].duty_factor for c in plan.channels)
                e = station_exposure(r, s.power_w, duty)
                d["exposure"].append({"station": s.id, "power_w": s.power_w, "duty_factor": duty,
                                      "general_public_m": round(e["general_public_m"], 1),
                                      "occupational_m": round(e["occupational_m"], 1),
                                      "worst_freq_khz": e["worst_freq_khz"],
                                      "within_near_field": e["within_near_field"], "basis": e["basis"]})
            out.append(d)
        return out


def _input_error(plan: Plan, out: Collector, a: Antenna, exc: AntennaInputError) -> None:
    """A design the antenna package refuses, as a diagnostic at the plan key it came from."""
    field = exc.field.split(".", 1)[-1]
    key = f"antennas.{a.id}.{_PLAN_KEY[field]}" if field in _PLAN_KEY else f"antennas.{a.id}"
    line, col = plan.where(key)
    if isinstance(exc, AntennaGeometryError):
        out.add("error", "antenna-geometry", key, f"{key}: {exc}", line, col)
    else:
        got = f"{exc.got:g}" if isinstance(exc.got, float) else repr(exc.got)
        out.add("error", "out-of-range", key, f"{key}: expected {exc.expected}, got {got}", line, col)


def solve_station_antennas(plan: Plan, out: Collector) -> StationAntennas | None:
    """Solve every (antenna, station ground) pair the plan uses; diagnose antennas the solver cannot take.

    Every failure becomes a positioned error for the antenna that caused it:
    a design that cannot be built (``antenna-geometry``), a value out of
    range, or NEC failing or its worker process dying on it
    (``antenna-solve-failed``).  Solving runs in worker processes, so that a
    crash inside NEC never ends planpack.
    """
    freqs = tuple(c.khz for c in plan.channels)
    designs: dict[str, AntennaDesign] = {}
    for a in plan.antennas:
        try:
            designs[a.id] = design_of(a)
        except AntennaInputError as exc:
            _input_error(plan, out, a, exc)
    if out.has_errors:
        return None
    jobs: list[tuple[str | None, str]] = []  # (station id or None, antenna id)
    for s in plan.stations:
        jobs += [(s.id, a) for a in s.antennas]
    used = {a for _, a in jobs}
    jobs += [(None, a.id) for a in plan.antennas if a.id not in used]
    stations = {s.id: s for s in plan.stations}
    specs = [(designs[a], ground_of(stations[s], designs[a].kind) if s else DEFAULT_GROUND, freqs) for s, a in jobs]
    results = analyse_antennas(specs, workers=_workers(len({(d, g) for d, g, _ in specs})), isolate=True,
                               return_exceptions=True)
    told: set[tuple[str, str]] = set()
    for (s, a), spec, r in zip(jobs, specs, results):
        if not isinstance(r, Exception) or (a, str(r)) in told:
            continue
        told.add((a, str(r)))
        if isinstance(r, AntennaInputError):
            _input_error(plan, out, plan.antenna(a), r)
            continue
        line, col = plan.where(f"antennas.{a}")
        over = f"over the {spec[1].soil} ground of station {s}" if s else f"over {spec[1].soil} ground"
        out.add("error", "antenna-solve-failed", f"antennas.{a}",
                f"antennas.{a}: the NEC solver could not solve this antenna {over}: {r}; check its height, "
                f"lengths and wire size", line, col)
    if out.has_errors:
        return None
    by_station: dict[tuple[str, str], AntennaAnalysis] = {}
    users: dict[str, list[tuple[str | None, AntennaAnalysis]]] = {}
    for (s, a), r in zip(jobs, results):
        if s is not None:
            by_station[(s, a)] = r
        users.setdefault(a, []).append((s, r))
    # the antenna's own sheet is shown over the soil most of its stations share (ties: soil name), so that
    # the order stations are written in changes nothing
    primary: dict[str, AntennaAnalysis] = {}
    primary_station: dict[str, str | None] = {}
    for a, rows in users.items():
        count: dict[str, int] = {}
        for _, r in rows:
            count[r.ground.soil] = count.get(r.ground.soil, 0) + 1
        soil = min(count, key=lambda k: (-count[k], k))
        s, r = min(((s, r) for s, r in rows if r.ground.soil == soil), key=lambda x: x[0] or "")
        primary[a], primary_station[a] = r, s
    return StationAntennas(by_station, primary, primary_station, {a.id: a for a in plan.antennas})


def _workers(distinct: int) -> int:
    """One worker process per distinct solve, up to the CPU count."""
    return max(1, min(os.cpu_count() or 1, distinct))


__all__ = ["AntennaPick", "COMPARE_ELEVATION_DEG", "DEFAULT_GROUND", "GRID_KHZ", "StationAntennas", "design_of",
           "ground_of", "solve_station_antennas"]
