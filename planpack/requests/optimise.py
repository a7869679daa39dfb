"""The integer programmes that choose the frequencies, solved with HiGHS through scipy.optimize.milp.

The problem is a weighted set cover over candidate frequencies (columns)
and groups of (link, hour) pairs (rows): a row is served when at least one
chosen column serves it. Each row carries the fraction of good days every
column gives it (only where the column reaches the target).

Two modes, each lexicographic, every level an exact integer programme:

``fewest``
    1. the fewest columns that serve every row;
    2. with that many, the most weight of *bonus groups* (a group counts when
       one chosen column is in it: the hours where one new channel serves the
       whole net);
    3. with both fixed, the best worst fraction of good days over the rows.

``most`` (at most N columns)
    1. the most row weight served by N columns;
    2. with that weight fixed, the best worst fraction over the served rows.

The worst-fraction level is found by bisection over the distinct fractions
(compared at 0.001, the resolution plan.json gives them): each step asks
HiGHS whether the earlier levels' optimum can still be reached using only
entries at or above the threshold. So the tie-break is exact, not a weight.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import time

import numpy as np
import scipy
from scipy import sparse
from scipy.optimize import Bounds, LinearConstraint, milp

#: Time for all the solves of one request [s]; a solve stopped by it is reported as not proven optimal.
TIME_LIMIT_S = 60.0
#: Below this many seconds left, no further solve is started.
_MIN_SOLVE_S = 0.5
#: Fractions of good days are compared in thousandths (plan.json's resolution).
RESOLUTION = 1000

_STATUS = {0: "optimal", 1: "stopped at the time or iteration limit", 2: "infeasible", 3: "unbounded", 4: "solver error"}


@dataclass(frozen=True)
class Problem:
    """A cover problem.

    value : sparse (R, K)
        Fraction of good days [0-1] where column k serves row r (only those entries are stored).
    weight : (R,) int
        How many (link, hour) pairs each row stands for.
    bonus : list of (weight, column indices)
        Groups of columns; the fewest mode's second level maximises the weight of groups that
        hold a chosen column.
    """

    value: sparse.csr_matrix
    weight: np.ndarray
    bonus: tuple[tuple[int, np.ndarray], ...] = ()

    @property
    def shape(self) -> tuple[int, int]:
        return self.value.shape


@dataclass(frozen=True)
class Stage:
    """One solve: what it optimised, HiGHS's status and figures."""

    name: str
    status: str
    optimal: bool
    objective: float | None
    mip_gap: float | None
    nodes: int | None
    rows: int
    columns: int

    def to_dict(self) -> dict:
        return {"name": self.name, "status": self.status, "optimal": self.optimal,
                "objective": None if self.objective is None else round(float(self.objective), 6),
                "mip_gap": None if self.mip_gap is None else round(float(self.mip_gap), 6),
                "nodes": self.nodes, "rows": self.rows, "columns": self.columns}


@dataclass(frozen=True)
class Solution:
    """The chosen columns (ascending) and how they were proven."""

    chosen: tuple[int, ...]
    served: np.ndarray  # (R,) bool
    worst: float | None  # worst fraction over served rows, at RESOLUTION
    bonus_weight: int
    stages: tuple[Stage, ...] = field(default_factory=tuple)

    @property
    def optimal(self) -> bool:
        return all(s.optimal for s in self.stages)


def quantised(value: sparse.csr_matrix) -> sparse.csr_matrix:
    q = value.copy().tocsr()
    q.data = np.floor(np.asarray(q.data, float) * RESOLUTION + 1e-6).astype(np.int32)
    q.eliminate_zeros()  # a zero fraction never serves (the target is above 0)
    return q


class Deadline:
    """The time left for the solves of one optimisation [s]."""

    def __init__(self, seconds: float) -> None:
        self.end = time.monotonic() + float(seconds)

    def left(self) -> float:
        return self.end - time.monotonic()


def _solve(name: str, c, a_rows: list, lb: list, ub: list, integrality, n_vars: int, deadline: Deadline,
           question: bool = False):
    """One milp call; returns (x or None, Stage).

    ``question``: a yes/no solve (a bisection step), for which "infeasible" is a proven answer too.
    """
    a = sparse.vstack(a_rows, format="csr") if a_rows else None
    if deadline.left() < _MIN_SOLVE_S:
        return None, Stage(name=name, status="not run: the time limit was spent", optimal=False, objective=None,
                           mip_gap=None, nodes=None, rows=0 if a is None else a.shape[0], columns=n_vars)
    cons = [LinearConstraint(a, np.concatenate(lb), np.concatenate(ub))] if a is not None else []
    res = milp(c=np.asarray(c, float), integrality=integrality, bounds=Bounds(0, 1), constraints=cons,
               options={"time_limit": deadline.left(), "mip_rel_gap": 0.0, "disp": False})
    status = _STATUS.get(res.status, f"status {res.status}")
    stage = Stage(name=name, status=status, optimal=res.status == 0 or (question and res.status == 2), objective=None if res.x is None else float(res.fun),
                  mip_gap=getattr(res, "mip_gap", None), nodes=getattr(res, "mip_node_count", None),
                  rows=0 if a is None else a.shape[0], columns=n_vars)
    x = None if res.x is None else np.asarray(res.x)
    return x, stage


def _pick(x: np.ndarray, k: int) -> np.ndarray:
    return np.flatnonzero(np.asarray(x[:k]) > 0.5)


def _worst(q: sparse.csr_matrix, chosen: np.ndarray) -> int | None:
    """Worst, over the rows the columns serve, of the best chosen entry [thousandths]; None if none served."""
    if not len(chosen):
        return None
    best = np.asarray(q[:, np.asarray(chosen, int)].max(axis=1).todense()).ravel()
    return int(best[best > 0].min()) if (best > 0).any() else None


def _bits(m: np.ndarray) -> np.ndarray:
    """Rows of a bool matrix as packed 64-bit words, for fast subset tests."""
    packed = np.packbits(m, axis=1)
    pad = (-packed.shape[1]) % 8
    if pad:
        packed = np.pad(packed, ((0, 0), (0, pad)))
    return np.ascontiguousarray(packed).view(np.uint64)


def _reduce(sets: np.ndarray, keep_supersets: bool) -> np.ndarray:
    """Indices (ascending) of the rows of a bool matrix that survive subset dominance.

    keep_supersets=False keeps the minimal sets (a row containing another is implied by it: covering
    the smaller set covers the larger); True keeps the maximal sets (a column inside another column
    is never better). Identical rows keep their first.
    """
    if sets.shape[0] == 0:
        return np.zeros(0, int)
    words = _bits(sets)
    _, first = np.unique(words, axis=0, return_index=True)
    size = sets[first].sum(axis=1)
    order = first[np.lexsort((first, -size if keep_supersets else size))]
    kept = np.empty((order.size, words.shape[1]), np.uint64)
    n = 0
    out = []
    for i in order:
        w = words[i]
        if n:
            k = kept[:n]
            inside = np.all((k & w) == w, axis=1) if keep_supersets else np.all((k & w) == k, axis=1)
            if inside.any():
                continue
        kept[n] = w
        n += 1
        out.append(int(i))
    return np.sort(np.asarray(out, int))


def _membership(bonus, k: int) -> np.ndarray:
    member = np.zeros((len(bonus), k), bool)
    for g, (_, cols) in enumerate(bonus):
        member[g, np.asarray(cols, int)] = True
    return member


def _cover(a, name: str, deadline: Deadline, *, bonus=(), objective: str = "count",
           n_max: int | None = None, bonus_min: float | None = None, question: bool = False):
    """A cover programme over the 0/1 matrix ``a`` (rows x k), reduced by dominance first.

    objective "count": fewest columns; "bonus": most bonus weight. Constraints: every row covered;
    with n_max at most that many columns; with bonus_min at least that bonus weight.
    Returns (chosen columns of ``a`` or None, Stage).
    """
    dense = np.asarray(a.toarray() if sparse.issparse(a) else a) > 0
    use_bonus = bool(bonus) and (objective == "bonus" or bonus_min is not None)
    rows = _reduce(dense, keep_supersets=False)
    member = _membership(bonus, dense.shape[1]) if use_bonus else np.zeros((0, dense.shape[1]), bool)
    cols = _reduce(np.vstack([dense[rows], member]).T, keep_supersets=True)
    sub = sparse.csr_matrix(dense[np.ix_(rows, cols)].astype(float))
    r, k = sub.shape
    groups = [(w, np.flatnonzero(member[g, cols])) for g, (w, _) in enumerate(bonus)] if use_bonus else []
    j = len(groups)
    weights = np.array([w for w, _ in groups], float)
    width = k + j
    blocks, lb, ub = [sparse.hstack([sub, sparse.csr_matrix((r, j))], format="csr")], [np.ones(r)], [np.full(r, np.inf)]
    if n_max is not None:
        blocks.append(sparse.csr_matrix(np.concatenate([np.ones(k), np.zeros(j)])[None, :]))
        lb.append([0])
        ub.append([n_max])
    if j:
        link = sparse.lil_matrix((j, width))
        for g, (_, gc) in enumerate(groups):
            link[g, gc] = -1.0
            link[g, k + g] = 1.0
        blocks.append(link.tocsr())
        lb.append(np.full(j, -np.inf))
        ub.append(np.zeros(j))
    if bonus_min is not None and j:
        blocks.append(sparse.csr_matrix(np.concatenate([np.zeros(k), weights])[None, :]))
        lb.append([bonus_min])
        ub.append([np.inf])
    c = np.concatenate([np.zeros(k), -weights]) if objective == "bonus" else np.concatenate([np.ones(k), np.zeros(j)])
    x, st = _solve(name, c, blocks, lb, ub, np.concatenate([np.ones(k), np.zeros(j)]), width, deadline, question)
    return (None if x is None else cols[_pick(x, k)]), st


def fewest(problem: Problem, time_limit: float = TIME_LIMIT_S) -> Solution:
    """The fewest columns serving every row (rows nothing serves must be left out by the caller).

    ``time_limit`` [s] bounds all the solves together.
    """
    deadline = Deadline(time_limit)
    q = quantised(problem.value)
    r, k = q.shape
    if r == 0:
        return Solution((), np.zeros(0, bool), None, 0, ())
    if np.any(np.diff(q.indptr) == 0):
        raise ValueError("fewest: every row must be served by at least one column")
    stages = []
    chosen, st = _cover(q > 0, "fewest frequencies", deadline)
    stages.append(st)
    if chosen is None:
        return Solution((), np.zeros(r, bool), None, 0, tuple(stages))
    n_best = chosen.size
    z_best = None
    if problem.bonus:
        better, st = _cover(q > 0, "most hours with one channel for the whole net", deadline, bonus=problem.bonus,
                            objective="bonus", n_max=n_best)
        stages.append(st)
        if better is not None:
            chosen = better
        z_best = _bonus_weight(problem.bonus, chosen)

    def feasible(tau: int):
        aq = q >= tau
        if np.any(np.diff(aq.tocsr().indptr) == 0):
            return None, None
        return _cover(aq, f"worst fraction >= {tau / RESOLUTION:.3f}", deadline, bonus=problem.bonus,
                      n_max=n_best, bonus_min=z_best, question=True)

    chosen, tie = _bisect(q, chosen, feasible, True)
    stages += tie
    return Solution(tuple(int(c) for c in sorted(chosen)), np.ones(r, bool), _worst_value(q, chosen),
                    _bonus_weight(problem.bonus, chosen), tuple(stages))


def _coverage(a, w: np.ndarray, n: int, name: str, deadline: Deadline, weight_min: float | None = None,
              question: bool = False):
    """At most n columns of the 0/1 matrix ``a`` covering the most row weight (or at least weight_min)."""
    dense = np.asarray(a.toarray() if sparse.issparse(a) else a) > 0
    cols = _reduce(dense.T, keep_supersets=True)
    sub = dense[:, cols]
    keep = sub.any(axis=1)  # rows no column serves cannot count
    words = _bits(sub[keep])
    uniq, inverse = np.unique(words, axis=0, return_inverse=True)
    wt = np.bincount(inverse.ravel(), weights=w[keep], minlength=uniq.shape[0])
    first = np.zeros(uniq.shape[0], int)
    first[inverse.ravel()[::-1]] = np.arange(inverse.size)[::-1]
    m = sparse.csr_matrix(sub[keep][first].astype(float))
    r, k = m.shape
    # variables [x (k), s (r)]: s_r <= sum of x over the columns serving row r
    blocks = [sparse.hstack([-m, sparse.identity(r, format="csr")], format="csr"),
              sparse.csr_matrix(np.concatenate([np.ones(k), np.zeros(r)])[None, :])]
    lb, ub = [np.full(r, -np.inf), [0]], [np.zeros(r), [n]]
    c = np.concatenate([np.zeros(k), -wt])
    if weight_min is not None:
        blocks.append(sparse.csr_matrix(np.concatenate([np.zeros(k), wt])[None, :]))
        lb.append([weight_min])
        ub.append([np.inf])
        c = np.concatenate([np.ones(k), np.zeros(r)])
    x, st = _solve(name, c, blocks, lb, ub, np.concatenate([np.ones(k), np.zeros(r)]), k + r, deadline, question)
    return (None if x is None else cols[_pick(x, k)]), st


def most(problem: Problem, n: int, time_limit: float = TIME_LIMIT_S) -> Solution:
    """At most ``n`` columns serving the most row weight; ties by the worst fraction over served rows.

    ``time_limit`` [s] bounds all the solves together.
    """
    deadline = Deadline(time_limit)
    q = quantised(problem.value)
    r, k = q.shape
    if r == 0 or n <= 0:
        return Solution((), np.zeros(r, bool), None, 0, ())
    w = np.asarray(problem.weight, float)
    stages = []
    chosen, st = _coverage(q > 0, w, n, f"most pairs with {n} frequencies", deadline)
    stages.append(st)
    if chosen is None:
        return Solution((), np.zeros(r, bool), None, 0, tuple(stages))
    a = (q > 0).tocsc()
    served = np.asarray(a[:, chosen].sum(axis=1)).ravel() > 0
    best_weight = float(w[served].sum())

    def feasible(tau: int):
        return _coverage(q >= tau, w, n, f"worst fraction >= {tau / RESOLUTION:.3f}", deadline,
                         weight_min=best_weight - 0.5, question=True)

    chosen, tie = _bisect(q, chosen, feasible, False)
    stages += tie
    served = np.asarray(a[:, chosen].sum(axis=1)).ravel() > 0 if len(chosen) else np.zeros(r, bool)
    return Solution(tuple(int(c) for c in sorted(chosen)), served, _worst_value(q, chosen), 0, tuple(stages))


def _bisect(q, chosen, feasible, every_row: bool):
    """Raise the worst fraction as far as it goes, by bisection over the distinct fractions.

    ``feasible(tau)`` solves the earlier levels' programme using only entries >= tau and returns
    (columns or None, Stage or None). Returns (columns, stages).
    """
    stages = []
    lo = _worst(q, chosen)
    if lo is None:
        return chosen, stages
    cand = np.unique(q.data)
    cand = cand[cand > lo]
    if every_row:  # no row can do better than its best entry
        cand = cand[cand <= np.maximum.reduceat(q.data, q.indptr[:-1]).min()]
    while cand.size:
        mid = cand.size // 2
        found, st = feasible(int(cand[mid]))
        if st is not None:
            stages.append(st)
            if st.status.startswith("not run"):
                break
        if found is not None:
            chosen = found
            lo = _worst(q, chosen)
            cand = cand[cand > lo]
        else:
            cand = cand[:mid]
    return chosen, stages


def _worst_value(q, chosen) -> float | None:
    v = _worst(q, chosen)
    return None if v is None else v / RESOLUTION


def _bonus_weight(bonus, chosen) -> int:
    s = set(int(c) for c in chosen)
    return int(sum(w for w, cols in bonus if s.intersection(int(c) for c in cols)))


def solver_info(time_limit: float = TIME_LIMIT_S) -> dict:
    """Which solver, for the report."""
    return {"name": "HiGHS", "interface": "scipy.optimize.milp", "scipy": scipy.__version__,
            "mip_rel_gap": 0.0, "time_limit_s": float(time_limit),
            "fraction_resolution": 1.0 / RESOLUTION}
