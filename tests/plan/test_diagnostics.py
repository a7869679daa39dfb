"""One failing plan per diagnostic code: the right code at the right line and column."""

from __future__ import annotations

import pytest

from planpack.plan import read_plan
from planpack.plan.diagnostics import CODES

from .conftest import BASE, position


def mutate(*pairs: tuple[str, str]) -> str:
    text = BASE
    for old, new in pairs:
        assert old in text, old
        text = text.replace(old, new, 1)
    return text


# (case id, plan text, expected code, needle whose position the diagnostic must point at, nth occurrence)
CASES = [
    ("tabs", mutate(("    name: Operations", "\tname: Operations")), "tab-character", "\tname", 1),
    ("syntax", mutate(("  title: Test net", "  title: [Test net")), "yaml-syntax", None, 1),
    ("duplicate-key", mutate(("    power_w: 100\n", "    power_w: 100\n    power_w: 50\n")), "duplicate-key", "power_w: 50", 1),
    ("bool-address", mutate(("address: RIDGE", "address: NO")), "yaml11-bool", "NO", 1),
    ("bool-title", mutate(("title: Test net", "title: yes")), "yaml11-bool", "yes", 1),
    ("sexagesimal-number", mutate(("power_w: 20", "power_w: 1:30")), "yaml11-sexagesimal", "1:30", 1),
    ("sexagesimal-text", mutate(('hours: "06:00-20:00"', "note: 8:00")), "yaml11-sexagesimal", "8:00", 1),
    ("underscore-number", mutate(("khz: 4520", "khz: 4_520")), "yaml11-number-form", "4_520", 1),
    ("octal-number", mutate(("khz: 4520", "khz: 0o4520")), "yaml11-number-form", "0o4520", 1),
    ("comma-number", mutate(("power_w: 20", "power_w: 1,000")), "number-comma", "1,000", 1),
    ("not-a-mapping", "- just\n- a list\n", "not-a-mapping", "- just", 1),
    ("version-missing", mutate(("planpack: 1\n", "")), "format-version", "net:", 1),
    ("version-wrong", mutate(("planpack: 1", "planpack: 2")), "format-version", "2", 1),
    ("missing-key", mutate(("    power_w: 20\n", "")), "missing-key", "name: Ridge team", 1),
    ("unknown-key", mutate(("    power_w: 20\n", "    power_w: 20\n    scan_rat: 2\n")), "unknown-key", "scan_rat", 1),
    ("wrong-type", mutate(("power_w: 20", "power_w: twenty")), "wrong-type", "twenty", 1),
    ("quoted-number", mutate(("power_w: 20", 'power_w: "20"')), "wrong-type", '"20"', 1),
    ("empty-value", mutate(("title: Test net", "title:")), "empty-value", "title:", 1),
    ("out-of-range", mutate(("lat: 52.52", "lat: 95")), "out-of-range", "95", 1),
    ("lon-out-of-range", mutate(("lon: 13.40", "lon: -181")), "out-of-range", "-181", 1),
    ("bad-choice", mutate(("noise: rural", "noise: rurall")), "bad-choice", "rurall", 1),
    ("bad-slug", mutate(("id: test-net", "id: Test_Net")), "bad-slug", "Test_Net", 1),
    ("bad-slug-path", mutate(("  ridge:\n", "  ../ridge:\n")), "bad-slug", "../ridge", 1),
    ("bad-date", mutate(("to: 2027-03-20", "to: 2027-02-30")), "bad-date", "2027-02-30", 1),
    ("bad-url", mutate(("  links: hub\n", "  links: hub\n  base_url: javascript:alert(1)\n")), "bad-url", "javascript", 1),
    ("not-for-kind", mutate(("    height_m: 7\n", "    height_m: 7\n    resistor_ohm: 800\n")), "not-for-kind", "800", 1),
    ("kind-needs", mutate(("    design_khz: 4520\n", "")), "missing-key", "kind: dipole", 1),
    ("date-order", mutate(("from: 2027-03-01", "from: 2027-04-01")), "date-order", "2027-04-01", 1),
    ("unknown-timezone", mutate(("Europe/Berlin", "Europe/Atlantis")), "unknown-timezone", "Europe/Atlantis", 1),
    ("solar-backwards", mutate(("{ssn: 60}", "{ssn: [120, 40]}")), "solar-range", "[120", 1),
    ("solar-too-high", mutate(("{ssn: 60}", "{ssn: 400}")), "out-of-range", "400", 1),
    ("f107-too-low", mutate(("{ssn: 60}", "{f107: 40}")), "out-of-range", "40}", 1),
    ("solar-both", mutate(("{ssn: 60}", "{ssn: 60, f107: 120}")), "wrong-type", "{ssn: 60, f107", 1),
    ("bad-locator", mutate(("JO62qm", "JZ62qm")), "bad-locator", "JZ62qm", 1),
    ("bad-locator-length", mutate(("JO62qm", "JO62q")), "bad-locator", "JO62q", 1),
    ("freq-out-of-band", mutate(("khz: 6950", "khz: 31000")), "freq-out-of-band", "31000", 1),
    ("freq-in-mhz", mutate(("khz: 6950", "khz: 6.95")), "freq-out-of-band", "6.95", 1),
    ("freq-duplicate", mutate(("khz: 6950", "khz: 4520")), "freq-duplicate", "4520", 2),
    ("freq-too-close", mutate(("khz: 6950", "khz: 4522")), "freq-too-close", "4522", 1),
    ("bad-hours", mutate(('"06:00-20:00"', '"6am-8pm"')), "bad-hours", '"6am-8pm"', 1),
    ("address-at", mutate(("address: RIDGE", "address: RID@GE")), "bad-address", "RID@GE", 1),
    ("address-wildcard", mutate(("address: RIDGE", "address: RID?")), "bad-address", "RID?", 1),
    ("address-lower", mutate(("address: RIDGE", "address: ridge")), "bad-address", "ridge", 2),
    ("address-long", mutate(("address: RIDGE", "address: ABCDEFGHIJKLMNOP")), "bad-address", "ABCDEFGHIJKLMNOP", 1),
    ("address-punct", mutate(("address: RIDGE", "address: RID-GE")), "bad-address", "RID-GE", 1),
    ("address-duplicate", mutate(("address: RIDGE", "address: OPS")), "address-duplicate", "OPS", 2),
    ("address-clash", mutate(("address: RIDGE", "address: TSTNET")), "address-clash", "TSTNET", 2),
    ("unknown-antenna", mutate(("    antenna: nvis\n    ground: {soil: wet", "    antenna: nvls\n    ground: {soil: wet")), "unknown-reference", "nvls", 1),
    ("unknown-link-station", mutate(("links: hub", "links: [[ops, ridgee]]")), "unknown-reference", "ridgee", 1),
    ("duplicate-channel-id", mutate(("id: C3", "id: C2")), "duplicate-id", "C2", 2),
    ("no-control", mutate(("    role: control\n", "")), "control-station", "hub", 1),
    ("two-controls", mutate(("    address: RIDGE\n", "    address: RIDGE\n    role: control\n")), "control-station", "control", 2),
    ("self-link", mutate(("links: hub", "links: [[ops, ops]]")), "bad-link", "[ops, ops]", 1),
    ("twice-link", mutate(("links: hub", "links: [[ops, ridge], [ridge, ops]]")), "bad-link", "[ridge, ops]", 1),
    ("unused-antenna", mutate(("antennas:\n", "antennas:\n  spare:\n    kind: whip\n    length_m: 3\n    height_m: 1\n")), "unused-antenna", "spare", 1),
    ("unknown-mode", mutate(("mode: usb}", "mode: fm}")), "unknown-mode", "fm", 1),
    ("complex-key", mutate(("    name: Operations\n", "    name: Operations\n    ? [a, b]\n    : 1\n")), "yaml-complex-key", "[a, b]", 1),
    ("tag", mutate(("title: Test net", "title: !!python/object:os.system x")), "yaml-tag", "!!python", 1),
    ("two-documents", BASE + "---\nplanpack: 1\n", "yaml-multiple-documents", "---", 1),
    ("clock-change", mutate(("to: 2027-03-20", "to: 2027-04-10")), "clock-change", "{from: 2027-03-01", 1),
    ("merge-key", mutate(("    height_m: 7\n", "    height_m: 7\n    <<: {wire_mm: 3}\n")), "yaml-merge-key", "<<", 1),
    ("bad-request", BASE + "request:\n  bands_khz: [[5000, 4000]]\n", "bad-request", "[5000, 4000]", 1),
]
#: Codes that are warnings: the plan still reads (``ok``).
WARNING_CODES = {"unused-antenna", "clock-change"}


@pytest.mark.parametrize("name,text,code,needle,nth", CASES, ids=[c[0] for c in CASES])
def test_each_problem_reported_where_it_is(write_plan, name, text, code, needle, nth):
    result = read_plan(write_plan(text))
    assert result.ok == (code in WARNING_CODES)
    found = [d for d in result.diagnostics if d.code == code]
    assert found, f"expected {code}, got {[d.format() for d in result.diagnostics]}"
    d = found[0]
    assert d.severity == ("warning" if code in WARNING_CODES else "error")
    if needle is not None:
        assert (d.line, d.column) == position(text, needle, nth), d.format()
    else:
        assert d.line > 0
    assert d.message.strip()


def test_unused_antenna_is_only_a_warning(write_plan):
    text = mutate(("antennas:\n", "antennas:\n  spare:\n    kind: whip\n    length_m: 3\n    height_m: 1\n"))
    result = read_plan(write_plan(text))
    assert result.ok
    assert [d.code for d in result.diagnostics] == ["unused-antenna"]


def test_messages_name_key_expected_and_arrived(write_plan):
    text = mutate(("power_w: 20", "power_w: twenty"))
    d = read_plan(write_plan(text)).diagnostics[0]
    assert "stations.ridge.power_w" in d.message and d.key == "stations.ridge.power_w"
    assert "expected a number" in d.message and "'twenty'" in d.message


def test_unknown_key_suggests_the_near_one(write_plan):
    text = mutate(("    power_w: 20\n", "    power_w: 20\n    scan_rat: 2\n"))
    d = next(d for d in read_plan(write_plan(text)).diagnostics if d.code == "unknown-key")
    assert "did you mean 'scan_rate'" in d.message


def test_every_code_is_exercised():
    tested = {c[2] for c in CASES}
    reading = {"file-unreadable", "file-too-large", "file-encoding", "nul-byte", "yaml-too-deep", "yaml-aliases",
               "yaml-too-many-nodes"}  # tested in test_reader_bounds.py
    analysis = {"channel-gap", "nvis-height", "nvis-whip", "wasted-channel",  # tested with compile
                "atmospheric-noise", "high-latitude",  # tests/acceptance/test_link_budget_trust.py
                "exposure-clearance",  # tests/test_briefing.py
                "antenna-loss", "antenna-geometry", "antenna-ends-low", "antenna-solve-failed",
                "antenna-unreliable"}  # tested in tests/antennas/test_station_setup.py
    bounded = {"plan-too-large"}  # tested in test_size_bounds.py
    publishing = {"cards-layout"}  # tested in tests/hardening/test_round_two.py
    assert set(CODES) - tested - reading - analysis - bounded - publishing == set()


def test_clock_change_names_the_date_and_both_offsets(write_plan):
    # Europe/Berlin leaves UTC+1 for UTC+2 on the last Sunday of March: 2027-03-28 (EU summer-time rule)
    result = read_plan(write_plan(mutate(("to: 2027-03-20", "to: 2027-04-10"))))
    (d,) = [d for d in result.diagnostics if d.code == "clock-change"]
    assert "2027-03-28" in d.message and "UTC+1 until 2027-03-27" in d.message and "UTC+2 from 2027-03-28" in d.message
    assert d.key == "net.valid"


def test_no_clock_change_no_warning(write_plan):
    assert not [d for d in read_plan(write_plan(BASE)).diagnostics if d.code == "clock-change"]
