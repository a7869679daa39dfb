"""Windows, not just points: where each proposal may sit, its preferred centre, and merges.

A proposal's window is the contiguous run of candidates around it (no
excluded frequency inside) in which every frequency serves all the pairs
the proposal serves and keeps every hour it gives the whole net a shared
channel. That range is what a spectrum manager can assign from.

The preferred centre is the frequency in the window whose worst fraction of
good days over the pairs the proposal is best for is highest (then the
higher mean, then the nearer to the window's middle): moving every proposal
to its centre never lowers the plan's worst hour.

Two proposals next to each other merge when one frequency would serve all
their pairs on a slightly lower fraction of days than the target: that
wider, relaxed window is reported, and the planner decides.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy import sparse

from planpack.requests.candidates import CandidateGrid

#: Merges are reported when one frequency would reach at least the target less this [fraction of days]
#: (a reporting choice: the trade a planner may weigh against one channel fewer).
MERGE_SLACK = 0.10


@dataclass(frozen=True)
class Window:
    index: int  # candidate index of the preferred centre
    low: int  # candidate index of the window's lowest frequency
    high: int  # and highest
    rows: np.ndarray  # rows (pairs) the centre serves
    net_hours: tuple[int, ...]  # gap hours at which the centre serves every link


def _ok_columns(serves: sparse.csc_matrix, rows: np.ndarray, cols: np.ndarray, closes: dict, hours) -> np.ndarray:
    """For each column in cols: serves every row in rows and closes every hour in hours."""
    if rows.size:
        sub = serves[:, cols][rows, :].tocsc()
        ok = np.diff(sub.indptr) == rows.size
    else:
        ok = np.ones(cols.size, bool)
    for h in hours:
        ok &= np.isin(cols, closes[h])
    return ok


def windows(serves: sparse.csr_matrix, grid: CandidateGrid, chosen: list[int], closes: dict) -> list[Window]:
    """The window and preferred centre of each chosen candidate (indices into the grid).

    serves : (P, k) sparse fraction of good days [0-1], stored only where it reaches the target.
    closes : {gap hour: candidate indices that serve every link of the net then}.
    """
    csc = serves.tocsc()
    chosen = [int(j) for j in chosen]
    cols_all = np.arange(grid.size)
    dense_chosen = csc[:, chosen].toarray() if chosen else np.zeros((serves.shape[0], 0))
    best_of = dense_chosen.max(axis=1) if chosen else np.zeros(serves.shape[0])
    out = []
    for i, j in enumerate(chosen):
        rows = np.flatnonzero(dense_chosen[:, i] > 0)
        hours = tuple(h for h, cols in sorted(closes.items()) if j in set(cols.tolist()))
        run = cols_all[grid.run == grid.run[j]]
        ok = _ok_columns(csc, rows, run, closes, hours)
        pos = int(np.flatnonzero(run == j)[0])
        lo = hi = pos
        while lo > 0 and ok[lo - 1]:
            lo -= 1
        while hi < run.size - 1 and ok[hi + 1]:
            hi += 1
        inside = run[lo:hi + 1]
        mine = rows[dense_chosen[rows, i] >= best_of[rows]]  # pairs this proposal is (one of) the best for
        sub = csc[:, inside][rows, :].toarray() if rows.size else np.zeros((0, inside.size))
        worst = sub[np.isin(rows, mine)].min(axis=0) if mine.size else np.zeros(inside.size)
        mean = sub.mean(axis=0) if rows.size else np.zeros(inside.size)
        mid = 0.5 * (grid.freqs_khz[inside[0]] + grid.freqs_khz[inside[-1]])
        # fractions compared in thousandths, as the optimiser does: noise never pushes the centre to an edge
        key = np.lexsort((np.abs(grid.freqs_khz[inside] - mid), -np.floor(mean * 1000 + 1e-6),
                          -np.floor(worst * 1000 + 1e-6)))
        centre = int(inside[key[0]])
        centre_rows = np.flatnonzero(csc[:, centre].toarray().ravel() > 0)
        centre_hours = tuple(h for h, cols in sorted(closes.items()) if centre in set(cols.tolist()))
        out.append(Window(centre, int(inside[0]), int(inside[-1]), centre_rows, centre_hours))
    return out


@dataclass(frozen=True)
class Merge:
    pair: tuple[int, int]  # positions of the two proposals in the list given
    index: int  # best single candidate
    worst: float  # its worst fraction over both proposals' pairs
    low: int  # the relaxed window
    high: int


def column_minimum(csc: sparse.csc_matrix, rows: np.ndarray) -> np.ndarray:
    """(k,) the least stored value over the given rows in each column; 0 where a row has no entry."""
    sub = csc[rows, :].tocsc()
    counts = np.diff(sub.indptr)
    out = np.zeros(sub.shape[1], np.float64)
    some = counts > 0
    if some.any():
        out[some] = np.minimum.reduceat(sub.data, sub.indptr[:-1][some])
    out[counts < rows.size] = 0.0
    return out


def merges(value: sparse.csr_matrix, grid: CandidateGrid, wins: list[Window], target: float) -> list[Merge]:
    """Neighbouring proposals that one frequency would serve within MERGE_SLACK of the target.

    value : (P, k) sparse fraction of good days, stored down to target - MERGE_SLACK or lower.
    """
    order = sorted(range(len(wins)), key=lambda i: grid.freqs_khz[wins[i].index])
    floor = target - MERGE_SLACK
    csc = value.tocsc()
    out = []
    for a, b in zip(order, order[1:]):
        rows = np.union1d(wins[a].rows, wins[b].rows)
        if not rows.size:
            continue
        m = column_minimum(csc, rows)
        if m.max() < floor:
            continue
        best = int(np.argmax(m))
        i0 = i1 = best
        while i0 > 0 and m[i0 - 1] >= floor and grid.run[i0 - 1] == grid.run[best]:
            i0 -= 1
        while i1 < grid.size - 1 and m[i1 + 1] >= floor and grid.run[i1 + 1] == grid.run[best]:
            i1 += 1
        out.append(Merge((a, b), best, float(m[best]), i0, i1))
    return out
