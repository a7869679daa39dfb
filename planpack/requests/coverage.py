"""Which candidate frequency serves which (link, hour) pair.

A gap of the plan (``planpack.scheduling.find_gaps``, exactly as compile
calls it) names (link, hour) pairs. Those with no authorised assigned
channel reaching the target on that link are the pairs a new frequency must
serve: the rows of the cover problem. A candidate serves a row when its
worst-case fraction of good days there reaches the plan's target.

A gap hour also closes for the whole net when one new channel serves every
link at that hour (the net's shared channel): those candidates are found
too, checking links outside the gaps only on the few candidates that serve
every gap link.

Only links with a gap are predicted on the candidates, in blocks, as
float32, and only what the optimiser needs is kept (entries near or above
the target, sparse).
"""

from __future__ import annotations

import os
from concurrent.futures import ProcessPoolExecutor
from dataclasses import dataclass

import numpy as np
from scipy import sparse

from planpack import localtime, schedule
from planpack.plan.models import Plan
from planpack.requests import physics
from planpack.requests.windows import MERGE_SLACK

#: Links handed to the physics at a time, at most (bounds the (links, 24, k) block in memory); the physics'
#: own chunk size when smaller, so that no call is left short.
BLOCK_LINKS = 60
#: Entries are kept down to this far below the target (for the merge hints) [fraction of days].
KEEP_BELOW_TARGET = MERGE_SLACK
#: Predict in parallel processes when the job has at least this many link-hour-candidate cells.
PARALLEL_CELLS = 20_000_000


def allowed_hours(plan: Plan) -> np.ndarray:
    """(24, c) bool: each assigned channel is authorised at that UTC hour (as compile computes it)."""
    net = plan.net
    return localtime.authorised_utc_hours([c.hours for c in plan.channels], net.timezone, net.valid_from, net.valid_to)


@dataclass(frozen=True)
class GapPairs:
    """The plan's gaps as (link, hour) pairs.

    gaps : the scheduler's gaps, as plan.json gets them.
    in_gap : (n, 24) bool, the pairs the gaps name (``gap_hours`` counts them).
    need : (P, 2) int, (link, hour) pairs in a gap that no authorised assigned channel serves.
    hours : UTC hours with a gap, ascending.
    """

    gaps: tuple
    in_gap: np.ndarray
    need: np.ndarray
    hours: tuple[int, ...]

    @property
    def gap_hours(self) -> int:
        return int(self.in_gap.sum())


def gap_pairs(good_days: np.ndarray, allowed: np.ndarray, luf_mhz, owf_mhz, target: float, margin_db=None) -> GapPairs:
    """The (link, hour) pairs in the plan's gaps, and those no assigned channel serves.

    Parameters
    ----------
    good_days : (n, 24, c) fraction of good days of the assigned channels [0-1]
    allowed : (24, c) bool, authorised hours
    luf_mhz, owf_mhz : (n, 24) [MHz]
    target : fraction of days [0-1]
    margin_db : (n, 24, c) [dB], optional (only breaks ties in the scheduler)
    """
    n = good_days.shape[0]
    in_gap = np.zeros((n, 24), bool)
    if n == 0:
        return GapPairs((), in_gap, np.zeros((0, 2), int), ())
    gaps = schedule.find_gaps(good_days, allowed, luf_mhz, owf_mhz, target=target, margin_db=margin_db)
    for g in gaps:
        for h, links in zip(g.utc_hours, g.links_by_hour):
            in_gap[list(links), h] = True
    served = ((good_days >= target) & allowed[None, :, :]).any(axis=2)
    need = np.argwhere(in_gap & ~served)
    return GapPairs(tuple(gaps), in_gap, need, tuple(int(h) for h in np.flatnonzero(in_gap.any(axis=0))))


@dataclass(frozen=True)
class Coverage:
    """What each candidate does for the pairs that need a frequency.

    value : sparse (P, k) float32, fraction of good days, kept where >= target - KEEP_BELOW_TARGET
    best : (P,) float32, the best fraction any candidate gives the pair
    best_index : (P,) int, the candidate that gives it
    closes : {hour: candidate indices serving every link of the net at that gap hour}
    target : the plan's target
    """

    value: sparse.csr_matrix
    best: np.ndarray
    best_index: np.ndarray
    closes: dict
    target: float

    def serves(self) -> sparse.csr_matrix:
        """(P, k) sparse: the entries that reach the target."""
        v = self.value.copy()
        v.data = np.where(v.data >= self.target, v.data, 0).astype(np.float32)
        v.eliminate_zeros()
        return v


def coverage(plan: Plan, setup, pairs: GapPairs, freqs_khz: np.ndarray, workers: int | None = None,
             progress=None) -> Coverage:
    """Predict the candidates for every link with a gap and reduce to the cover problem's data."""
    target = float(plan.net.target_good_days)
    k = freqs_khz.size
    gap_links = sorted({int(l) for l in np.flatnonzero(pairs.in_gap.any(axis=1))})
    hours = list(pairs.hours)
    size = max(1, min(BLOCK_LINKS, physics.links_per_call(k)))
    blocks = [gap_links[a:a + size] for a in range(0, len(gap_links), size)]
    need_by_link: dict[int, list[tuple[int, int]]] = {}
    for row, (l, h) in enumerate(pairs.need):
        need_by_link.setdefault(int(l), []).append((row, int(h)))
    jobs = [(b, [need_by_link.get(l, []) for l in b]) for b in blocks]
    cells = len(gap_links) * 24 * k
    n_workers = _workers(workers, len(blocks), cells)
    results = _run(plan, setup, freqs_khz, hours, target, jobs, n_workers, progress)

    p = len(pairs.need)
    pieces = []
    best = np.zeros(p, np.float32)
    best_index = np.zeros(p, np.int64)
    closes_all = np.ones((len(hours), k), bool)
    for first_row, block, r_best, r_arg, ok in results:  # blocks hold consecutive rows, in order
        pieces.append(block)
        best[first_row:first_row + block.shape[0]] = r_best
        best_index[first_row:first_row + block.shape[0]] = r_arg
        closes_all &= ok
    value = sparse.vstack(pieces, format="csr", dtype=np.float32) if pieces else sparse.csr_matrix((0, k), dtype=np.float32)
    value.resize((p, k))
    # links outside the gaps must also be served for a channel to be the whole net's
    evaluated = set(gap_links)
    others = [i for i in range(len(plan.links)) if i not in evaluated]
    maybe = np.flatnonzero(closes_all.any(axis=0))
    if others and maybe.size:
        g = physics.candidate_good_days(plan, setup, others, freqs_khz[maybe])
        closes_all[:, maybe] &= (g[:, hours, :] >= target).all(axis=0)
    closes = {h: np.flatnonzero(closes_all[i]) for i, h in enumerate(hours) if closes_all[i].any()}
    return Coverage(value, best, best_index, closes, target)


def _workers(asked: int | None, blocks: int, cells: int) -> int:
    if asked is not None:
        return max(1, min(int(asked), blocks))
    if cells < PARALLEL_CELLS or blocks < 2:
        return 1
    return max(1, min(os.cpu_count() or 1, blocks))


_STATE: dict = {}


def _init(plan, setup, freqs_khz, hours, target) -> None:
    _STATE.update(plan=plan, setup=setup, freqs=freqs_khz, hours=hours, target=target)


def _block(job):
    links, needs = job
    s = _STATE
    g = physics.candidate_good_days(s["plan"], s["setup"], links, s["freqs"])
    return _reduce(g, needs, s["hours"], s["target"])


def _run(plan, setup, freqs_khz, hours, target, jobs, workers, progress):
    if workers <= 1:
        _init(plan, setup, freqs_khz, hours, target)
        out = []
        for i, job in enumerate(jobs, 1):
            out.append(_block(job))
            if progress:
                progress(i, len(jobs))
        _STATE.clear()
        return out
    out = []
    with ProcessPoolExecutor(max_workers=workers, initializer=_init,
                             initargs=(plan, setup, freqs_khz, hours, target)) as pool:
        for i, r in enumerate(pool.map(_block, jobs), 1):
            out.append(r)
            if progress:
                progress(i, len(jobs))
    return out


def _reduce(g: np.ndarray, needs: list, hours: list[int], target: float):
    """One block of links -> (its first row, its rows as sparse entries, best per row and where, net-wide mask)."""
    floor = max(target - KEEP_BELOW_TARGET, 1e-6)
    row_ids = [r for per_link in needs for r, _ in per_link]
    k = g.shape[2]
    if row_ids:
        li = np.array([i for i, per_link in enumerate(needs) for _ in per_link])
        hi = np.array([h for per_link in needs for _, h in per_link])
        sub = g[li, hi, :]                                   # (rows, k), rows consecutive
        block = sparse.csr_matrix(np.where(sub >= floor, sub, 0).astype(np.float32))
        arg = sub.argmax(axis=1)
        best, first = sub[np.arange(sub.shape[0]), arg], row_ids[0]
    else:
        block, arg, best, first = sparse.csr_matrix((0, k), dtype=np.float32), np.zeros(0, int), np.zeros(0), 0
    ok = (g[:, hours, :] >= target).all(axis=0) if hours else np.ones((0, k), bool)
    return first, block, best, arg, ok
