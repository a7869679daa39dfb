"""The demo plans check clean and validate against the published JSON Schema of the format."""

from __future__ import annotations

import glob
import json
import os

import jsonschema
import maidenhead
import pytest
import yaml

from planpack.plan import locator, read_plan
from planpack.plan.schema import json_schema

from .conftest import BASE

ROOT = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
DEMOS = sorted(glob.glob(os.path.join(ROOT, "plans", "*.yaml")))


def test_there_are_two_demo_plans():
    assert len(DEMOS) >= 2


@pytest.mark.parametrize("path", DEMOS, ids=os.path.basename)
def test_demo_plan_reads_clean(path):
    result = read_plan(path)
    assert result.ok and result.diagnostics == [], [d.format() for d in result.diagnostics]


def _as_json(path: str) -> dict:
    """The plan as JSON data, the way an editor's YAML plugin hands it to a JSON Schema."""
    with open(path, encoding="utf-8") as fh:
        data = yaml.safe_load(fh)
    return json.loads(json.dumps(data, default=str))


@pytest.mark.parametrize("path", DEMOS, ids=os.path.basename)
def test_demo_plan_validates_against_json_schema(path):
    jsonschema.Draft202012Validator.check_schema(json_schema())
    jsonschema.validate(_as_json(path), json_schema(), cls=jsonschema.Draft202012Validator)


def test_schema_rejects_what_the_reader_rejects(tmp_path):
    bad = yaml.safe_load(BASE.replace("    power_w: 20\n", "    power_w: 20\n    scan_rat: 2\n"))
    with pytest.raises(jsonschema.ValidationError):
        jsonschema.validate(json.loads(json.dumps(bad, default=str)), json_schema(), cls=jsonschema.Draft202012Validator)


def test_demo_mid_latitude_net_is_what_the_format_asks_for():
    """Issue requirement: 6-8 stations, hub links, 8-12 channels from about 2 to 12 MHz, mixed antennas."""
    plan = read_plan(os.path.join(ROOT, "plans", "danube-relief.yaml")).plan
    assert 6 <= len(plan.stations) <= 8 and plan.net.links == "hub"
    assert 8 <= len(plan.channels) <= 12
    assert min(c.khz for c in plan.channels) < 2600 and max(c.khz for c in plan.channels) > 10000
    assert len({a.kind for a in plan.antennas}) >= 4
    assert all(35 < s.at.lat_deg < 60 for s in plan.stations)


# Published locator examples. Source: the `maidenhead` package (PyPI) as a reference library,
# and the IARU Region 1 VHF Managers' Handbook example JO62qm for central Berlin (from memory).
@pytest.mark.parametrize("grid", ["JO62qm", "JN58td", "FN31pr", "RE66hm", "IO91wm45", "QF22le", "AA00aa", "RR99xx"])
def test_locator_centre_matches_reference_library(grid):
    lat, lon = locator.to_latlon(grid)
    ref_lat, ref_lon = maidenhead.to_location(grid, center=True)
    assert lat == pytest.approx(ref_lat, abs=1e-9) and lon == pytest.approx(ref_lon, abs=1e-9)


@pytest.mark.parametrize("lat,lon", [(52.52, 13.40), (-43.53, 172.63), (40.7128, -74.006), (-33.87, 151.21), (64.137, -21.895), (-77.846, 166.676)])
def test_locator_of_a_point_matches_reference_library(lat, lon):
    assert locator.from_latlon(lat, lon, 6).upper() == maidenhead.to_maiden(lat, lon, precision=3).upper()
    assert locator.from_latlon(lat, lon, 8).upper() == maidenhead.to_maiden(lat, lon, precision=4).upper()


def test_berlin_is_jo62():
    lat, lon = locator.to_latlon("JO62qm")
    assert 52.4 < lat < 52.6 and 13.3 < lon < 13.5
