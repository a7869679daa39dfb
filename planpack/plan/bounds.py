"""Size bounds on what a plan asks the analysis to do, checked while reading.

A plan of a few kilobytes can ask for a lot: 700 stations with ``links: all``
are 244 650 links. The reader counts the work before anything is computed and
refuses, with a position and the limit, a plan that would take the analysis
past about a minute or a gigabyte on a small machine (2 cores): so ``check``
reports it, and ``build`` never starts it.

- links: at most :data:`MAX_LINKS` (a 60-station all-pairs net is 1770);
- link·channel pairs: at most :data:`MAX_LINK_CHANNELS`, since every link is
  predicted on every channel in every hour (the memory of one prediction);
- link·channel·scenario predictions: at most :data:`MAX_PREDICTIONS`, where
  the scenarios are every month the validity period touches times each end
  of a solar range (the time the predictions take);
- antenna solutions: at most :data:`MAX_ANTENNA_SOLUTIONS` NEC-2 solutions,
  one per channel and per point of the band grid (:mod:`planpack.bandgrid`)
  for each antenna over each ground it is used on (a wire antenna's ground is
  its soil; a whip's, its soil and ground system).

The bounds come from measurements of ``planpack check`` (bench/robustness.py
prints them): a 60-station all-pairs net on 40 channels for one month,
70 800 link·channel pairs, takes about 15 s and 430 MB (each further month or
solar level about 8 s more); the 500-station, 200-channel load test (99 800
pairs) about 16 s and 520 MB; an antenna design over one ground takes 1-3 s of
NEC-2 for 40 channels; each frequency over a real soil costs nec2++ about
20-35 ms (its Sommerfeld tables), so 2000 solutions take under a minute on two
cores.
"""

from __future__ import annotations

import datetime as dt

from planpack import bandgrid

MAX_LINKS = 2000
MAX_LINK_CHANNELS = 100_000
MAX_PREDICTIONS = 250_000
MAX_ANTENNA_SOLUTIONS = 2_000


def link_count(links, n_stations: int, has_control: bool) -> int:
    """How many links ``net.links`` names, without listing them."""
    if links == "hub":
        return n_stations - 1 if has_control else 0
    if links == "all":
        return n_stations * (n_stations - 1) // 2
    return len(links)


def months_touched(start: dt.date, end: dt.date) -> int:
    """How many calendar months the period from ``start`` to ``end`` touches."""
    return max((end.year - start.year) * 12 + end.month - start.month + 1, 1)


def problems(data: dict) -> list[tuple[str, str]]:
    """``(key path, message)`` for every bound the validated plan ``data`` passes; empty when within them."""
    net, stations, channels = data["net"], data["stations"], data["channels"]
    n_links = link_count(net["links"], len(stations), any(s["role"] == "control" for s in stations.values()))
    n_ch = len(channels)
    months = months_touched(net["valid"]["from"], net["valid"]["to"])
    levels = max(len(v) if isinstance(v, list) else 1 for v in net["solar"].values())
    scenarios = months * levels
    out = []
    how = ("name fewer links (links: hub, or a list of the pairs that must talk), or split the net into "
           "several plans")
    if n_links > MAX_LINKS:
        out.append(("net.links", f"{n_links} links ({len(stations)} stations, links: {net['links'] if isinstance(net['links'], str) else 'a list'}); "
                                 f"planpack predicts at most {MAX_LINKS} links in a plan: {how}"))
    elif n_links * n_ch > MAX_LINK_CHANNELS:
        out.append(("net.links", f"{n_links} links on {n_ch} channels are {n_links * n_ch} link·channel pairs, each "
                                 f"predicted for every hour; planpack predicts at most {MAX_LINK_CHANNELS} in a plan: "
                                 f"{how}, or assign fewer channels"))
    elif n_links * n_ch * scenarios > MAX_PREDICTIONS:
        out.append(("net.links", f"{n_links} links on {n_ch} channels for {months} month{'s' * (months != 1)} and "
                                 f"{levels} solar level{'s' * (levels != 1)} are {n_links * n_ch * scenarios} "
                                 f"predictions of 24 hours; planpack makes at most {MAX_PREDICTIONS} for a plan: "
                                 f"shorten net.valid, give one solar value instead of a range, {how}, or assign "
                                 "fewer channels"))
    uses = set()
    antennas = data["antennas"]
    for st in stations.values():
        for a in (st["antenna"] if isinstance(st["antenna"], list) else [st["antenna"]]):
            whip = isinstance(antennas.get(a), dict) and antennas[a].get("kind") == "whip"
            uses.add((a, st["ground"]["soil"], st["ground"]["system"] if whip else None))
    used = {a for a, _, _ in uses}
    per_job = n_ch + bandgrid.GRID_POINTS
    solutions = (len(uses) + sum(a not in used for a in antennas)) * per_job
    if solutions > MAX_ANTENNA_SOLUTIONS:
        out.append(("antennas", f"{len(antennas)} antennas over the grounds of the stations that use them, on "
                                f"{n_ch} channels and the {bandgrid.GRID_POINTS}-point band grid, are {solutions} "
                                f"NEC-2 solutions; planpack solves at most "
                                f"{MAX_ANTENNA_SOLUTIONS} for a plan: share antenna designs between stations, "
                                "remove antennas no station uses, or assign fewer channels"))
    return out
