"""Each station's antennas, solved with NEC-2 over the station's own ground.

A design shared by many stations over the same soil and ground system is
solved once (the antenna package caches by design, ground and channel set).
The link budget gets one gain table per station: where a station may use
more than one antenna, the better one at each channel and elevation, as a
team would rig the better antenna for the net.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from planpack.antennas import (AntennaAnalysis, AntennaDesign, AntennaInputError, AntennaSolveError, GroundSpec,
                               analyse_antennas, station_exposure)
from planpack.antennas.matching import MATCHING, system_loss_db
from planpack.plan.diagnostics import Collector
from planpack.plan.models import Antenna, Plan, Station

#: Ground for an antenna that no station uses (it still gets a cut sheet).
DEFAULT_GROUND = GroundSpec("medium-dry", "none")


def design_of(a: Antenna) -> AntennaDesign:
    """The antenna package's input from the plan's antenna."""
    fl = a.feedline
    return AntennaDesign(
        kind=a.kind, design_khz=a.design_khz, height_m=a.height_m, apex_deg=a.apex_deg, wire_mm=a.wire_mm,
        length_m=a.length_m, spacing_m=a.spacing_m, resistor_ohm=a.resistor_ohm, transformer_ratio=a.transformer_ratio,
        feed_z0_ohm=fl.z0_ohm if fl else 50.0, feed_length_m=fl.length_m if fl else 0.0,
        feed_loss_db_per_100m_at_10mhz=fl.loss_db_per_100m_at_10mhz if fl else 0.0,
    )


def ground_of(s: Station, kind: str) -> GroundSpec:
    """The ground under a station's antenna; the ground system matters only to a whip (wire antennas are
    balanced and fed through a balun), so wire antennas share one solution per soil."""
    return GroundSpec(s.ground.soil, s.ground.system if kind == "whip" else "none")


@dataclass(frozen=True)
class StationAntennas:
    """Solved antennas: per (station, antenna) and the one shown for each antenna id."""

    by_station: dict[tuple[str, str], AntennaAnalysis]
    primary: dict[str, AntennaAnalysis]  # antenna id -> analysis over its first station's ground
    primary_station: dict[str, str | None]
    antennas: dict[str, Antenna]

    def loss(self, antenna_id: str, result: AntennaAnalysis) -> tuple[np.ndarray, np.ndarray]:
        """(c,) loss from the set to the antenna [dB] and whether it is matched, with the plan's matching."""
        if result.kind == "whip":  # the set's tuner at the base: the antenna package's own model
            return np.asarray(result.system_loss_db), np.ones(len(result.freqs_khz), bool)
        return system_loss_db(self.antennas[antenna_id].matching, result.swr, result.mismatch_loss_db,
                              result.feedline_loss_db, result.feedline_loss_with_swr_db)

    def gain_table(self, station: Station) -> np.ndarray:
        """(c, 91) gain [dBi] from the set's output, of the station's best antenna per channel and elevation."""
        tables = []
        for a in station.antennas:
            r = self.by_station[(station.id, a)]
            tables.append(np.asarray(r.gain_table_dbi) - self.loss(a, r)[0][:, None])
        return np.maximum.reduce(tables) if len(tables) > 1 else tables[0]

    def vertical(self, station: Station, kinds: dict[str, str]) -> bool:
        """True when the station's antennas are all whips (vertical polarisation for the ground wave)."""
        return all(kinds[a] == "whip" for a in station.antennas)

    def to_dicts(self, plan: Plan, channel_ids: list[str]) -> list[dict]:
        out = []
        for a in plan.antennas:
            res = self.primary[a.id]
            d = res.to_dict(channel_ids)
            loss, matched = self.loss(a.id, res)
            d["matching"] = {"kind": a.matching if a.kind != "whip" else "set-tuner",
                             "max_swr": MATCHING[a.matching][0] if a.kind != "whip" else None,
                             "basis": "matching ranges and losses are typical figures (common practice, no source)"}
            for ch, l_db, m in zip(d["channels"], loss, matched):
                ch["system_loss_db"] = round(float(l_db), 2)
                ch["matched"] = bool(m)
            users = [s for s in plan.stations if a.id in s.antennas]
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


def solve_station_antennas(plan: Plan, out: Collector) -> StationAntennas | None:
    """Solve every (antenna, station ground) pair the plan uses; diagnose antennas the solver cannot take."""
    freqs = tuple(c.khz for c in plan.channels)
    designs: dict[str, AntennaDesign] = {}
    for a in plan.antennas:
        try:
            designs[a.id] = design_of(a)
        except AntennaInputError as exc:
            line, col = plan.where(f"antennas.{a.id}")
            out.add("error", "out-of-range", f"antennas.{a.id}", f"antennas.{a.id}: {exc}", line, col)
    if out.has_errors:
        return None
    jobs: list[tuple[str | None, str]] = []  # (station id or None, antenna id)
    for s in plan.stations:
        jobs += [(s.id, a) for a in s.antennas]
    used = {a for _, a in jobs}
    jobs += [(None, a.id) for a in plan.antennas if a.id not in used]
    stations = {s.id: s for s in plan.stations}
    specs = [(designs[a], ground_of(stations[s], designs[a].kind) if s else DEFAULT_GROUND, freqs) for s, a in jobs]
    try:
        results = analyse_antennas(specs, workers=_workers(len({(d, g) for d, g, _ in specs})))
    except (AntennaInputError, AntennaSolveError) as exc:
        # find which antenna: solve them one by one to point at it
        for (s, a), spec in zip(jobs, specs):
            try:
                analyse_antennas([spec], workers=1)
            except (AntennaInputError, AntennaSolveError) as one:
                line, col = plan.where(f"antennas.{a}")
                out.add("error", "out-of-range", f"antennas.{a}", f"antennas.{a}: the antenna cannot be solved: {one}", line, col)
                return None
        raise exc
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
    """Solve in parallel processes only when there is enough to share out."""
    import os

    return 1 if distinct < 3 else min(os.cpu_count() or 1, distinct)
