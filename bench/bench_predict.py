"""Benchmark: link predictions for synthetic all-pairs nets of 10, 30 and 60 stations.

Each net is predicted in both directions (60 stations: 1770 links, 3540
directed), one month at one solar level, with 40 channels and the 41-point
band grid, each with its own per-station antenna gain tables, at 48
half-hourly samples reduced to whole hours: what ``predict_month`` does for
a plan. Prints the best of three runs, the time of each stage, and the
traced peak memory. Then times the request-candidate path: 1121 candidate
frequencies at 25 kHz steps over 2-30 MHz for 300 (link, hour) pairs.

Synthetic stations are scattered over central Europe (invented positions;
no real stations). Run on a quiet machine:

    .venv/bin/python bench/bench_predict.py
"""

from __future__ import annotations

import itertools
import time
import tracemalloc

import numpy as np

from planpack import bandgrid
from planpack.ionosphere import ChannelSet, LinkSet, predict_link_hours, predict_month

N_CHANNELS = 40
GOAL_S = 5.0


def synthetic(n_stations, seed=1):
    rng = np.random.default_rng(seed)
    lat = rng.uniform(46.0, 54.0, n_stations)
    lon = rng.uniform(5.0, 20.0, n_stations)
    pairs = np.array(list(itertools.combinations(range(n_stations), 2)))
    pairs = np.concatenate([pairs, pairs[:, ::-1]])          # both directions
    n = len(pairs)
    elev = np.arange(91.0)
    # a smooth NVIS-like pattern, 6 dBi at zenith falling to -10 dBi at the horizon, with a
    # per-station, per-frequency offset so that no two tables are alike
    pattern = -10.0 + 16.0 * np.sin(np.deg2rad(elev))
    chan = (pattern + rng.normal(0.0, 1.5, (n_stations, N_CHANNELS, 1))).astype(np.float32)
    grid = (pattern + rng.normal(0.0, 1.5, (n_stations, bandgrid.GRID_POINTS, 1))).astype(np.float32)
    links = LinkSet(
        tx_lat_deg=lat[pairs[:, 0]], tx_lon_deg=lon[pairs[:, 0]],
        rx_lat_deg=lat[pairs[:, 1]], rx_lon_deg=lon[pairs[:, 1]],
        tx_power_w=np.full(n, 50.0), tx_gain_dbi=chan, rx_gain_dbi=chan,
        tx_station=pairs[:, 0], rx_station=pairs[:, 1],
        tx_grid_gain_dbi=grid, rx_grid_gain_dbi=grid,
        vertical=rng.random(n) < 0.3,
        ground_eps_r=np.full(n, 15.0), ground_sigma_s_m=np.full(n, 0.001),
        noise_c_db=np.full(n, 67.2), noise_d=np.full(n, 27.7), noise_margin_db=np.zeros(n))
    channels = ChannelSet(freq_mhz=np.geomspace(2.0, 16.0, N_CHANNELS),
                          required_snr_db=np.full(N_CHANNELS, 6.0),
                          bandwidth_hz=np.full(N_CHANNELS, 3000.0))
    return links, channels


def main():
    # warm up: imports and PyIRI's coefficient files
    links, channels = synthetic(3)
    predict_month(links, channels, 2025, 1, 20.0)
    g = bandgrid.GRID_POINTS
    print(f"one month, one solar level, {N_CHANNELS} channels + {g} grid points, 48 samples a day "
          "reduced to whole hours; best of 3 runs; peak = traced numpy/python allocations")
    print(f"{'stations':>8} {'directed':>8} {'cells':>10} {'seconds':>8} {'us/cell':>8} {'peak MB':>8}")
    for n_st in (10, 30, 60):
        links, channels = synthetic(n_st)
        best, stages = np.inf, None
        for _ in range(3):
            t = {}
            t0 = time.perf_counter()
            predict_month(links, channels, 2025, 1, 20.0, timings=t)
            dt = time.perf_counter() - t0
            if dt < best:
                best, stages = dt, t
        # memory in a separate run: tracemalloc slows numpy several-fold
        tracemalloc.start()
        predict_month(links, channels, 2025, 1, 20.0)
        peak = tracemalloc.get_traced_memory()[1] / 1e6
        tracemalloc.stop()
        cells = links.size * 48 * (N_CHANNELS + g)
        print(f"{n_st:>8} {links.size:>8} {cells:>10} {best:>8.2f} {best / cells * 1e6:>8.3f} {peak:>8.0f}")
    print(f"stages of the 60-station run [s]: " + ", ".join(f"{k} {v:.2f}" for k, v in stages.items()))
    print(f"goal: under {GOAL_S:g} s for the 60-station net -> {'met' if best < GOAL_S else 'NOT met'}")

    # request candidates: every 25 kHz from 2 to 30 MHz, 1121 frequencies
    cand = np.arange(2.0, 30.0 + 1e-9, 0.025)
    cs = ChannelSet(cand, np.full(cand.size, 6.0), np.full(cand.size, 3000.0))
    rng = np.random.default_rng(2)
    pairs = 300
    li = rng.integers(0, links.size, pairs)
    hr = rng.integers(0, 24, pairs)
    t0 = time.perf_counter()
    predict_link_hours(links, cs, 2025, 1, 20.0, li, hr)
    dt = time.perf_counter() - t0
    print(f"request candidates: {cand.size} frequencies x {pairs} (link, hour) pairs in {dt:.2f} s "
          f"({dt / (cand.size * pairs * 3) * 1e6:.3f} us per frequency-sample)")


if __name__ == "__main__":
    main()
