"""The plan's request: section: defaults, and positioned errors for what leaves nothing to ask for."""

from __future__ import annotations

import json

import pytest

from planpack.plan import read_plan
from planpack.plan.schema import json_schema
from tests.plan.conftest import BASE


def read(tmp_path, section: str):
    p = tmp_path / "net.yaml"
    p.write_text(BASE + section)
    return read_plan(str(p))


def line_of(text: str, needle: str) -> int:
    """The line of needle in the request section (which comes last)."""
    lines = text.splitlines()
    start = lines.index("request:")
    return next(i for i, line in enumerate(lines, 1) if i > start and needle in line)


def test_defaults_without_a_section(tmp_path):
    plan = read(tmp_path, "").plan
    r = plan.request
    assert r.bands_khz == ((1600.0, 30000.0),) and r.exclude_khz == () and r.step_khz == 25.0
    assert r.mode_for(plan) == "usb"  # the commonest mode of the channels


def test_a_full_section_is_read(tmp_path):
    plan = read(tmp_path, "request:\n  bands_khz: [[2000, 4500], [6000, 8000]]\n  exclude_khz: [3500, [4000, 4100]]\n"
                          "  mode: ale\n  step_khz: 5\n").plan
    r = plan.request
    assert r.bands_khz == ((2000.0, 4500.0), (6000.0, 8000.0))
    assert r.exclude_khz == ((3500.0, 3500.0), (4000.0, 4100.0))
    assert r.mode_for(plan) == "ale" and r.step_khz == 5.0


@pytest.mark.parametrize("section, needle, key, words", [
    ("request:\n  bands_khz: []\n", "bands_khz", "request.bands_khz", "1 to 100 items"),
    ("request:\n  bands_khz: [[5000, 4000]]\n", "bands_khz", "request.bands_khz[0]", "inverted"),
    ("request:\n  bands_khz: [[5000, 5000]]\n", "bands_khz", "request.bands_khz[0]", "empty"),
    ("request:\n  exclude_khz: [[1500, 30000]]\n", "exclude_khz", "request.exclude_khz", "cover every band"),
    ("request:\n  step_khz: 0\n", "step_khz", "request.step_khz", "above 0"),
    ("request:\n  step_khz: 0.5\n", "step_khz", "request.step_khz", "at most 4000"),
    ("request:\n  mode: psk31\n", "mode", "request.mode", "neither built in"),
    ("request:\n  bands_khz: [[2175, 2190]]\n", "bands_khz", "request.bands_khz", "no frequency is left"),
    ("request:\n  bands_khz: [[1000, 2000]]\n", "bands_khz", "request.bands_khz[0][0]", "from 1500 to 30000"),
    ("request:\n  stepkhz: 5\n", "stepkhz", "request.stepkhz", "did you mean 'step_khz'"),
])
def test_bad_sections_are_positioned_errors(tmp_path, section, needle, key, words):
    r = read(tmp_path, section)
    assert not r.ok
    errors = [d for d in r.diagnostics if d.severity == "error"]
    assert errors, r.diagnostics
    d = errors[0]
    assert d.key == key and words in d.message, d.format()
    assert d.line == line_of(BASE + section, needle), d.format()


def test_schema_declares_the_section():
    props = json_schema()["properties"]["request"]["properties"]
    assert set(props) == {"bands_khz", "exclude_khz", "mode", "step_khz"}
    assert props["step_khz"]["exclusiveMinimum"] == 0
    json.dumps(props)
