"""Windows, preferred centres, merges and the reasons for unservable pairs, on invented numbers."""

from __future__ import annotations

import numpy as np
import pytest
from scipy import sparse

from planpack.requests import reasons, windows
from planpack.requests.candidates import candidate_grid


@pytest.fixture
def grid():
    return candidate_grid(bands=[(3100, 3400)])  # 3100, 3125, ..., 3400: 13 candidates, one run


def serves_matrix(rows: list[dict[int, float]], k: int) -> sparse.csr_matrix:
    m = np.zeros((len(rows), k))
    for r, cols in enumerate(rows):
        for c, v in cols.items():
            m[r, c] = v
    return sparse.csr_matrix(m)


def test_window_is_where_every_served_pair_stays_served(grid):
    assert grid.size == 13 and len(set(grid.run.tolist())) == 1
    s = serves_matrix([{c: 0.9 for c in range(2, 7)}, {c: 0.95 for c in range(4, 10)}], grid.size)
    (w,) = windows.windows(s, grid, [5], {})
    assert (grid.freqs_khz[w.low], grid.freqs_khz[w.high]) == (3200.0, 3250.0)  # columns 4..6
    assert set(w.rows.tolist()) == {0, 1}


def test_centre_has_the_best_worst_hour(grid):
    vals = {4: 0.91, 5: 0.92, 6: 0.97, 7: 0.93}
    s = serves_matrix([vals, {c: 0.95 for c in range(3, 9)}], grid.size)
    (w,) = windows.windows(s, grid, [4], {})
    assert (w.low, w.high) == (4, 7)
    assert w.index == 6  # 0.97 and 0.95: the best worst


def test_a_window_keeps_the_net_hours_it_closes(grid):
    s = serves_matrix([{c: 0.95 for c in range(2, 10)}], grid.size)
    (w,) = windows.windows(s, grid, [5], {3: np.array([4, 5, 6])})
    assert (w.low, w.high) == (4, 6) and w.net_hours == (3,)


def test_windows_never_span_an_excluded_frequency():
    g = candidate_grid(bands=[(3100, 3400)], exclude=[(3250.0, 3250.0)])
    s = serves_matrix([{c: 0.95 for c in range(g.size)}], g.size)
    (w,) = windows.windows(s, g, [2], {})
    assert g.freqs_khz[w.high] == 3225.0


def test_merge_reported_within_the_slack(grid):
    # R1 serves row 0 at columns 1-3, R2 row 1 at columns 8-10; column 5-6 gives both 0.85 (target 0.9)
    value = serves_matrix([{1: 0.95, 2: 0.95, 3: 0.95, 5: 0.85, 6: 0.86},
                           {8: 0.95, 9: 0.95, 10: 0.95, 5: 0.85, 6: 0.82}], grid.size)
    wins = windows.windows(value.multiply(value >= 0.9).tocsr(), grid, [2, 9], {})
    (m,) = windows.merges(value, grid, wins, 0.9)
    assert m.index == 5 and m.worst == pytest.approx(0.85) and (m.low, m.high) == (5, 6)
    assert windows.merges(value, grid, wins, 0.99) == []  # 0.85 is more than 0.10 below 0.99


def _arrays():
    good = np.zeros((1, 24, 2))
    allowed = np.ones((24, 2), bool)
    muf = np.full((1, 24), 6.0)
    luf = np.full((1, 24), 3.0)
    return good, allowed, muf, luf


def test_reason_codes_follow_the_predictions():
    freqs = np.arange(2000.0, 10001.0, 25.0)
    good, allowed, muf, luf = _arrays()
    pairs = np.array([[0, 1]])
    assert reasons.classify(pairs, good, allowed, muf, luf, freqs, [0.5], 0.9) == [reasons.SHORT_OF_TARGET]
    luf2 = luf.copy()
    luf2[0, 1] = 7.0
    assert reasons.classify(pairs, good, allowed, muf, luf2, freqs, [0.0], 0.9) == [reasons.LUF_ABOVE_MUF]
    luf2[0, 1] = np.nan
    assert reasons.classify(pairs, good, allowed, muf, luf2, freqs, [0.0], 0.9) == [reasons.LUF_ABOVE_MUF]
    # no 90 % LUF, but the best candidate works on 73 % of days against a 75 % target: short of it, not LUF > MUF
    assert reasons.classify(pairs, good, allowed, muf, luf2, freqs, [0.73], 0.75) == [reasons.SHORT_OF_TARGET]
    muf2, luf3 = muf.copy(), luf.copy()
    muf2[0, 1], luf3[0, 1] = 1.55, 1.5
    full = np.arange(1600.0, 10001.0, 25.0)
    assert reasons.classify(pairs, good, allowed, muf2, luf3, full, [0.0], 0.9) == [reasons.ABOVE_MUF]
    muf2[0, 1] = 1.8  # would work at 1.6-1.8 MHz, but the bands start at 2 MHz
    assert reasons.classify(pairs, good, allowed, muf2, luf3, freqs, [0.0], 0.9) == [reasons.OUTSIDE_BANDS]
    high = np.arange(8000.0, 10001.0, 25.0)
    assert reasons.classify(pairs, good, allowed, muf, luf, high, [0.0], 0.9) == [reasons.OUTSIDE_BANDS]
    good2, allowed2 = good.copy(), allowed.copy()
    good2[0, 1, 0], allowed2[1, 0] = 0.95, False
    assert reasons.classify(pairs, good2, allowed2, muf, luf, freqs, [0.0], 0.9) == [reasons.NOT_AUTHORISED]


@pytest.mark.parametrize("code", reasons.ORDER)
def test_every_reason_is_a_whole_sentence(code):
    text = reasons.explain(code, muf=(3.1, 3.4), luf=(3.6, 3.9), best=0.874, best_khz=3425.0, target=0.9,
                           lowest_khz=1600.0, channels=["D8"])
    assert text[0].islower() or text[0].isupper()
    assert text.endswith(".") and "  " not in text
