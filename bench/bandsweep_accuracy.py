"""How far the band sweep's figures are from Sommerfeld-Norton at every frequency.

Prints figures; asserts nothing (``tests/antennas/test_bandsweep.py`` holds
the limits).  For every antenna and soil the demo plans use, it solves
Sommerfeld-Norton (NEC GN 2) at 241 log-spaced frequencies over 1.5-30 MHz
and compares the gain less the losses from the set, at 50, 70 and 90
degrees elevation, with what the analysis reads there between its solved
frequencies, two ways:

- **sweep**: the analysis as it is (:mod:`planpack.antennas.bandsweep`);
- **full**: the same analysis with Sommerfeld-Norton at every grid point,
  as before the sweep; its error is the cost of reading between grid points.

Frequencies within two grid steps of one where NEC-2 itself fails (wire
ends near the ground far below resonance) are left out.  About four minutes
on the 2-core development machine.

    python bench/bandsweep_accuracy.py
"""

from __future__ import annotations

import sys
import time
from pathlib import Path
from unittest import mock

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

import numpy as np  # noqa: E402

from planpack.antennas import analysis, bandsweep, pattern, solver  # noqa: E402
from planpack.antennas.solvecache import disabled  # noqa: E402
from planpack.antennas.trust import physical_mask  # noqa: E402
from planpack.plan import read_plan  # noqa: E402
from planpack.stationsetup import design_of, ground_of  # noqa: E402

DENSE_KHZ = np.geomspace(1500.0, 30000.0, 241)
ELEVATIONS = (50, 70, 90)
CEILINGS_KHZ = (12000.0, 30000.0)


def demo_jobs():
    jobs = set()
    for path in sorted(Path(__file__).resolve().parents[1].glob("plans/*.yaml")):
        plan = read_plan(str(path)).plan
        freqs = tuple(c.khz for c in plan.channels)
        for s in plan.stations:
            for a in s.antennas:
                d = design_of(plan.antenna(a))
                if d.kind != "whip":  # a whip is solved over a perfect ground: no sweep
                    jobs.add((d, ground_of(s, d.kind), freqs))
    return sorted(jobs, key=repr)


def errors(a, z, table, ceiling_khz):
    """|read - exact| [dB] at the dense frequencies that count."""
    ok = physical_mask(z)
    near_failure = np.convolve((~ok).astype(float), np.ones(25), "same") > 0  # two grid steps either side
    exact = table - a.chain(np.where(ok, z, np.nan + 0j), DENSE_KHZ).total_db[:, None]
    read = a.figures_at(DENSE_KHZ).system_gain_table_dbi
    use = ok & ~near_failure & (DENSE_KHZ <= ceiling_khz)
    err = np.abs(read[use][:, ELEVATIONS] - exact[use][:, ELEVATIONS])
    keep = np.isfinite(exact[use][:, ELEVATIONS]) & (exact[use][:, ELEVATIONS] > -15.0)
    return err[keep]


def main() -> None:
    jobs = demo_jobs()
    print(f"{len(jobs)} antenna and soil pairs from the demo plans, {len(DENSE_KHZ)} frequencies 1.5-30 MHz")
    every = {"sweep": {c: [] for c in CEILINGS_KHZ}, "full": {c: [] for c in CEILINGS_KHZ}}
    t0 = time.perf_counter()
    with disabled():
        for d, g, freqs in jobs:
            model = analysis.solved_model(d, g, freqs)
            z, gains = solver.solve(model, g.soil, tuple(float(f) for f in DENSE_KHZ), pattern=True)
            table = pattern.summary(gains)["table_dbi"]
            for how in ("sweep", "full"):
                if how == "full":
                    with mock.patch.object(bandsweep, "anchors", lambda e, grid, steps=0: tuple(grid)):
                        a = analysis._analyse_uncached(d, g, freqs)
                else:
                    a = analysis._analyse_uncached(d, g, freqs)
                for c in CEILINGS_KHZ:
                    every[how][c].append(errors(a, z, table, c))
    for c in CEILINGS_KHZ:
        for how in ("sweep", "full"):
            e = np.concatenate(every[how][c])
            print(f"  up to {c / 1000:4.0f} MHz, {how:<5s}: 95th percentile {np.percentile(e, 95):.2f} dB, "
                  f"99th {np.percentile(e, 99):.2f} dB, worst {e.max():.2f} dB ({e.size} figures)")
    print(f"({time.perf_counter() - t0:.0f} s)")


if __name__ == "__main__":
    main()
