"""The integer programmes against brute force over every subset of candidates.

Small synthetic cover problems (invented numbers, no physics) where the optimum
is known by enumerating all subsets: the solver's answer must equal it, level
by level, in both modes.
"""

from __future__ import annotations

import itertools

import numpy as np
import pytest
from scipy import sparse

from planpack.requests import optimise
from planpack.requests.optimise import RESOLUTION, Problem, fewest, most


def random_problem(seed: int, rows: int = 9, cols: int = 8, density: float = 0.3, bonus: int = 0) -> Problem:
    rng = np.random.default_rng(seed)
    mask = rng.random((rows, cols)) < density
    for r in range(rows):  # every row servable
        if not mask[r].any():
            mask[r, rng.integers(cols)] = True
    vals = np.where(mask, np.round(rng.uniform(0.9, 1.0, (rows, cols)), 3), 0.0)
    groups = tuple((int(rng.integers(1, 5)), np.flatnonzero(rng.random(cols) < 0.25)) for _ in range(bonus))
    return Problem(sparse.csr_matrix(vals), rng.integers(1, 4, rows), groups)


def _q(p: Problem) -> np.ndarray:
    return np.floor(p.value.toarray() * RESOLUTION + 1e-6)


def _best(q, subset):
    return q[:, list(subset)].max(axis=1) if subset else np.zeros(q.shape[0])


def brute_fewest(p: Problem):
    q = _q(p)
    k = q.shape[1]
    for size in range(1, k + 1):
        covers = [s for s in itertools.combinations(range(k), size) if (_best(q, s) > 0).all()]
        if covers:
            def bonus(s):
                return sum(w for w, cols in p.bonus if set(cols) & set(s))
            zb = max(bonus(s) for s in covers)
            worst = max(_best(q, s).min() for s in covers if bonus(s) == zb)
            return size, zb, worst / RESOLUTION
    raise AssertionError("no cover")


def brute_most(p: Problem, n: int):
    q = _q(p)
    k = q.shape[1]
    best_w, best_worst = -1, None
    for size in range(0, min(n, k) + 1):
        for s in itertools.combinations(range(k), size):
            b = _best(q, s)
            w = int(p.weight[b > 0].sum())
            worst = b[b > 0].min() if (b > 0).any() else None
            if w > best_w or (w == best_w and worst is not None and (best_worst is None or worst > best_worst)):
                best_w, best_worst = w, worst
    return best_w, None if best_worst is None else best_worst / RESOLUTION


@pytest.mark.parametrize("seed", range(40))
def test_fewest_equals_brute_force(seed):
    p = random_problem(seed, bonus=3 if seed % 2 else 0)
    sol = fewest(p)
    size, zb, worst = brute_fewest(p)
    assert sol.optimal
    assert len(sol.chosen) == size
    assert sol.bonus_weight == zb
    assert sol.worst == pytest.approx(worst)
    q = _q(p)
    assert (_best(q, sol.chosen) > 0).all()


@pytest.mark.parametrize("seed", range(40))
@pytest.mark.parametrize("n", [1, 2])
def test_most_equals_brute_force(seed, n):
    p = random_problem(seed, rows=10, cols=7, density=0.25)
    sol = most(p, n)
    w, worst = brute_most(p, n)
    q = _q(p)
    b = _best(q, sol.chosen)
    assert sol.optimal
    assert len(sol.chosen) <= n
    assert int(p.weight[b > 0].sum()) == w
    assert sol.worst == pytest.approx(worst)


def test_tie_break_prefers_the_better_fraction():
    # two columns serve the same two rows; the second one better on its worst row
    vals = np.array([[0.95, 0.97], [0.91, 0.94]])
    sol = fewest(Problem(sparse.csr_matrix(vals), np.ones(2, int)))
    assert sol.chosen == (1,) and sol.worst == pytest.approx(0.94)
    assert [s.name for s in sol.stages][0] == "fewest frequencies"


def test_empty_and_unservable_rows():
    assert fewest(Problem(sparse.csr_matrix((0, 3)), np.zeros(0, int))).chosen == ()
    with pytest.raises(ValueError):
        fewest(Problem(sparse.csr_matrix(np.array([[0.95, 0.0], [0.0, 0.0]])), np.ones(2, int)))


def test_solver_info_names_highs():
    info = optimise.solver_info()
    assert info["name"] == "HiGHS" and info["interface"] == "scipy.optimize.milp"


def test_a_spent_time_limit_is_reported_not_optimal():
    p = random_problem(5)
    sol = most(p, 1, time_limit=0.0)
    assert not sol.optimal and sol.chosen == ()
    assert sol.stages[0].status.startswith("not run")
