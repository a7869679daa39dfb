"""planpack request end to end: the command line, the JSON contract, the PDF sheet, and what compile makes of it."""

from __future__ import annotations

import contextlib
import copy
import io
import json
import os

import jsonschema
import pdfplumber
import pytest

from planpack import cli
from planpack.compile import compile_plan
from planpack.plan import read_plan
from planpack.publish.requestsheet import render_request_sheet
from planpack.requests import contract, report
from planpack.requests.coverage import allowed_hours, gap_pairs
from tests.requests.plans import HIGH_BAND_NVIS, write

REPO = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
DEMO = os.path.join(os.path.dirname(os.path.abspath(__file__)), "gappy_net.yaml")

NO_GAPS = """\
planpack: 1
net:
  id: short-hop
  title: Two posts in one valley
  timezone: Europe/Berlin
  valid: {from: 2027-06-01, to: 2027-06-20}
  solar: {ssn: 80}
  links: hub
  target_good_days: 0.6
stations:
  base:
    name: Valley base
    address: VBASE
    role: control
    at: {lat: 47.50, lon: 11.00}
    power_w: 100
    noise: quiet-rural
    antenna: whip
    ground: {soil: wet, system: radials}
  post:
    name: Valley post
    address: VPOST
    at: {lat: 47.55, lon: 11.08}
    power_w: 100
    noise: quiet-rural
    antenna: whip
    ground: {soil: wet, system: radials}
channels:
  - {id: V1, khz: 3310, mode: usb}
  - {id: V2, khz: 4620, mode: usb}
  - {id: V3, khz: 5870, mode: usb}
antennas:
  whip:
    kind: whip
    length_m: 8
    height_m: 0.5
"""


def run(capsys, *argv) -> tuple[int, str, str]:
    code = cli.main(["request", "-q", *argv])
    out = capsys.readouterr()
    return code, out.out, out.err


def request_json(capsys, *argv) -> dict:
    code, out, err = run(capsys, *argv, "--format", "json")
    assert code == 0, err
    return json.loads(out)


def with_channels(text: str, proposals: list[dict], mode: str) -> str:
    new = "".join(f"  - {{id: RQ{i + 1}, khz: {p['khz']:g}, mode: {mode}}}\n" for i, p in enumerate(proposals))
    return text.replace("channels:\n", "channels:\n" + new, 1)


def compiled_gaps(path: str):
    r = read_plan(path)
    assert r.ok, [d.format() for d in r.diagnostics]
    pred = compile_plan(r.plan, cells=False).arrays
    return gap_pairs(pred.good_days, allowed_hours(r.plan), pred.luf_mhz, pred.owf_mhz,
                     r.plan.net.target_good_days, pred.margin_db)


@pytest.fixture(scope="module")
def demo_run(tmp_path_factory):
    """The demo plan's request: one run of the command, JSON on stdout and the sheet beside it."""
    pdf = tmp_path_factory.mktemp("sheet") / "request.pdf"
    buf = io.StringIO()
    with contextlib.redirect_stdout(buf):
        code = cli.main(["request", "-q", DEMO, "--format", "json", "--pdf", str(pdf)])
    assert code == 0
    return json.loads(buf.getvalue()), pdf


@pytest.fixture(scope="module")
def demo(demo_run):
    return demo_run[1]


@pytest.fixture(scope="module")
def demo_data(demo_run):
    return demo_run[0]


@pytest.fixture(scope="module")
def nvis(tmp_path_factory):
    return write(tmp_path_factory.mktemp("nvis"), HIGH_BAND_NVIS)


# ---------------------------------------------------------------- what is proposed

def test_high_band_nvis_plan_gets_a_night_channel_between_2_and_5_mhz(capsys, nvis):
    d = request_json(capsys, nvis)
    assert d["before"]["gap_hours"] > 0
    night = {22, 23, 0, 1, 2, 3}  # UTC, January in Bavaria: local night
    low = [p for p in d["proposals"] if 2000 <= p["khz"] <= 5000]
    assert low, d["proposals"]
    served = {(s["link"], h) for p in low for s in p["serves"] for h in s["utc_hours"]}
    short = {(u["link"], h) for u in d["unservable"] for h in u["utc_hours"]}
    night_pairs = {(f"base--{t}", h) for t in ("north", "east", "south") for h in night}
    assert served & night_pairs                      # the proposal carries the night where physics allows
    assert night_pairs <= served | short             # and every other night pair is listed with its reason
    for p in d["proposals"]:
        assert p["window_khz"][0] <= p["khz"] <= p["window_khz"][1]


def test_the_demo_request_says_what_closes_and_what_cannot(demo_data):
    d = demo_data
    assert d["solver"]["optimal"] and d["solver"]["status"] == "optimal"
    assert d["proposals"] and d["after"]["unserved_pairs"] < d["before"]["unserved_pairs"]
    assert d["after"]["gap_hours"] <= d["before"]["gap_hours"]
    assert d["solver"]["pairs_served"] == d["solver"]["pairs_servable"]  # fewest mode serves all it can
    for u in d["unservable"]:
        assert u["message"].endswith(".") and u["reason"] in {
            "not_authorised", "luf_above_muf", "above_muf", "outside_bands", "short_of_target"}
    served = {(s["link"], h) for p in d["proposals"] for s in p["serves"] for h in s["utc_hours"]}
    never = {(u["link"], h) for u in d["unservable"] for h in u["utc_hours"]}
    assert not served & never


def test_before_counts_the_pairs_plan_json_gaps_name(demo_data):
    c = compile_plan(read_plan(DEMO).plan, cells=False)
    hours = sorted({h for g in c.data["gaps"] for h in g["utc_hours"]})
    assert demo_data["before"]["utc_hours"] == hours
    most = sum(len(g["links"]) * len(g["utc_hours"]) for g in c.data["gaps"])
    assert sum(len(g["utc_hours"]) for g in c.data["gaps"]) <= demo_data["before"]["gap_hours"] <= most


def test_max_1_gives_exactly_one_proposal(capsys, nvis):
    d = request_json(capsys, DEMO, "--max", "1")
    assert len(d["proposals"]) == 1
    assert d["solver"]["mode"] == "most" and d["solver"]["max_new"] == 1
    assert d["left_out"] and d["after"]["left_out_pairs"] > 0
    d1 = request_json(capsys, nvis, "--max", "1")
    assert len(d1["proposals"]) == 1


def test_output_is_deterministic(capsys, nvis, demo_data):
    a = run(capsys, nvis, "--format", "json")[1]
    b = run(capsys, nvis, "--format", "json")[1]
    assert a == b
    assert render_request_sheet(demo_data) == render_request_sheet(demo_data)


def test_parallel_predictions_give_the_same_request(nvis, monkeypatch):
    from planpack.plan.diagnostics import Collector
    from planpack.requests import coverage
    from planpack.requests.engine import plan_requests
    from planpack.stationsetup import solve_station_antennas

    plan = read_plan(nvis).plan
    setup = solve_station_antennas(plan, Collector(nvis))
    serial = plan_requests(plan, setup, workers=1)
    monkeypatch.setattr(coverage, "BLOCK_LINKS", 1)  # three links: three blocks over two processes
    assert plan_requests(plan, setup, workers=2) == serial


# ---------------------------------------------------------------- end to end through compile

def test_adding_the_proposals_keeps_what_after_promised(demo_data, tmp_path):
    text = open(DEMO, encoding="utf-8").read()
    path = write(tmp_path, with_channels(text, demo_data["proposals"], demo_data["mode"]["id"]), "with-requests.yaml")
    after = compiled_gaps(path)
    assert after.gap_hours <= demo_data["after"]["gap_hours"]
    assert len(after.need) <= demo_data["after"]["unserved_pairs"]


def test_adding_the_proposals_closes_the_high_band_plans_night(capsys, nvis, tmp_path):
    d = request_json(capsys, nvis)
    text = open(nvis, encoding="utf-8").read()
    after = compiled_gaps(write(tmp_path, with_channels(text, d["proposals"], d["mode"]["id"]), "with-requests.yaml"))
    assert after.gap_hours <= d["after"]["gap_hours"]


# ---------------------------------------------------------------- formats

def test_json_contract(demo_data):
    jsonschema.validate(demo_data, contract.SCHEMA)
    d = demo_data
    for p in d["proposals"]:
        assert isinstance(p["khz"], float) and len(p["window_khz"]) == 2
        assert all(set(s) >= {"link", "utc_hours"} for s in p["serves"])
    assert isinstance(d["before"]["gap_hours"], int) and isinstance(d["after"]["gap_hours"], int)
    assert isinstance(d["unservable"], list) and isinstance(d["solver"], dict)
    bad = copy.deepcopy(d)
    bad["proposals"][0]["window_khz"] = [3000]
    with pytest.raises(jsonschema.ValidationError):
        jsonschema.validate(bad, contract.SCHEMA)


def test_text_and_markdown(capsys, demo_data):
    t = report.text(demo_data)
    assert "Ask for" in t and "Before:" in t and "After:" in t and "Solver: HiGHS" in t
    md = report.markdown(demo_data)
    assert md.startswith("## Frequency request")
    assert "| | frequency | window |" in md and "**After:**" in md
    hostile = copy.deepcopy(demo_data)
    hostile["net"]["title"] = "<script>alert(1)</script> | *x*"
    assert "<script>" not in report.markdown(hostile)


def test_pdf_sheet_is_one_page_with_marking_and_revision(demo, demo_data):
    with pdfplumber.open(str(demo)) as pdf:
        assert len(pdf.pages) == 1
        text = pdf.pages[0].extract_text()
    assert text.count("EXERCISE ONLY") == 2  # top and bottom, as on the cards
    assert demo_data["revision"]["label"] in text  # as the cards and the site print it
    assert all(report.khz(p["khz"]) in text for p in demo_data["proposals"])


def test_a_long_request_still_fits_one_page(demo_data):
    d = copy.deepcopy(demo_data)
    d["proposals"] = [dict(p, id=f"R{i + 1}") for i, p in enumerate(d["proposals"] * 12)]
    d["unservable"] = d["unservable"] * 10
    with pdfplumber.open(io.BytesIO(render_request_sheet(d, "letter"))) as pdf:
        assert len(pdf.pages) == 1
        assert "leaves out" in pdf.pages[0].extract_text()


# ---------------------------------------------------------------- no gaps, bad input

def test_a_plan_with_no_gaps_says_so_and_exits_0(capsys, tmp_path):
    path = write(tmp_path, NO_GAPS)
    code, out, err = run(capsys, path)
    assert code == 0, err
    assert "no gaps" in out and "Ask for" not in out
    d = request_json(capsys, path)
    assert d["proposals"] == [] and d["before"]["gap_hours"] == 0 and d["after"]["gap_hours"] == 0


@pytest.mark.parametrize("argv, words", [
    (["--bands", "5000-4000"], "--bands"),
    (["--bands", "2175-2190"], "--bands"),
    (["--exclude", "1500-30000"], "--exclude"),
    (["--mode", "psk31"], "--mode"),
    (["--step", "0"], "--step"),
    (["--step", "0.5"], "--step"),
    (["--bands", "lots"], "--bands"),
    (["--max", "0"], "--max"),
    (["--pdf", "request.txt"], "--pdf"),
])
def test_bad_options_exit_2_naming_the_option(capsys, tmp_path, argv, words):
    path = write(tmp_path, NO_GAPS.replace("target_good_days: 0.6", "target_good_days: 0.99"))
    code, out, err = run(capsys, path, *argv)
    assert code == 2 and words in err and out == ""
    assert "Traceback" not in err


def test_plans_with_errors_exit_1_with_positions(capsys, tmp_path):
    path = write(tmp_path, NO_GAPS + "request:\n  bands_khz: [[5000, 4000]]\n")
    code, out, err = run(capsys, path)
    assert code == 1 and out == ""
    assert f":{NO_GAPS.count(chr(10)) + 2}:15:" in err and "request.bands_khz[0]" in err and "inverted" in err
    code, _, err = run(capsys, str(tmp_path))
    assert code == 2 and "one plan file" in err
    code, _, err = run(capsys, str(tmp_path / "missing.yaml"))
    assert code == 2


def test_check_gap_warnings_point_at_planpack_request():
    c = compile_plan(read_plan(DEMO).plan, cells=False)
    gaps = [d for d in c.diagnostics if d.code == "channel-gap"]
    assert gaps and all(d.message.endswith("Run 'planpack request PLAN' for the fewest new frequencies to ask for.")
                        for d in gaps)
