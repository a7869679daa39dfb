"""Benchmark: planpack request on the 60-station all-pairs plan with 40 channels and the default candidate grid.

The plan is bench_compile's synthetic net (invented stations scattered over
central Europe, 1770 links, 40 channels 2.1-11.9 MHz, one month, one solar
level). The antennas are solved first so that the NEC cache is warm, as the
goal assumes; then the request is computed and the time of each stage is
printed. Goal: the request in under 30 s. Run:

    .venv/bin/python bench/bench_request.py [STATIONS] [--jobs N] [--memory]
"""

from __future__ import annotations

import os
import resource
import sys
import tempfile
import time
import tracemalloc

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))

from bench_compile import synthetic_plan  # noqa: E402

from planpack.plan import read_plan  # noqa: E402
from planpack.plan.diagnostics import Collector  # noqa: E402
from planpack.requests.engine import plan_requests  # noqa: E402
from planpack.stationsetup import solve_station_antennas  # noqa: E402

GOAL_S = 30.0


def _cpu() -> float:
    """Processor time of this process and its finished children [s]."""
    me, kids = resource.getrusage(resource.RUSAGE_SELF), resource.getrusage(resource.RUSAGE_CHILDREN)
    return me.ru_utime + me.ru_stime + kids.ru_utime + kids.ru_stime


def main() -> None:
    args = sys.argv[1:]
    jobs = int(args[args.index("--jobs") + 1]) if "--jobs" in args else None
    n = int(args[0]) if args and args[0].isdigit() else 60
    with tempfile.TemporaryDirectory() as tmp:
        path = os.path.join(tmp, "bench.yaml")
        with open(path, "w") as fh:
            fh.write(synthetic_plan(n))
        plan = read_plan(path).plan
        t0 = time.perf_counter()
        setup = solve_station_antennas(plan, Collector(path))
        cold = time.perf_counter() - t0
        t0 = time.perf_counter()
        setup = solve_station_antennas(plan, Collector(path))  # warm: the in-process NEC cache
        warm = time.perf_counter() - t0
        timings: dict[str, float] = {}
        t0 = time.perf_counter()
        c0 = _cpu()
        out = plan_requests(plan, setup, timings=timings, workers=jobs)
        total = time.perf_counter() - t0
        cpu = _cpu() - c0
    print(f"{n} stations, {len(plan.links)} links, {len(plan.channels)} channels, "
          f"{out['candidates']['count']} candidates every {out['candidates']['step_khz']:g} kHz")
    print(f"antennas: {cold:.2f} s cold (not counted), {warm:.2f} s warm; candidate predictions in "
          f"{'processes by the size of the job' if jobs is None else f'{jobs} process(es)'}")
    for stage, s in timings.items():
        print(f"  {stage:<28s} {s:7.2f} s")
    print(f"  {'request, total':<28s} {total + warm:7.2f} s   (goal: under {GOAL_S:g} s with the NEC cache warm)")
    print(f"  {'processor time, all processes':<28s} {cpu:7.2f} s   (on {os.cpu_count()} cores; load average "
          f"{os.getloadavg()[0]:.1f} when it ended)")
    sv = out["solver"]
    print(f"gap pairs {out['before']['gap_hours']} -> {out['after']['gap_hours']}; pairs without a channel "
          f"{out['before']['unserved_pairs']} -> {out['after']['unserved_pairs']}; {sv['frequencies']} proposals; "
          f"solver {sv['status']} ({len(sv['stages'])} solves, problem {sv['problem']['rows']} rows x "
          f"{sv['problem']['columns']} columns)")
    if "--memory" in args:
        tracemalloc.start()
        plan_requests(plan, setup, workers=1)
        print(f"peak traced memory in one process {tracemalloc.get_traced_memory()[1] / 1e6:.0f} MB")
        tracemalloc.stop()


if __name__ == "__main__":
    main()
