"""The candidate grid: bands, step, exclusions, and the distress and safety frequencies it never offers.

The protected frequencies are checked against ITU Radio Regulations Article 5
footnotes 5.108-5.111 (2182 kHz guard band 2173.5-2190.5 kHz; 4125, 6215,
8291, 12290 and 16420 kHz radiotelephony; the DSC frequencies 2187.5, 4207.5,
6312, 8414.5, 12577 and 16804.5 kHz; 3023 and 5680 kHz search and rescue),
as reproduced in a published copy of those footnotes.
"""

from __future__ import annotations

import numpy as np
import pytest

from planpack.requests import candidates
from planpack.requests.candidates import GridError, candidate_grid, check_values

RR_5_108_TO_5_111_KHZ = [2174.5, 2182.0, 2187.5, 3023.0, 4125.0, 4177.5, 4207.5, 5680.0, 6215.0, 6268.0, 6312.0,
                         8291.0, 8376.5, 8414.5, 12290.0, 12520.0, 12577.0, 16420.0, 16695.0, 16804.5]


def test_default_grid_covers_the_band_in_25_khz_steps():
    g = candidate_grid()
    assert g.freqs_khz[0] == 1600.0 and g.freqs_khz[-1] == 30000.0
    assert set(np.round(np.diff(g.freqs_khz) % 25.0, 6)) == {0.0}
    assert 1050 < g.size < 1137  # 1137 multiples of 25 kHz, less the protected ones


@pytest.mark.parametrize("f", RR_5_108_TO_5_111_KHZ)
def test_distress_and_safety_frequencies_are_never_candidates(f):
    g = candidate_grid(step=0.5, bands=[(f - 300, f + 300)])
    assert np.abs(g.freqs_khz - f).min() > candidates.DISTRESS_GUARD_KHZ


def test_2182_guard_band_and_time_signal_bands():
    g = candidate_grid(step=1.0, bands=[(2150, 2220), (9900, 10100)])
    f = g.freqs_khz
    assert not ((f >= 2173.5) & (f <= 2190.5)).any()
    assert not ((f >= 9995) & (f <= 10005)).any()  # standard frequency and time signals (from memory)
    assert {e["why"] for e in g.describe()["builtin_exclusions"]} >= {"radiotelephony distress and calling"}


def test_every_listed_frequency_names_its_source():
    for f, use, src in candidates.DISTRESS_SAFETY_KHZ:
        assert src and use and 1500 < f < 30000
    assert all("from memory" in src or "RR 5.1" in src or "published" in src
               for _, _, src in candidates.DISTRESS_SAFETY_KHZ)


def test_plan_exclusions_and_assigned_channels():
    g = candidate_grid(bands=[(3000, 4000)], exclude=[(3200.0, 3300.0), (3500.0, 3500.0)], assigned_khz=[3701.0])
    f = set(g.freqs_khz.tolist())
    assert not f & {3200.0, 3225.0, 3300.0, 3500.0, 3700.0}
    assert {3175.0, 3325.0, 3475.0, 3525.0, 3675.0, 3725.0} <= f


def test_runs_break_at_every_hole():
    g = candidate_grid(bands=[(3300, 3500), (3700, 3800)], exclude=[(3400.0, 3400.0)])
    runs = {}
    for f, r in zip(g.freqs_khz, g.run):
        runs.setdefault(int(r), []).append(float(f))
    assert list(runs.values()) == [[3300.0, 3325.0, 3350.0, 3375.0], [3425.0, 3450.0, 3475.0, 3500.0],
                                   [3700.0, 3725.0, 3750.0, 3775.0, 3800.0]]
    # 3023 kHz (aeronautical search and rescue, RR 5.111) cuts a run too
    g = candidate_grid(bands=[(3000, 3100)])
    assert 3025.0 not in g.freqs_khz and len(set(g.run.tolist())) == 2


@pytest.mark.parametrize("bands, exclude, step, key, words", [
    ([], [], 25, "request.bands_khz", "at least one band"),
    ([(5000, 4000)], [], 25, "request.bands_khz[0]", "inverted"),
    ([(5000, 5000)], [], 25, "request.bands_khz[0]", "empty"),
    ([(1000, 5000)], [], 25, "request.bands_khz[0]", "outside"),
    ([(4000, 5000)], [(3000, 6000)], 25, "request.exclude_khz", "cover every band"),
    ([(4000, 5000)], [(4600, 4400)], 25, "request.exclude_khz[0]", "inverted"),
    ([(4000, 5000)], [], 0, "request.step_khz", "above 0"),
    ([(1600, 30000)], [], 1, "request.step_khz", "at most 4000"),
])
def test_bad_values_name_the_key(bands, exclude, step, key, words):
    problems = check_values(bands, exclude, step)
    assert problems and problems[0][0] == key and words in problems[0][1]
    with pytest.raises(GridError) as e:
        candidate_grid(bands, exclude, step)
    assert e.value.key == key


def test_a_band_inside_a_guard_band_leaves_nothing():
    with pytest.raises(GridError, match="no frequency is left"):
        candidate_grid(bands=[(2175, 2190)])


def test_a_step_with_no_multiple_in_the_bands():
    with pytest.raises(GridError, match="no multiple of 25 kHz") as e:
        candidate_grid(bands=[(2176, 2188)])
    assert e.value.key == "request.step_khz"
