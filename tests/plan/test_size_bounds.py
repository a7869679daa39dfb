"""Size bounds on the analysis a plan asks for (planpack/plan/bounds.py): counted while reading, refused with a position."""

from __future__ import annotations

import datetime as dt

import pytest

from planpack.plan import bounds, read_plan
from tests.hardening.bigplan import big_plan, mesh_plan

from .conftest import position


def test_link_count_without_listing_the_links():
    assert bounds.link_count("all", 700, False) == 244_650
    assert bounds.link_count("hub", 700, True) == 699
    assert bounds.link_count([["a", "b"]] * 3, 9, True) == 3


def test_months_touched():
    assert bounds.months_touched(dt.date(2027, 3, 8), dt.date(2027, 3, 26)) == 1
    assert bounds.months_touched(dt.date(2027, 12, 31), dt.date(2028, 12, 1)) == 13


def test_the_prediction_benchmarks_all_pairs_net_is_within_the_bounds(write_plan):
    """60 stations, links: all (1770 links) on 40 channels, one month: the size bench/bench_predict.py predicts."""
    result = read_plan(write_plan(mesh_plan(60, 40)))
    assert result.ok, [d.format() for d in result.diagnostics if d.severity == "error"]
    assert len(result.plan.links) == 1770


@pytest.mark.parametrize("stations,channels,edit,needle,words", [
    (61, 10, ("  links: hub\n", "  links: all\n"), None, None),  # 1830 links: fine
    (65, 10, ("  links: hub\n", "  links: all\n"), "all", "2080 links"),
    (60, 57, ("  links: hub\n", "  links: all\n"), "all", "100890 link·channel pairs"),
    (60, 30, ("solar: {ssn: 60}", "solar: {ssn: [40, 90]}"), "all", "424800 predictions of 24 hours"),
])
def test_links_and_predictions_are_bounded(write_plan, stations, channels, edit, needle, words):
    text = mesh_plan(stations, channels).replace(*edit)
    if "ssn: [40" in text:  # a solar range over four months: 8 scenarios
        text = text.replace("  links: hub\n", "  links: all\n")
        text = text.replace("valid: {from: 2027-03-08, to: 2027-03-26}", "valid: {from: 2027-01-08, to: 2027-04-26}")
    result = read_plan(write_plan(text))
    errors = [d for d in result.diagnostics if d.severity == "error"]
    if needle is None:
        assert result.ok, [d.format() for d in errors]
        return
    assert [d.code for d in errors] == ["plan-too-large"]
    d = errors[0]
    assert d.key == "net.links" and words in d.message and "at most" in d.message
    assert (d.line, d.column) == (position(text, "  links: ")[0], position(text, needle)[1])


def test_antenna_solutions_are_bounded(write_plan):
    text = big_plan(40, 40)
    own = "".join(f"  own-{i}:\n    kind: dipole\n    design_khz: {3000 + 37 * i}\n    height_m: 10\n" for i in range(30))
    text = text.replace("antennas:\n", "antennas:\n" + own)
    result = read_plan(write_plan(text))
    errors = [d for d in result.diagnostics if d.severity == "error"]
    assert [d.code for d in errors] == ["plan-too-large"]
    assert errors[0].key == "antennas" and "2673 NEC-2 solutions" in errors[0].message  # 33 jobs x (40 + 41)
    assert (errors[0].line, errors[0].column) == position(text, "own-0:")  # the antennas section
