"""Benchmark: compiling synthetic all-pairs plans of 10, 30 and 60 stations with 40 channels.

Goes through the whole path a user's plan takes (YAML -> reader -> antennas ->
predictions -> schedule -> plan.json data) and prints each stage's time and
the prediction cost per link·hour·channel cell (both directions of each link
are predicted, so a plan of L links costs 2·L·24·40 cells). Stations are
invented, scattered over central Europe. Run:

    .venv/bin/python bench/bench_compile.py
"""

from __future__ import annotations

import os
import sys
import tempfile
import time

import numpy as np

sys.path.insert(0, os.path.dirname(os.path.dirname(os.path.abspath(__file__))))

from planpack import schedule  # noqa: E402
from planpack.antennas import clear_cache  # noqa: E402
from planpack.compile import compile_plan  # noqa: E402
from planpack.plan import read_plan  # noqa: E402
from planpack.plan.diagnostics import Collector  # noqa: E402
from planpack.predictions import predict_links  # noqa: E402
from planpack.stationsetup import solve_station_antennas  # noqa: E402

DESIGNS = """\
  d1: {kind: dipole, design_khz: 4500, height_m: 8, matching: feedpoint-coupler}
  d2: {kind: inverted-v, design_khz: 3400, height_m: 13, apex_deg: 120, matching: feedpoint-coupler}
  d3: {kind: dipole, design_khz: 6800, height_m: 7, matching: wide-tuner}
  d4: {kind: folded-terminated, height_m: 12}
  d5: {kind: dipole-reflector, design_khz: 5300, height_m: 8}
"""


def synthetic_plan(n_stations: int, n_channels: int = 40, seed: int = 7) -> str:
    rng = np.random.default_rng(seed)
    lat = rng.uniform(46.5, 52.5, n_stations)
    lon = rng.uniform(6.0, 18.0, n_stations)
    soils = ["wet", "medium-dry", "very-dry"]
    noises = ["city", "residential", "rural", "quiet-rural"]
    lines = ["planpack: 1", "net:", "  id: bench-net", "  title: Benchmark net", "  timezone: Europe/Berlin",
             "  valid: {from: 2027-03-02, to: 2027-03-20}", "  solar: {ssn: 60}", "  links: all", "stations:"]
    for i in range(n_stations):
        lines += [f"  s{i:03d}:", f"    name: Station {i}", f"    address: ST{i:03d}",
                  f"    at: {{lat: {lat[i]:.4f}, lon: {lon[i]:.4f}}}", "    power_w: 100",
                  f"    noise: {noises[i % 4]}", f"    antenna: d{i % 5 + 1}",
                  f"    ground: {{soil: {soils[i % 3]}, system: rods}}"]
    lines.append("channels:")
    for k, f in enumerate(np.linspace(2100, 11900, n_channels)):
        lines.append(f"  - {{id: B{k + 1}, khz: {int(f)}, mode: usb}}")
    lines.append("antennas:")
    return "\n".join(lines) + "\n" + DESIGNS


def run(n: int) -> dict:
    with tempfile.TemporaryDirectory() as tmp:
        path = os.path.join(tmp, "bench.yaml")
        with open(path, "w") as fh:
            fh.write(synthetic_plan(n))
        t0 = time.perf_counter()
        plan = read_plan(path).plan
        t1 = time.perf_counter()
        clear_cache()
        setup = solve_station_antennas(plan, Collector(path))
        t2 = time.perf_counter()
        pred = predict_links(plan, setup)
        t3 = time.perf_counter()
        allowed = np.ones((24, len(plan.channels)), bool)
        schedule.link_choices(pred.good_days, pred.margin_db, allowed)
        schedule.net_schedule(pred.good_days, pred.margin_db, allowed)
        t4 = time.perf_counter()
        full = None
        if n <= 30:  # the full plan.json for 60 stations is 1.7 M cell records: timed only up to 30
            t5 = time.perf_counter()
            compile_plan(plan)
            full = time.perf_counter() - t5
        cells = 2 * len(plan.links) * 24 * len(plan.channels)
        return {"stations": n, "links": len(plan.links), "cells": cells, "read": t1 - t0, "antennas": t2 - t1,
                "predict": t3 - t2, "schedule": t4 - t3, "full": full}


def main() -> None:
    print("one month, one solar level, 40 channels, all-pairs links, both directions predicted")
    print(f"{'stations':>8} {'links':>6} {'cells':>9} {'read s':>7} {'antenna s':>9} {'predict s':>9} "
          f"{'us/cell':>8} {'schedule s':>10} {'full compile s':>14}")
    for n in (10, 30, 60):
        r = run(n)
        full = "-" if r["full"] is None else f"{r['full']:.2f}"
        print(f"{r['stations']:>8} {r['links']:>6} {r['cells']:>9} {r['read']:>7.2f} {r['antennas']:>9.2f} "
              f"{r['predict']:>9.2f} {1e6 * r['predict'] / r['cells']:>8.3f} {r['schedule']:>10.2f} {full:>14}")


if __name__ == "__main__":
    main()
