"""YAML merge keys ('<<') are refused with a position and a hint (hardening finding 6).

Before, ``<<: [*a]`` and ``<<: {...}`` merged nothing, so an antenna silently lost
its matching, wire and feedline settings (they change SWR and losses) while the
plan checked clean; and ``<<: *a`` followed by an overriding key was reported as
a duplicate key. YAML readers disagree on these forms, so a plan does not use them.
"""

from __future__ import annotations

import pytest

from planpack.plan import read_plan

from .conftest import BASE, position

ANTENNAS = """\
antennas:
  nvis:
    kind: dipole
    design_khz: 4520
    height_m: 7
"""
SHARED = """\
  spare: &common
    kind: dipole
    design_khz: 4520
    height_m: 7
    matching: feedpoint-coupler
    wire_mm: 4
    feedline: {length_m: 30, loss_db_per_100m_at_10mhz: 2.5}
"""
FORMS = {
    "list of aliases": "  nvis:\n    <<: [*common]\n",
    "mapping in place": "  nvis:\n    <<: {kind: dipole, design_khz: 4520, height_m: 7, matching: feedpoint-coupler}\n",
    "alias then override": "  nvis:\n    <<: *common\n    height_m: 9\n",
    "alias alone": "  nvis:\n    <<: *common\n",
}


def plan_with(form: str) -> str:
    assert ANTENNAS in BASE
    return BASE.replace(ANTENNAS, "antennas:\n" + SHARED + FORMS[form])


@pytest.mark.parametrize("form", sorted(FORMS))
def test_merge_key_is_refused_where_it_is_written(write_plan, form):
    text = plan_with(form)
    result = read_plan(write_plan(text))
    assert not result.ok
    merges = [d for d in result.diagnostics if d.code == "yaml-merge-key"]
    assert len(merges) == 1, [d.format() for d in result.diagnostics]
    d = merges[0]
    assert (d.line, d.column) == position(text, "<<")
    assert d.key == "antennas.nvis" and d.message.startswith("antennas.nvis: ")
    assert "write the keys out in full" in d.message  # the hint
    assert not [x for x in result.diagnostics if x.code == "duplicate-key"]  # no false duplicate


def test_a_quoted_double_angle_is_just_an_unknown_key(write_plan):
    text = BASE.replace("    height_m: 7\n", '    height_m: 7\n    "<<": 1\n')
    result = read_plan(write_plan(text))
    assert [d.code for d in result.diagnostics] == ["unknown-key"]


def test_aliases_of_whole_values_still_work(write_plan):
    text = BASE.replace("    ground: {soil: medium-dry, system: rods}", "    ground: &g {soil: medium-dry, system: rods}") \
               .replace("    ground: {soil: wet, system: counterpoise}", "    ground: *g")
    result = read_plan(write_plan(text))
    assert result.ok, [d.format() for d in result.diagnostics]
    assert {s.ground.soil for s in result.plan.stations} == {"medium-dry"}


def test_duplicate_key_of_a_mapping_names_its_own_path(write_plan):
    text = BASE.replace("    ground: {soil: wet, system: counterpoise}",
                        "    ground: {soil: wet, system: counterpoise}\n    ground: {soil: wet, system: rods}")
    d = next(d for d in read_plan(write_plan(text)).diagnostics if d.code == "duplicate-key")
    assert d.key == "stations.ridge.ground"
