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

import numpy as np
import scipy
from scipy import sparse
from scipy.optimize import Bounds, LinearConstraint, milp

#: Time limit of each solve [s]; a solve that stops there is reported as not proven optimal.
TIME_LIMIT_S = 60.0
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


def _solve(name: str, c, a_rows: list, lb: list, ub: list, integrality, n_vars: int, time_limit: float,
           question: bool = False):
    """One milp call; returns (x or None, Stage).

    ``question``: a yes/no solve (a bisection step), for which "infeasible" is a proven answer too.
    """
    a = sparse.vstack(a_rows, format="csr") if a_rows else None
    cons = [LinearConstraint(a, np.concatenate(lb), np.concatenate(ub))] if a is not None else []
    res = milp(c=np.asarray(c, float), integrality=integrality, bounds=Bounds(0, 1), constraints=cons,
               options={"time_limit": float(time_limit), "mip_rel_gap": 0.0, "disp": False})
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


def _bonus_rows(bonus, k: int):
    """Constraint rows z_j - sum_{f in B_j} x_f <= 0 over variables [x (k), z (J)]."""
    j = len(bonus)
    m = sparse.lil_matrix((j, k + j))
    for i, (_, cols) in enumerate(bonus):
        m[i, np.asarray(cols, int)] = -1.0
        m[i, k + i] = 1.0
    return m.tocsr()


def fewest(problem: Problem, time_limit: float = TIME_LIMIT_S) -> Solution:
    """The fewest columns serving every row (rows nothing serves must be left out by the caller)."""
    q = quantised(problem.value)
    r, k = q.shape
    if r == 0:
        return Solution((), np.zeros(0, bool), None, 0, ())
    if np.any(np.diff(q.indptr) == 0):
        raise ValueError("fewest: every row must be served by at least one column")
    a = (q > 0).astype(float).tocsr()
    ones_r = np.ones(r)
    stages = []
    # level 1: fewest columns
    x, st = _solve("fewest frequencies", np.ones(k), [a], [ones_r], [np.full(r, np.inf)], np.ones(k), k, time_limit)
    stages.append(st)
    if x is None:
        return Solution((), np.zeros(r, bool), None, 0, tuple(stages))
    chosen = _pick(x, k)
    n_best = chosen.size
    # level 2: most bonus weight with that many
    j = len(problem.bonus)
    bonus_w = np.array([w for w, _ in problem.bonus], float)
    z_best = 0
    if j:
        card = sparse.csr_matrix(np.concatenate([np.ones(k), np.zeros(j)])[None, :])
        a2 = sparse.hstack([a, sparse.csr_matrix((r, j))], format="csr")
        x2, st = _solve("most hours with one channel for the whole net", np.concatenate([np.zeros(k), -bonus_w]),
                        [a2, card, _bonus_rows(problem.bonus, k)], [ones_r, [n_best], np.full(j, -np.inf)],
                        [np.full(r, np.inf), [n_best], np.zeros(j)], np.concatenate([np.ones(k), np.zeros(j)]),
                        k + j, time_limit)
        stages.append(st)
        if x2 is not None:
            chosen = _pick(x2, k)
        z_best = _bonus_weight(problem.bonus, chosen)

    def feasible(tau: int):
        aq = (q >= tau).astype(float).tocsr()
        if np.any(np.diff(aq.indptr) == 0):
            return None, None
        if not j:
            return _solve(f"worst fraction >= {tau / RESOLUTION:.3f}", np.ones(k), [aq, sparse.csr_matrix(np.ones((1, k)))],
                          [ones_r, [n_best]], [np.full(r, np.inf), [n_best]], np.ones(k), k, time_limit, True)
        card = sparse.csr_matrix(np.concatenate([np.ones(k), np.zeros(j)])[None, :])
        wrow = sparse.csr_matrix(np.concatenate([np.zeros(k), bonus_w])[None, :])
        return _solve(f"worst fraction >= {tau / RESOLUTION:.3f}", np.zeros(k + j),
                      [sparse.hstack([aq, sparse.csr_matrix((r, j))], format="csr"), card, wrow,
                       _bonus_rows(problem.bonus, k)],
                      [ones_r, [n_best], [z_best], np.full(j, -np.inf)],
                      [np.full(r, np.inf), [n_best], [np.inf], np.zeros(j)],
                      np.concatenate([np.ones(k), np.zeros(j)]), k + j, time_limit, True)

    chosen, tie = _bisect(q, chosen, feasible, True)
    stages += tie
    return Solution(tuple(int(c) for c in chosen), np.ones(r, bool), _worst_value(q, chosen), _bonus_weight(problem.bonus, chosen),
                    tuple(stages))


def most(problem: Problem, n: int, time_limit: float = TIME_LIMIT_S) -> Solution:
    """At most ``n`` columns serving the most row weight; ties by the worst fraction over served rows."""
    q = quantised(problem.value)
    r, k = q.shape
    if r == 0 or n <= 0:
        return Solution((), np.zeros(r, bool), None, 0, ())
    w = np.asarray(problem.weight, float)
    stages = []

    def programme(aq, name, target_weight=None, question=False):
        # variables [x (k), s (r)]: s_r <= sum of x over the columns serving r
        link = sparse.hstack([-aq, sparse.identity(r, format="csr")], format="csr")
        card = sparse.csr_matrix(np.concatenate([np.ones(k), np.zeros(r)])[None, :])
        rows, lb, ub = [link, card], [np.full(r, -np.inf), [0]], [np.zeros(r), [n]]
        c = np.concatenate([np.zeros(k), -w])
        if target_weight is not None:
            rows.append(sparse.csr_matrix(np.concatenate([np.zeros(k), w])[None, :]))
            lb.append([target_weight])
            ub.append([np.inf])
            c = np.zeros(k + r)
        return _solve(name, c, rows, lb, ub, np.concatenate([np.ones(k), np.zeros(r)]), k + r, time_limit, question)

    a = (q > 0).astype(float).tocsr()
    x, st = programme(a, f"most pairs with {n} frequencies")
    stages.append(st)
    if x is None:
        return Solution((), np.zeros(r, bool), None, 0, tuple(stages))
    chosen = _pick(x, k)
    served = np.asarray(a[:, chosen].sum(axis=1)).ravel() > 0
    best_weight = float(w[served].sum())

    def feasible(tau: int):
        return programme((q >= tau).astype(float).tocsr(), f"worst fraction >= {tau / RESOLUTION:.3f}", best_weight - 0.5, True)

    chosen, tie = _bisect(q, chosen, feasible, False)
    stages += tie
    served = np.asarray(a[:, chosen].sum(axis=1)).ravel() > 0 if chosen.size else np.zeros(r, bool)
    return Solution(tuple(int(c) for c in chosen), served, _worst_value(q, chosen), 0, tuple(stages))


def _bisect(q, chosen, feasible, every_row: bool):
    """Raise the worst fraction as far as it goes, by bisection over the distinct fractions.

    ``feasible(tau)`` solves the earlier levels' programme using only entries >= tau and returns
    (x or None, Stage or None). Returns (columns, stages).
    """
    stages = []
    k = q.shape[1]
    lo = _worst(q, chosen)
    if lo is None:
        return chosen, stages
    cand = np.unique(q.data)
    cand = cand[cand > lo]
    if every_row:  # no row can do better than its best entry
        cand = cand[cand <= np.maximum.reduceat(q.data, q.indptr[:-1]).min()]
    while cand.size:
        mid = cand.size // 2
        x, st = feasible(int(cand[mid]))
        if st is not None:
            stages.append(st)
        if x is not None:
            chosen = _pick(x, k)
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


def solver_info() -> dict:
    """Which solver, for the report."""
    return {"name": "HiGHS", "interface": "scipy.optimize.milp", "scipy": scipy.__version__,
            "mip_rel_gap": 0.0, "time_limit_s": TIME_LIMIT_S,
            "fraction_resolution": 1.0 / RESOLUTION}
