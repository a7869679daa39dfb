"""The briefing in plan.json: percentages, weak hours, the clock change, orientation, ground, scan lists.

Checked on the demo plans and on an invented net with gaps across a clock change
(tests/publish/synthetic.py GAPPY_PLAN).
"""

from __future__ import annotations

import datetime as dt
import glob
import re
import os
import shutil
import subprocess

import pytest

from planpack import briefing, localtime
from planpack.compile import compile_plan
from planpack.ionosphere import geodesy
from planpack.plan import read_plan
from planpack.revision import plan_revision
from tests.publish.synthetic import GAPPY_PLAN

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
DEMOS = sorted(glob.glob(os.path.join(ROOT, "plans", "*.yaml")))


@pytest.fixture(scope="module")
def gappy(tmp_path_factory):
    path = tmp_path_factory.mktemp("gappy") / "moor-gaps.yaml"
    path.write_text(GAPPY_PLAN)
    read = read_plan(str(path))
    assert read.ok, [d.format() for d in read.diagnostics]
    return read, compile_plan(read.plan)


@pytest.fixture(scope="module")
def demos():
    return {os.path.basename(p): compile_plan(read_plan(p).plan).data for p in DEMOS}


def all_data(gappy, demos):
    return [gappy[1].data, *demos.values()]


# ---------------------------------------------------------------- small pieces

@pytest.mark.parametrize("fraction,expected", [(0.0, 0), (0.221, 22), (0.749, 74), (0.75, 75), (0.7499999, 75),
                                               (0.999, 99), (1.0, 100), (None, None), (float("nan"), None)])
def test_percent_is_rounded_down_from_the_three_decimal_fraction(fraction, expected):
    assert briefing.pct(fraction) == expected


@pytest.mark.parametrize("p,words", [(0, "almost no days"), (12, "about 1 day in 8"), (20, "about 1 day in 5"),
                                     (50, "about 1 day in 2"), (74, "about 3 days in 4"), (99, "nearly every day")])
def test_days_in_words(p, words):
    assert briefing.days_phrase(p) == words


@pytest.mark.parametrize("minutes,label,iso", [(0, "UTC", "+00:00"), (60, "UTC+1", "+01:00"), (-210, "UTC-3:30", "-03:30"),
                                               (345, "UTC+5:45", "+05:45"), (780, "UTC+13", "+13:00")])
def test_offset_labels(minutes, label, iso):
    assert localtime.offset_label(minutes) == label and localtime.iso_offset(minutes) == iso


def test_clock_change_cuts_the_period_at_the_date():
    # EU summer time: last Sunday of March 2027 is 28 March; Europe/London goes from UTC to UTC+1 (EU rule, from memory)
    c = briefing.clock("Europe/London", dt.date(2027, 3, 15), dt.date(2027, 4, 10), 60)
    assert c["periods"] == [{"from": "2027-03-15", "to": "2027-03-27", "utc_offset": "+00:00", "label": "UTC"},
                            {"from": "2027-03-28", "to": "2027-04-10", "utc_offset": "+01:00", "label": "UTC+1"}]
    assert c["clock_changes"] == [{"date": "2027-03-28", "from": "+00:00", "to": "+01:00"}]
    # southern hemisphere: New Zealand leaves daylight time on the first Sunday of April (2027-04-04)
    nz = briefing.clock("Pacific/Auckland", dt.date(2027, 3, 20), dt.date(2027, 4, 20), 780)
    assert [p["label"] for p in nz["periods"]] == ["UTC+13", "UTC+12"] and nz["clock_changes"][0]["date"] == "2027-04-04"
    assert briefing.clock("Asia/Kolkata", dt.date(2027, 1, 1), dt.date(2027, 12, 31), 330)["periods"][0]["label"] == "UTC+5:30"


def test_compass_names():
    assert [briefing.compass(d) for d in (0, 11.2, 11.3, 90, 202.5, 359)] == ["N", "N", "NNE", "E", "SSW", "N"]


def test_wire_runs_broadside_to_one_far_station():
    # one far station to the ESE (114°): the wire runs at right angles, NNE-SSW (24°/204°)
    mean, conc = briefing._axial_mean_deg([114.0], [70.0])
    assert mean == pytest.approx(114.0) and conc == pytest.approx(1.0)
    # far stations east and west are one axis; north and east cancel to no preferred direction
    mean, conc = briefing._axial_mean_deg([90.0, 270.0], [50.0, 50.0])
    assert mean == pytest.approx(90.0) and conc == pytest.approx(1.0)
    _, conc = briefing._axial_mean_deg([0.0, 90.0], [50.0, 50.0])
    assert conc == pytest.approx(0.0, abs=1e-12)


def test_swr_text_is_capped():
    assert [briefing.swr_text(x) for x in (1.04, 2.95, 12.4, 50.0, 235.0, float("nan"))] == \
        ["1.0:1", "3.0:1", "12:1", "50:1", "> 50:1", "not solved"]  # NaN: the antenna package's words


def test_revision_number_counts_the_plan_files_commits(tmp_path, monkeypatch):
    if shutil.which("git") is None:
        pytest.skip("git is not installed")
    env = {**os.environ, "GIT_AUTHOR_NAME": "T", "GIT_AUTHOR_EMAIL": "t@example.invalid", "GIT_COMMITTER_NAME": "T",
           "GIT_COMMITTER_EMAIL": "t@example.invalid", "GIT_CONFIG_GLOBAL": "/dev/null", "GIT_CONFIG_SYSTEM": "/dev/null",
           "GIT_COMMITTER_DATE": "2027-03-01T12:00:00Z", "GIT_AUTHOR_DATE": "2027-03-01T12:00:00Z"}
    monkeypatch.delenv("SOURCE_DATE_EPOCH", raising=False)

    def git(*args):
        subprocess.run(["git", *args], cwd=tmp_path, check=True, capture_output=True, env=env)

    plan = tmp_path / "net.yaml"
    other = tmp_path / "other.txt"
    git("init", "-q")
    for i in range(3):
        plan.write_text(f"# {i}\n")
        other.write_text(f"{i}\n")
        git("add", ".")
        git("commit", "-q", "-m", f"change {i}")
    other.write_text("x\n")
    git("commit", "-q", "-am", "not the plan")
    r = plan_revision(str(plan), "0" * 64).to_dict()
    assert r["number"] == 3 and r["issue_date"] == "2027-03-01" and r["kind"] == "git"
    assert r["label"] == f"Rev 3 of 2027-03-01 ({r['id']})"
    plan.write_text("# edited\n")
    assert plan_revision(str(plan), "0" * 64).label.startswith("Rev 3+ of 2027-03-01 (")
    outside = tmp_path.parent / "outside.yaml"
    outside.write_text("x")
    monkeypatch.setenv("SOURCE_DATE_EPOCH", "1803902400")  # 2027-03-01 + 150 days
    r = plan_revision(str(outside), "ab" * 32).to_dict()
    assert r["number"] is None and r["label"] == f"Issue {r['issue_date']} (c-abababababab)"


# ---------------------------------------------------------------- compiled plans

def test_every_percent_agrees_with_its_fraction(gappy, demos):
    for d in all_data(gappy, demos):
        target = d["net"]["target_good_days"]
        for h in d["net_schedule"]["hours"]:
            assert h["good_days_pct"] == (briefing.pct(h["weakest_good_days"]) if h["first"] else None)
            assert h["weak"] == (h["first"] is None or h["weakest_good_days"] < target)
            assert h["weak"] == (h["good_days_pct"] is None or h["good_days_pct"] < round(target * 100))
            assert (h["fallback"] is not None) == h["weak"]
        for ln in d["links"]:
            for hr in ln["hours"]:
                cells = {c["channel"]: c for c in hr["channels"]}
                for c in hr["channels"]:
                    assert c["good_days_pct"] == briefing.pct(c["good_days"])
                if hr["first"]:
                    assert hr["first_good_days_pct"] == cells[hr["first"]]["good_days_pct"]
                    assert hr["weak"] == (cells[hr["first"]]["good_days"] < target)
                if hr["second"]:
                    assert hr["second_good_days_pct"] == cells[hr["second"]]["good_days_pct"]


def test_gap_hours_per_link_are_those_of_the_gap_table(gappy, demos):
    for d in all_data(gappy, demos):
        listed: dict[str, set] = {ln["id"]: set() for ln in d["links"]}
        for g in d["gaps"]:
            assert len(g["links_by_hour"]) == len(g["utc_hours"])
            assert set().union(*map(set, g["links_by_hour"])) == set(g["links"])  # links is the union over hours
            for h, ls in zip(g["utc_hours"], g["links_by_hour"]):
                for lid in ls:
                    listed[lid].add(h)
        for ln in d["links"]:
            assert ln["gap_utc_hours"] == sorted(listed[ln["id"]])
            assert set(ln["weak_utc_hours"]) <= set(ln["gap_utc_hours"])  # a weak link hour is always a gap
            assert [h["utc_hour"] for h in ln["hours"] if h["gap"]] == ln["gap_utc_hours"]
    # the invented net has gaps on every link
    assert all(ln["gap_utc_hours"] for ln in gappy[1].data["links"])


def test_weak_runs_cover_exactly_the_weak_hours(gappy, demos):
    for d in all_data(gappy, demos):
        views = [(d["net_schedule"]["hours"], d["net_schedule"]["weak_runs"])]
        views += [(s["brief"]["hours"], s["brief"]["weak_runs"]) for s in d["stations"]]
        for hours, runs in views:
            covered = sorted(h for r in runs for h in r["utc_hours"])
            assert covered == [h["utc_hour"] for h in hours if h["weak"]]
            for r in runs:
                pcts = [hours[h]["good_days_pct"] or 0 for h in r["utc_hours"]]
                assert (r["good_days_pct_min"], r["good_days_pct_max"]) == (min(pcts), max(pcts))
                assert r["text"].startswith(r["local"] if len(d["net"]["periods"]) == 1 else r["utc"])
                assert "works on" in r["text"] or "no channel" in r["text"]


def test_a_channel_the_schedule_names_is_never_wasted(gappy, demos):
    for d in all_data(gappy, demos):
        wasted = {s["station"]: set(s["wasted"]) for s in d["scan_lists"]}
        scanned = {s["station"]: set(s["groups"][0]["channels"]) for s in d["scan_lists"]}
        for h in d["net_schedule"]["hours"]:
            named = {h["first"]} | ({h["second"]} if (h["second_good_days_pct"] or 0) > 0 else set())
            for sid in wasted:
                assert not (named - {None}) & wasted[sid], (sid, h)
                assert named - {None} <= scanned[sid]
        for ln in d["links"]:
            for hr in ln["hours"]:
                for c in (hr["first"], hr["second"]):
                    if c:
                        assert c not in wasted[ln["from"]] and c not in wasted[ln["to"]]
        flagged = {m["key"] for m in d["diagnostics"] if m["code"] == "wasted-channel"}
        used = {c for h in d["net_schedule"]["hours"] for c in (h["first"], h["second"]) if c}
        for key in flagged:
            cid = d["channels"][int(key.split("[")[1].rstrip("]"))]["id"]
            assert all(cid in w for w in wasted.values()) and cid not in {h["first"] for h in d["net_schedule"]["hours"]}
            assert cid not in used or all((h["second_good_days_pct"] or 0) == 0 for h in d["net_schedule"]["hours"]
                                          if h["second"] == cid)


def test_clock_change_in_plan_json(gappy):
    read, compiled = gappy
    net = compiled.data["net"]
    assert [p["label"] for p in net["periods"]] == ["UTC", "UTC+1"]
    assert net["clock_changes"] == [{"date": "2027-03-28", "from": "+00:00", "to": "+01:00"}]
    h0 = compiled.data["net_schedule"]["hours"][0]
    assert h0["local_times"] == ["00:00", "01:00"]
    run = compiled.data["net_schedule"]["weak_runs"][0]
    assert " UTC / " in run["text"] and "UTC+1" in run["text"]
    (warn,) = [d for d in read.diagnostics if d.code == "clock-change"]
    assert "2027-03-28" in warn.message


def test_exposure_larger_than_the_plans_clearance_warns_at_the_key(gappy):
    read, compiled = gappy
    (d,) = [d for d in compiled.diagnostics if d.code == "exposure-clearance"]
    assert d.severity == "warning" and d.key == "stations.dale.clearance_m"
    line = GAPPY_PLAN.splitlines().index("    clearance_m: 0.5") + 1
    assert (d.line, d.column) == (line, 18)
    dale = next(s for s in compiled.data["stations"] if s["id"] == "dale")["brief"]["exposure"]
    assert dale["exceeds_clearance"] and dale["general_public_m"] > dale["clearance_m"] == 0.5
    assert f"{dale['general_public_m']:.1f} m" in d.message


def test_orientation_to_control(gappy, demos):
    for d in all_data(gappy, demos):
        control = next(s for s in d["stations"] if s["role"] == "control")
        for s in d["stations"]:
            b = s["brief"]
            if s is control:
                assert b["to_control"] is None
                continue
            dist, az, _ = geodesy.inverse(s["lat_deg"], s["lon_deg"], control["lat_deg"], control["lon_deg"])
            assert b["to_control"]["distance_km"] == pytest.approx(float(dist), abs=0.06)
            assert b["to_control"]["bearing_deg"] == pytest.approx(round(float(az) % 360), abs=0.5)
            assert b["to_control"]["compass"] == briefing.compass(float(az))
            for run in b["wire_runs"]:
                if run["run_deg"] is not None and len(b["far_stations"]) == 1:
                    # broadside: at right angles to the bearing of the one far station
                    diff = (run["run_deg"] - b["far_stations"][0]["bearing_deg"]) % 180
                    assert diff == pytest.approx(90, abs=1)


def test_ground_lengths_are_a_quarter_wave_at_the_lowest_channel_used(gappy):
    # quarter-wave rule 234 / f[MHz] ft (common practice, no source): 5.380 MHz -> 43.49 ft = 13.26 m
    st = {s["id"]: s["brief"]["ground"] for s in gappy[1].data["stations"]}
    assert st["dale"]["counterpoise_m"] == pytest.approx(234 / 5.380 * 0.3048, abs=0.01)
    assert st["fell-team-with-a-long-name"]["radial_m"] == pytest.approx(13.26, abs=0.01)
    assert st["fell-team-with-a-long-name"]["radial_count"] >= 4
    assert st["base"]["counterpoise_m"] is None and st["base"]["radial_m"] is None


def test_antenna_per_channel(gappy, demos):
    for d in all_data(gappy, demos):
        for s in d["stations"]:
            rows = s["brief"]["antenna_by_channel"]
            assert [r["channel"] for r in rows] == [c["id"] for c in d["channels"]]
            for r in rows:
                assert r["antenna"] in s["antennas"] and set(r["gains_dbi"]) == set(s["antennas"])
                assert r["gains_dbi"][r["antenna"]] == max(r["gains_dbi"].values())
    # at near-vertical angles a horizontal wire beats a 3 m whip, whose pattern has a null straight up
    # (common practice, no source): the fell team rigs its inverted V on every channel
    fell = next(s for s in gappy[1].data["stations"] if s["id"] == "fell-team-with-a-long-name")
    assert {r["antenna"] for r in fell["brief"]["antenna_by_channel"]} == {"team-dipole"}
    assert "better than team-whip" in fell["brief"]["antenna_by_channel"][0]["why"]


def test_other_members_and_addresses(gappy):
    d = gappy[1].data
    by = {s["id"]: s["brief"] for s in d["stations"]}
    assert [m["station"] for m in by["dale"]["other_members"]] == ["fell-team-with-a-long-name"]
    assert by["dale"]["control"] == {"station": "base", "name": "Moor base", "address": "MRBASE"}
    assert by["dale"]["net_address"] == "MOORNET"
    assert {m["address"] for m in by["base"]["other_members"]} == {"MRFELL", "MRDALE"}


def test_fallback_uses_the_plans_instruction(gappy):
    hours = gappy[1].data["net_schedule"]["hours"]
    weak = [h for h in hours if h["weak"]]
    assert weak and all("call control by land line" in h["fallback"]["text"] for h in weak
                         if not h["fallback"]["channel"] or h["fallback"]["good_days_pct"] < 80)
    for h in weak:
        fb = h["fallback"]
        if fb["channel"] is None:
            assert fb["text"].startswith("no second channel works then")
        else:
            assert fb["good_days_pct"] > 0 and fb["channel"] == h["second"]


def test_weak_hours_read_as_the_issue_asks(gappy, demos):
    texts = [r["text"] for r in gappy[1].data["net_schedule"]["weak_runs"]]
    assert any("works on about 1 day in" in t and "expect to repeat calls" in t for t in texts)
    d = demos["danube-relief.yaml"]
    assert d["revision"]["label"]
    assert d["net"]["utc_offset_label"] == "UTC+1" and len(d["net"]["periods"]) == 1


def test_gap_in_a_cards_words(gappy, demos):
    for d in all_data(gappy, demos):
        addresses = {s["id"]: s["address"] for s in d["stations"]}
        for g in d["gaps"]:
            assert g["short"].startswith(g["local_by_period"][0] if len(d["net"]["periods"]) == 1 else g["utc_text"])
            assert "--" not in g["short"]  # addresses, not link ids
            if "any member" not in g["short"]:
                members = {x for lid in g["links"] for x in lid.split("--") if x != d["net"]["control"]}
                assert all(addresses[m] in g["short"] for m in members)
    assert "call control by land line" in gappy[1].data["gaps"][0]["short"]


def test_every_cut_length_also_in_feet_and_inches(gappy, demos):
    for d in all_data(gappy, demos):
        for a in d["antennas"]:
            cut = a.get("cut") or {}
            for key, value in cut.items():
                if key.endswith("_m") and isinstance(value, (int, float)):
                    ft = cut[key[:-2] + "_ft_in"]
                    feet, inches = re.match(r"(\d+) ft (\d+)", ft).groups()
                    assert (int(feet) * 12 + int(inches)) * 0.0254 == pytest.approx(value, abs=0.0254)


def test_gap_warnings_give_local_times_on_both_sides_of_a_clock_change(gappy):
    # the gappy net runs across 2027-03-28, when Europe/London moves from UTC to UTC+1
    gaps = [d for d in gappy[1].diagnostics if d.code == "channel-gap"]
    assert gaps
    for d in gaps:
        assert " UTC or " in d.message and " UTC+1 local (" in d.message, d.message
