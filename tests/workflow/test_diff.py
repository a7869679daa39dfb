"""planpack diff: compiled plans compared by their effect on the net."""

from __future__ import annotations

import copy
import math
import re
import json

import pytest
from tests.workflow.conftest import run_cli, write
from tests.workflow.plans import REORDERED, TINY, variant

from planpack.workflow import diff

NO_T3 = variant(("  - {id: T3, khz: 5410, mode: usb}\n", ""))
NEW_ADDRESS = variant(("address: TNYCMP", "address: TNYCAMP"))


@pytest.fixture(scope="module")
def folder(tmp_path_factory, shared_cache):
    f = tmp_path_factory.mktemp("diff")
    write(f, "net.yaml", TINY)
    write(f, "no-t3.yaml", NO_T3)
    write(f, "address.yaml", NEW_ADDRESS)
    write(f, "reordered.yaml", REORDERED)
    return f


@pytest.fixture(scope="module")
def base(folder):
    from planpack.plan import read_plan
    from planpack.workflow.cache import cached_compile

    return cached_compile(read_plan(str(folder / "net.yaml")).plan).data


def test_removed_channel_moves_its_hours_to_another(folder, base):
    # the tiny net's link uses T3 around midday; without it those hours must go to a channel that is left
    t3_hours = [h["utc_hour"] for link in base["links"] for h in link["hours"] if h["first"] == "T3"]
    assert t3_hours, "the fixture must use T3 at some hours for this test to mean anything"
    code, out, err = run_cli(["diff", "net.yaml", "no-t3.yaml"], folder)
    assert code == 1, err
    assert "T3: channel removed (5410 kHz usb)" in out
    hours_part = out.split("First choice per link:")[1].split("\n\n")[0]
    assert "first T3 → T2" in hours_part or "first T3 → T1" in hours_part
    assert "First choice per link:" in out and "base--camp" in out


def test_changed_address_is_flagged(folder):
    code, out, err = run_cli(["diff", "net.yaml", "address.yaml"], folder)
    assert code == 1, err
    assert "camp: self address: TNYCMP → TNYCAMP" in out
    # an address is not a propagation input: nothing else may change
    assert "Net channel by hour" not in out and "First choice" not in out
    assert "1 operational change, 0 others" in out


def test_reordered_keys_are_no_change(folder):
    code, out, err = run_cli(["diff", "net.yaml", "reordered.yaml"], folder)
    assert code == 0, err
    assert "no change in the compiled plan" in out


def test_markdown_for_a_merge_request(folder):
    code, out, err = run_cli(["diff", "net.yaml", "no-t3.yaml", "--format", "markdown"], folder)
    assert code == 1, err
    assert out.startswith("### Plan change: `tiny-net`")
    assert "#### Net channel by hour" in out and "| --- | --- | --- |" in out
    rows = [ln for ln in out.splitlines() if ln.startswith("| ⚠")]
    assert any("channel removed" in r for r in rows)
    for r in rows:  # every row has exactly three cells
        assert r.count(" | ") == 2 and r.endswith(" |")


def test_errors_exit_2_with_diagnostics(folder):
    write(folder, "broken.yaml", variant(("power_w: 50", "power_w: lots")))
    code, out, err = run_cli(["diff", "net.yaml", "broken.yaml"], folder)
    assert code == 2
    assert "broken.yaml:" in err and "stations.camp.power_w" in err
    assert out == ""
    code, out, err = run_cli(["diff", "net.yaml", "missing.yaml"], folder)
    assert code == 2 and "missing.yaml: no such file" in err
    code, out, err = run_cli(["diff", "net.yaml"], folder)
    assert code == 2


# ---- the comparison itself, on edited copies of one compiled plan (no compiles)

def test_identical_data_is_no_change(base):
    d = diff.diff_compiled(base, copy.deepcopy(base))
    assert d.changes == [] and d.operational == []


def test_gap_opened_and_closed(base):
    new = copy.deepcopy(base)
    new["gaps"] = [{"links": ["base--camp"], "utc_hours": [20, 21], "local_hours": [], "window_mhz": None, "message": ""}]
    d = diff.diff_compiled(base, new)
    texts = [c.text for c in d.section("gaps")]
    old_hours = sorted({h for g in base["gaps"] for h in g["utc_hours"]})
    assert any(t.startswith("gap opened 20:00–22:00 UTC") for t in texts)
    if old_hours:
        assert any(t.startswith("gap closed") for t in texts)
    assert all(c.operational for c in d.section("gaps"))


def test_good_days_threshold(base):
    new = copy.deepcopy(base)
    hour = new["links"][0]["hours"][12]
    cell = next(c for c in hour["channels"] if c["channel"] == hour["first"])
    cell["good_days"] = round(cell["good_days"] - 0.15, 3)
    moved = diff.diff_compiled(base, new, good_days_threshold=0.1).section("good-days")
    assert len(moved) == 1 and "worse 12:00–13:00 UTC" in moved[0].text and not moved[0].operational
    # percentages in the site's words, never fractions
    was, now = cell["good_days"] + 0.15, cell["good_days"]
    assert f"{math.floor(round(was, 3) * 100 + 1e-6)} % → {math.floor(round(now, 3) * 100 + 1e-6)} % of days" in moved[0].text
    assert "10 percentage points" in moved[0].text and not re.search(r"\b0\.\d\d\b", moved[0].text)
    assert diff.diff_compiled(base, new, good_days_threshold=0.2).section("good-days") == []


def test_target_is_shown_in_percent(base):
    new = copy.deepcopy(base)
    new["net"]["target_good_days"] = 0.8
    (c,) = diff.diff_compiled(base, new).section("net")
    assert c.text == f"a channel counts as working on at least: {round(base['net']['target_good_days'] * 100)} % of days → 80 % of days"


def test_links_matched_either_way_round(base):
    new = copy.deepcopy(base)
    ln = new["links"][0]
    old_id = ln["id"]
    ln["from"], ln["to"], ln["id"] = ln["to"], ln["from"], f"{ln['to']}--{ln['from']}"
    for g in new["gaps"]:
        g["links"] = [ln["id"] if x == old_id else x for x in g["links"]]
        g["links_by_hour"] = [[ln["id"] if x == old_id else x for x in hour] for hour in g.get("links_by_hour", [])]
    assert diff.diff_compiled(base, new).changes == []


def test_cut_lengths_and_station_fields(base):
    new = copy.deepcopy(base)
    new["antennas"][0]["cut"]["total_m"] += 0.5
    new["stations"][1]["name"] = "Braemar | <b>camp</b>"
    d = diff.diff_compiled(base, new)
    assert [c.subject for c in d.section("antennas")] == ["wire"]
    assert "radiator, tip to tip" in d.section("antennas")[0].text and "total_m" not in d.section("antennas")[0].text
    assert d.operational == []  # a renamed station or a re-cut wire changes no hour's channel
    md = diff.render_markdown(d)
    assert "<b>" not in md and "\\<b\\>" in md and "Braemar \\| " in md


def test_text_output_has_no_control_characters(base):
    new = copy.deepcopy(base)
    new["stations"][1]["name"] = "camp\x1b[31m"
    assert "\x1b" not in diff.render_text(diff.diff_compiled(base, new))


def test_diff_result_is_deterministic(base):
    new = json.loads(json.dumps(base))
    was = base["net_schedule"]["hours"][3]["first"]
    new["net_schedule"]["hours"][3]["first"] = None
    a = diff.render_text(diff.diff_compiled(base, new))
    b = diff.render_text(diff.diff_compiled(base, new))
    assert a == b and f"first {was} → none" in a
