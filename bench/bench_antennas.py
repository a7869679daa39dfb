"""Antenna solver time: 60 stations sharing 5 designs across 40 channels.

Prints figures; asserts nothing.  Target (issue 4): under 5 s on the 2-core
development machine, thanks to the cache (5 solves, not 60).

    python bench/bench_antennas.py
"""

from __future__ import annotations

import os
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

import numpy as np  # noqa: E402

from planpack.antennas import (AntennaDesign, GroundSpec, analyse_antenna,  # noqa: E402
                               analyse_antennas, cache_info, clear_cache)

CHANNELS_KHZ = tuple(float(f) for f in np.round(np.linspace(2000.0, 16000.0, 40), 1))
DESIGNS = (
    (AntennaDesign("dipole", 4600.0, 9.0, feed_length_m=20.0,
                   feed_loss_db_per_100m_at_10mhz=4.5), GroundSpec("medium-dry", "rods")),
    (AntennaDesign("inverted-v", 6900.0, 8.0, apex_deg=120.0), GroundSpec("wet", "rods")),
    (AntennaDesign("dipole-reflector", 3300.0, 12.0), GroundSpec("very-dry", "none")),
    (AntennaDesign("folded-terminated", None, 10.0), GroundSpec("medium-dry", "counterpoise")),
    (AntennaDesign("whip", None, 0.5, length_m=3.0), GroundSpec("sea", "radials")),
)
STATIONS = 60


def jobs():
    return [(*DESIGNS[i % len(DESIGNS)], CHANNELS_KHZ) for i in range(STATIONS)]


def run(label: str, fn) -> float:
    t0 = time.perf_counter()
    fn()
    dt = time.perf_counter() - t0
    print(f"{label:<58s} {dt:7.2f} s")
    return dt


def main() -> None:
    print(f"{STATIONS} stations, {len(DESIGNS)} designs, {len(CHANNELS_KHZ)} channels "
          f"({CHANNELS_KHZ[0]:g}-{CHANNELS_KHZ[-1]:g} kHz), {os.cpu_count()} CPUs")
    clear_cache()
    run("cold, one process (analyse_antenna per station)",
        lambda: [analyse_antenna(*j) for j in jobs()])
    print(f"  cache: {cache_info()}")
    clear_cache()
    cold = run("cold, analyse_antennas (processes, one per CPU)", lambda: analyse_antennas(jobs()))
    run("warm (every station a cache hit)", lambda: [analyse_antenna(*j) for j in jobs()])
    for d, g in DESIGNS:
        a = analyse_antenna(d, g, CHANNELS_KHZ)
        print(f"  {d.kind:<18s} {a.solver['segments']:4d} segments, "
              f"{a.solver['trim_solves']:2d} trim solves, "
              f"SWR {a.swr.min():.1f}-{a.swr.max():.0f}")
    print(f"target < 5 s for the cold batch: {'met' if cold < 5.0 else 'NOT met'} ({cold:.2f} s)")
    demo_plans()


def demo_plans() -> None:
    """Solver time for each demo plan, cold, as `planpack build` meets it."""
    from planpack.plan import read_plan
    from planpack.plan.diagnostics import Collector
    from planpack.stationsetup import solve_station_antennas

    for path in sorted(Path(__file__).resolve().parents[1].glob("plans/*.yaml")):
        plan = read_plan(str(path)).plan
        clear_cache()
        t0 = time.perf_counter()
        setup = solve_station_antennas(plan, Collector(str(path)))
        dt = time.perf_counter() - t0
        print(f"demo {path.name:<40s} {len(setup.by_station):3d} station antennas, "
              f"{cache_info()['misses']:2d} solves, {len(plan.channels):2d} channels {dt:7.2f} s")


if __name__ == "__main__":
    main()
