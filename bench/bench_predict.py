"""Benchmark: link predictions for synthetic all-pairs nets of 10, 30 and 60 stations.

Prints the time to predict one month at one solar level with 40 channels and
the cost per link·hour·channel cell. Synthetic stations are scattered over
central Europe (invented positions; no real stations). Run:

    /work/venv/bin/python bench/bench_predict.py
"""

from __future__ import annotations

import itertools
import time
import tracemalloc

import numpy as np

from planpack.ionosphere import ChannelSet, LinkSet, predict_month

N_CHANNELS = 40


def synthetic(n_stations, seed=1):
    rng = np.random.default_rng(seed)
    lat = rng.uniform(46.0, 54.0, n_stations)
    lon = rng.uniform(5.0, 20.0, n_stations)
    pairs = np.array(list(itertools.combinations(range(n_stations), 2)))
    n = len(pairs)
    elev = np.arange(91.0)
    # a smooth NVIS-like pattern: 6 dBi at zenith falling to -10 dBi at the horizon
    pattern = -10.0 + 16.0 * np.sin(np.deg2rad(elev))
    gain = np.broadcast_to(pattern, (n, N_CHANNELS, 91)).astype(np.float32)
    links = LinkSet(
        tx_lat_deg=lat[pairs[:, 0]], tx_lon_deg=lon[pairs[:, 0]],
        rx_lat_deg=lat[pairs[:, 1]], rx_lon_deg=lon[pairs[:, 1]],
        tx_power_w=np.full(n, 50.0), tx_gain_dbi=gain, rx_gain_dbi=gain,
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
    print("one month, one solar level, best of 3 runs; peak = traced numpy/python allocations")
    print(f"{'stations':>8} {'links':>6} {'cells':>10} {'seconds':>8} {'us/cell':>8} {'peak MB':>8}")
    for n_st in (10, 30, 60):
        links, channels = synthetic(n_st)
        times = []
        for _ in range(3):
            t0 = time.perf_counter()
            predict_month(links, channels, 2025, 1, 20.0)
            times.append(time.perf_counter() - t0)
        dt = min(times)
        # memory in a separate run: tracemalloc slows numpy several-fold
        tracemalloc.start()
        predict_month(links, channels, 2025, 1, 20.0)
        peak = tracemalloc.get_traced_memory()[1] / 1e6
        tracemalloc.stop()
        cells = links.size * 24 * N_CHANNELS
        print(f"{n_st:>8} {links.size:>6} {cells:>10} {dt:>8.2f} {dt / cells * 1e6:>8.3f} {peak:>8.0f}")


if __name__ == "__main__":
    main()
