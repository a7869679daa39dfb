"""The compiled plan: its public contract, the schedule a planner would believe, and the analysis warnings."""

from __future__ import annotations

import glob
import json
import os

import jsonschema
import numpy as np
import pytest

from planpack.compile import compile_plan
from planpack.output_schema import output_schema
from planpack.plan import read_plan
from tests.plan.conftest import BASE

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
DEMOS = sorted(glob.glob(os.path.join(ROOT, "plans", "*.yaml")))


@pytest.fixture(scope="module")
def compiled():
    return {os.path.basename(p): compile_plan(read_plan(p).plan) for p in DEMOS}


def plan_from(tmp_path, text, name="p.yaml"):
    path = tmp_path / name
    path.write_text(text)
    result = read_plan(str(path))
    assert result.ok, [d.format() for d in result.diagnostics]
    return result.plan


@pytest.mark.parametrize("name", [os.path.basename(p) for p in DEMOS])
def test_plan_json_follows_the_published_schema(compiled, name):
    data = json.loads(json.dumps(compiled[name].data))
    jsonschema.validate(data, output_schema(), cls=jsonschema.Draft202012Validator)
    assert len(data["net_schedule"]["hours"]) == 24
    for link in data["links"]:
        assert [h["utc_hour"] for h in link["hours"]] == list(range(24))
        assert all(len(h["channels"]) == len(data["channels"]) for h in link["hours"])


@pytest.mark.parametrize("name", [os.path.basename(p) for p in DEMOS])
def test_channels_never_scheduled_outside_their_hours(compiled, name):
    data = compiled[name].data
    allowed = {c["id"]: set(c["allowed_utc_hours"]) for c in data["channels"]}
    for h in data["net_schedule"]["hours"]:
        for key in ("first", "second"):
            assert h[key] is None or h["utc_hour"] in allowed[h[key]]
    for link in data["links"]:
        for h in link["hours"]:
            for key in ("first", "second"):
                assert h[key] is None or h["utc_hour"] in allowed[h[key]]


def _freq(data, cid):
    return next(c["freq_khz"] for c in data["channels"] if c["id"] == cid) / 1000.0


def _local_hour(h):
    return int(h["local_time"][:2])


@pytest.mark.parametrize("name", [os.path.basename(p) for p in DEMOS])
def test_night_channels_low_day_channels_higher(compiled, name):
    """Common practice, no source: a mid-latitude NVIS net works roughly 1.8-4.9 MHz at night and 5-8 MHz by day."""
    data = compiled[name].data
    hours = data["net_schedule"]["hours"]
    night = [_freq(data, h["first"]) for h in hours if _local_hour(h) in (2, 3, 4, 5) and h["first"]]  # the hours before dawn
    day = [_freq(data, h["first"]) for h in hours if _local_hour(h) in (11, 12, 13, 14) and h["first"]]
    assert night and day
    assert all(1.8 <= f <= 4.9 for f in night), night
    assert all(5.0 <= f <= 8.0 for f in day), day
    # and per link: the OWF at midday is above the OWF at night on every link
    for link in data["links"]:
        owf = {_local_hour(h): h["owf_mhz"] for h in link["hours"]}
        assert owf[12] > owf[3]


@pytest.mark.parametrize("name", [os.path.basename(p) for p in DEMOS])
def test_net_schedule_changes_channel_only_a_few_times(compiled, name):
    ns = compiled[name].data["net_schedule"]
    firsts = [h["first"] for h in ns["hours"]]
    changes = sum(firsts[i] != firsts[i - 1] for i in range(24))  # cyclic count
    assert ns["changes_per_day"] == changes
    assert 2 <= changes <= 8


def test_compile_is_deterministic():
    a = compile_plan(read_plan(DEMOS[0]).plan).data
    b = compile_plan(read_plan(DEMOS[0]).plan).data
    assert json.dumps(a, sort_keys=True) == json.dumps(b, sort_keys=True)


def test_sunrise_and_sunset_in_local_time(compiled):
    data = compiled["danube-relief.yaml"].data
    for s in data["stations"]:
        rise, set_ = s["sun"]["sunrise_local"], s["sun"]["sunset_local"]
        # mid-March in Austria, CET: sunrise about 06:00-06:30, sunset about 18:00-18:20 (from memory)
        assert "05:45" <= rise <= "06:45" and "17:45" <= set_ <= "18:30", s["sun"]


def test_gaps_become_check_warnings_with_a_window(compiled):
    c = compiled["southern-alps-sar.yaml"]
    gaps = [d for d in c.diagnostics if d.code == "channel-gap"]
    assert gaps and len(gaps) == len(c.data["gaps"])
    assert all("local" in d.message and "UTC" in d.message for d in gaps)
    assert any(g["window_mhz"] for g in c.data["gaps"])


# ---------------------------------------------------------------- small plans for the analysis warnings

SMALL = BASE.replace("  links: hub\n", "  links: hub\n  target_good_days: 0.6\n")


def test_badly_cut_antenna_visibly_worsens_the_schedule(tmp_path):
    good = compile_plan(plan_from(tmp_path, SMALL, "good.yaml"))
    bad = compile_plan(plan_from(tmp_path, SMALL.replace("design_khz: 4520", "design_khz: 9000"), "bad.yaml"))
    c2 = 1  # channel C2 (4520 kHz): the good antenna is cut for it
    g_good = good.arrays.good_days[:, :, c2].mean()
    g_bad = bad.arrays.good_days[:, :, c2].mean()
    assert g_bad < g_good - 0.1
    assert any(d.code == "antenna-loss" for d in bad.diagnostics)


def test_more_power_never_lowers_good_days(tmp_path):
    low = compile_plan(plan_from(tmp_path, SMALL, "low.yaml"))
    high = compile_plan(plan_from(tmp_path, SMALL.replace("power_w: 20", "power_w: 400"), "high.yaml"))
    assert np.all(high.arrays.good_days >= low.arrays.good_days - 1e-9)
    assert np.all(high.arrays.snr_db >= low.arrays.snr_db - 1e-3)


def test_worst_case_over_months_and_solar_range(tmp_path):
    one = compile_plan(plan_from(tmp_path, SMALL, "one.yaml"))
    span = compile_plan(plan_from(tmp_path, SMALL.replace("to: 2027-03-20", "to: 2027-04-20").replace("{ssn: 60}", "{ssn: [20, 60]}"), "span.yaml"))
    assert span.data["assumptions"]["months"] == ["2027-03", "2027-04"]
    assert len(span.data["assumptions"]["scenarios"]) == 4
    assert np.all(span.arrays.good_days <= one.arrays.good_days + 1e-9)


def test_whip_alone_on_nvis_net_is_warned(tmp_path):
    text = SMALL.replace("antennas:\n", "antennas:\n  whip:\n    kind: whip\n    length_m: 3\n    height_m: 1\n").replace(
        "    antenna: nvis\n    ground: {soil: wet", "    antenna: whip\n    ground: {soil: wet")
    c = compile_plan(plan_from(tmp_path, text))
    d = [d for d in c.diagnostics if d.code == "nvis-whip"]
    assert len(d) == 1 and d[0].key == "stations.ridge.antenna"
    line = text.splitlines().index("    antenna: whip") + 1
    assert d[0].line == line


def test_dipole_outside_nvis_window_is_warned(tmp_path):
    text = SMALL.replace("    height_m: 7\n", "    height_m: 25\n")
    c = compile_plan(plan_from(tmp_path, text))
    d = [d for d in c.diagnostics if d.code == "nvis-height"]
    assert len(d) == 1 and d[0].key == "antennas.nvis.height_m"
    assert d[0].line == text.splitlines().index("    height_m: 25") + 1


def test_wasted_channel_and_gap_warnings(tmp_path):
    # the ridge team 150 km away (in SMALL it is 2 km off, where the ground wave carries even 27.5 MHz)
    text = SMALL.replace("{grid: JO62qm}", "{lat: 51.18, lon: 13.2}").replace(
        "  - {id: C3, khz: 6950, mode: usb, hours: \"06:00-20:00\"}",
                         "  - {id: C3, khz: 6950, mode: usb, hours: \"06:00-20:00\"}\n  - {id: C4, khz: 27500, mode: usb}")
    c = compile_plan(plan_from(tmp_path, text))
    wasted = [d for d in c.diagnostics if d.code == "wasted-channel"]
    assert any("C4" in d.message for d in wasted)
    assert [w for w in wasted if "C4" in w.message][0].line == text.splitlines().index("  - {id: C4, khz: 27500, mode: usb}") + 1
    assert c.data["scan_lists"] and all("C4" in s["wasted"] for s in c.data["scan_lists"])


def test_antenna_output_contract(compiled):
    ants = compiled["danube-relief.yaml"].data["antennas"]
    ids = {a["id"] for a in ants}
    assert {"ops-nvis", "night-invv", "day-dipole", "mobile-whip", "broadband"} <= ids
    for a in ants:
        assert len(a["channels"]) == 10 and a["exposure"]
        assert all(e["general_public_m"] >= e["occupational_m"] >= 0 for e in a["exposure"])
    invv = next(a for a in ants if a["id"] == "night-invv")
    assert invv["cut"]["leg_m"] == pytest.approx(invv["cut"]["total_m"] / 2, rel=1e-3)
    # the 468/f ft rule of thumb (common practice, no source) within a few percent of the NEC trim
    assert invv["cut"]["rule_of_thumb_total_m"] == pytest.approx(468 / 3.4 * 0.3048, rel=1e-3)


def test_check_without_cells_gives_the_same_warnings_and_briefing(compiled):
    # `check` compiles without the per-channel cells; the warnings and the briefing must not depend on them
    path = DEMOS[0]
    lean = compile_plan(read_plan(path).plan, cells=False)
    full = compiled[os.path.basename(path)]
    assert [d.format() for d in lean.diagnostics] == [d.format() for d in full.diagnostics]
    for a, b in zip(lean.data["stations"], full.data["stations"]):
        assert a["brief"] == b["brief"]
    assert lean.data["net_schedule"] == full.data["net_schedule"]
    assert [ln["gap_utc_hours"] for ln in lean.data["links"]] == [ln["gap_utc_hours"] for ln in full.data["links"]]


def test_authorised_hours_hold_on_both_sides_of_a_clock_change(tmp_path):
    # Europe/Berlin moves from UTC+1 to UTC+2 on 2027-03-28 (EU summer-time rule, from memory): C3 is
    # authorised 06:00-20:00 local, i.e. 05-19 UTC before and 04-18 UTC after; only 05-18 UTC hold on every day
    text = SMALL.replace("to: 2027-03-20", "to: 2027-04-10")
    c = compile_plan(plan_from(tmp_path, text))
    c3 = next(ch for ch in c.data["channels"] if ch["id"] == "C3")
    assert c3["allowed_utc_hours"] == list(range(5, 18))
    for h in c.data["net_schedule"]["hours"]:
        if h["first"] == "C3":
            assert 5 <= h["utc_hour"] <= 17
