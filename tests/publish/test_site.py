"""Rendering the site from a compiled plan: pages, links, escaping, schema, determinism."""

from __future__ import annotations

import hashlib
import html
import re
import json
import os
import subprocess
import sys
from pathlib import Path

import jsonschema
import pytest

from planpack.output_schema import output_schema
from planpack.publish import site
from synthetic import INJECTION, synthetic_data
from sitecheck import broken_refs, parse, svg_problems

REPO = Path(__file__).resolve().parents[2]


@pytest.fixture(scope="module")
def files():
    return site.render_site([synthetic_data(), synthetic_data("older-net", valid_from="2026-01-01", valid_to="2026-02-01",
                                                              station_name="Quiet hill", handling=None)])


def test_synthetic_fixture_follows_the_contract():
    jsonschema.validate(synthetic_data(), output_schema())


def test_every_page_exists(files):
    d = synthetic_data()
    expected = {"index.html", "assets/site.css"}
    for page in ("index.html", "schedule.html", "scan.html", "antennas.html", "safety.html", "plan.json",
                 "charts/map.svg", "marking.css"):
        expected.add(f"test-net/{page}")
    for ln in d["links"]:
        expected |= {f"test-net/link-{ln['id']}.html"}
    for st in d["stations"]:
        expected |= {f"test-net/station-{st['id']}.html"}
    for a in d["antennas"]:
        expected |= {f"test-net/antenna-{a['id']}.html", f"test-net/charts/antenna-{a['id']}-swr.svg",
                     f"test-net/charts/antenna-{a['id']}-pattern.svg", f"test-net/charts/antenna-{a['id']}-sketch.svg"}
    assert expected <= set(files)
    assert list(files) == sorted(files)


def test_every_internal_link_and_image_resolves(files):
    assert broken_refs(files) == []


def test_svg_is_well_formed_and_inert(files):
    assert svg_problems(files) == []


def test_no_script_no_inline_handlers_and_a_csp(files):
    for path, b in files.items():
        if not path.endswith(".html"):
            continue
        page = parse(b)
        assert "script" not in page.tags, path
        assert page.bad_attrs == [], path
        text = html.unescape(b.decode())
        assert "Content-Security-Policy" in text and "default-src 'none'" in text, path
        assert all(img.get("alt") for img in page.imgs), path
        assert "<table" not in text or ("<caption" in text and 'scope="col"' in text), path


def test_plan_json_is_the_data_and_validates(files):
    raw = files["test-net/plan.json"]
    loaded = json.loads(raw)
    jsonschema.validate(loaded, output_schema())
    assert loaded == synthetic_data()
    assert raw == (json.dumps(synthetic_data(), indent=2, sort_keys=True, ensure_ascii=False) + "\n").encode()


def test_injection_in_a_station_name_is_text(files):
    escaped = "&lt;script&gt;alert(1)&lt;/script&gt;"
    overview = files["test-net/index.html"].decode()
    assert escaped in overview
    for path, b in files.items():
        if path.endswith((".html", ".svg")):
            assert INJECTION.encode() not in b, path
    assert escaped.encode() in files["test-net/charts/map.svg"] or b"ridge" in files["test-net/charts/map.svg"]


def test_instructions_markdown_has_no_raw_html_no_script_links_no_images(files):
    scan = files["test-net/scan.html"].decode()
    assert "<strong>Check in</strong>" in scan
    assert "&lt;b&gt;raw&lt;/b&gt;" in scan
    page = parse(files["test-net/scan.html"])
    assert not any(url.lower().startswith("javascript") for _, url, _ in page.refs)
    assert "img" not in page.tags  # an image would be fetched from outside


def test_handling_marking_top_bottom_and_in_print_css(files):
    page = files["test-net/schedule.html"].decode()
    assert page.count("EXERCISE ONLY") == 2
    assert page.index("marking-top") < page.index("<main") < page.index("marking-bottom")
    css = files["test-net/marking.css"].decode()
    assert "@top-center" in css and "@bottom-center" in css and '"EXERCISE ONLY"' in css
    assert "older-net/marking.css" not in files  # no handling given, no marking


def test_marking_css_cannot_break_out():
    css = site.marking_css('x"; } body { display:none } /* \\ </style>')
    for line in css.splitlines():
        if "content:" in line:
            m = re.fullmatch(r'\s*@(top|bottom)-center \{ content: ("(?:[^"\\]|\\.)*"); font: [^;]*; color: #000; \}', line)
            assert m, line
    assert "<" not in css and css.count("{") == css.count("}")


def test_index_lists_nets_newest_first_with_counts(files):
    index = files["index.html"].decode()
    assert index.index("Lakeside exercise net") < index.index("older-net")
    d = synthetic_data()
    row = index.split('href="test-net/index.html"')[1].split("</tr>")[0]
    cells = [c.split("<")[0] for c in row.split('<td class="n">')[1:]]
    assert cells[:3] == [str(len(d["stations"])), str(len(d["channels"])), str(len(d["links"]))]
    assert ">1</a>" in row  # one warning, linked


def test_schedule_rows_equal_the_net_schedule(files):
    d = synthetic_data()
    page = files["test-net/schedule.html"].decode()
    body = page.split('id="net-schedule"')[1].split("</tbody>")[0].split("<tbody>")[1]
    rows = body.split("</tr>")[:-1]
    assert len(rows) == 24
    for r, h in zip(rows, d["net_schedule"]["hours"]):
        assert f'<th scope="row" class="t">{h["local_time"]}</th>' in r
        assert f'<td class="t">{h["utc_hour"]:02d}:00</td>' in r
        first = h["first"]
        assert (f"<b>{first}</b>" in r) if first else "no channel" in r
        # every hour shows its percent; a weak hour says so in a word, with what to do instead
        if first:
            assert f'{h["good_days_pct"]} %' in r
        assert ("weak-tag" in r) == h["weak"]
        if h["weak"]:
            assert html.escape(h["fallback"]["text"], quote=False) in r


def test_cut_sheet_shows_metres_and_the_plans_feet_inches(files):
    page = files["test-net/antenna-main-dipole.html"].decode()
    assert "41.06 m" in page and "134 ft 8 1/2 in" in page and "20.53 m" in page and "67 ft 4 1/4 in" in page
    assert "1:1 current balun" in page
    invv = files["test-net/antenna-field-invv.html"].decode()
    # no feet-inches text in the data: formatted from metres (14.2 m = 46.59 ft = 46 ft 7 in)
    assert "14.20 m" in invv and "46 ft 7 in" in invv


def test_safety_page_has_cautions_distances_and_deferral(files):
    page = files["test-net/safety.html"].decode()
    assert "power lines" in page and "lightning" in page
    assert "local codes" in page and "licensed practice" in page
    assert "2.5 m" in page and "1.1 m" in page


def test_canonical_only_for_http_base_url():
    d = synthetic_data()
    d["net"]["base_url"] = "javascript:alert(1)//"
    files = site.render_site([d])
    assert b"javascript:" not in files["test-net/index.html"]
    d["net"]["base_url"] = "https://intranet.example/nets/"
    files = site.render_site([d])
    assert b'<link rel="canonical" href="https://intranet.example/nets/test-net/schedule.html">' in files["test-net/schedule.html"]


def test_hostile_ids_cannot_leave_the_net_folder():
    d = synthetic_data("../../etc")
    d["links"][0]["id"] = "../../../escape"
    d["antennas"][0]["id"] = "a/b\\c"
    files = site.render_site([d])
    for path in files:
        assert ".." not in path.split("/") and "\\" not in path
    assert broken_refs(files) == []


def test_duplicate_net_ids_are_refused():
    with pytest.raises(ValueError, match="share the net id"):
        site.render_site([synthetic_data(), synthetic_data()])


def test_same_input_same_bytes_in_another_process():
    here = site.render_site([synthetic_data()])
    digest = hashlib.sha256(b"".join(k.encode() + b"\0" + v for k, v in here.items())).hexdigest()
    code = ("import hashlib,sys; sys.path.insert(0, 'tests/publish'); from synthetic import synthetic_data;"
            "from planpack.publish import site; f = site.render_site([synthetic_data()]);"
            "print(hashlib.sha256(b''.join(k.encode() + b'\\0' + v for k, v in f.items())).hexdigest())")
    env = dict(os.environ, PYTHONHASHSEED="12345")
    env.pop("SOURCE_DATE_EPOCH", None)
    other = subprocess.run([sys.executable, "-c", code], cwd=REPO, env=env, capture_output=True, text=True, check=True)
    assert other.stdout.strip() == digest


def test_source_date_epoch_sets_the_shown_date(monkeypatch):
    monkeypatch.setenv("SOURCE_DATE_EPOCH", "1800000000")  # 2027-01-15 UTC
    page = site.render_site([synthetic_data()])["test-net/index.html"].decode()
    assert "Issue c-1a2b3c4d5e6f, undated" in page  # the compiled label is printed as it is: never re-dated here
    d = synthetic_data()
    del d["revision"]["label"]  # an older plan.json: the id and the date
    assert "c-1a2b3c4d5e6f (content hash), 2027-01-15" in site.render_site([d])["test-net/index.html"].decode()
    d["revision"] = {"id": "3f2a91c", "kind": "git", "date": "2027-02-02", "number": 14, "issue_date": "2027-02-02",
                     "label": "Rev 14 of 2027-02-02 (3f2a91c)"}
    files = site.render_site([d])
    for path, b in files.items():  # the readable revision on every page, header and footer
        if path.startswith("test-net/") and path.endswith(".html"):
            assert b.decode().count("Rev 14 of 2027-02-02 (3f2a91c)") == 2, path


def test_cards_are_linked_when_given():
    files = site.render_site([synthetic_data()], cards={"test-net": ["b.pdf", "a.pdf"]})
    page = files["test-net/index.html"].decode()
    assert page.index('href="cards/a.pdf"') < page.index('href="cards/b.pdf"')


def test_demo_plans_render():
    compile_mod = pytest.importorskip("planpack.compile")
    from planpack.plan import read_plan

    datas = []
    for path in sorted((REPO / "plans").glob("*.yaml")):
        r = read_plan(str(path))
        assert r.ok, [d.format() for d in r.diagnostics]
        datas.append(compile_mod.compile_plan(r.plan).data)
    files = site.render_site(datas)
    assert broken_refs(files) == [] and svg_problems(files) == []
    for d in datas:
        jsonschema.validate(json.loads(files[f"{d['net']['id']}/plan.json"]), output_schema())
    assert site.render_site(datas) == files


def test_overview_gap_hours_come_from_plan_json_and_never_say_none_for_a_link_with_gaps(files):
    d = synthetic_data()
    page = files["test-net/index.html"].decode()
    rows = page.split('id="ln-cap"')[1].split("</tbody>")[0].split("<tr>")[2:]
    assert len(rows) == len(d["links"])
    for r, ln in zip(rows, d["links"]):
        assert f">{ln['id']}</a>" in r
        if ln["gap_utc_hours"]:
            assert "none" not in r and f"{ln['gap_utc_text']} UTC" in r and "gap-tag" in r
        else:
            assert ">none<" in r


def test_weak_hours_in_plain_words_on_the_overview_and_schedule(files):
    d = synthetic_data()
    assert d["net_schedule"]["weak_runs"]
    for name in ("index.html", "schedule.html"):
        page = html.unescape(files[f"test-net/{name}"].decode())
        for run in d["net_schedule"]["weak_runs"]:
            assert run["text"] in page, name


def test_link_page_is_a_timetable_not_a_frequency_chart(files):
    d = synthetic_data()
    ln = d["links"][1]
    page = files[f"test-net/link-{ln['id']}.html"].decode()
    assert "<img" not in page.split("<main")[1]  # no chart as the main view
    for word in ("MUF", "OWF", "LUF"):
        assert f">{word}<" not in page  # no MUF/OWF/LUF columns
    body = page.split('id="link-grid"')[1].split("<tbody>")[1].split("</tbody>")[0]
    rows = body.split("</tr>")[:-1]
    assert len(rows) == 24
    order = [c["id"] for c in sorted(d["channels"], key=lambda c: c["freq_khz"])]
    for r, h in zip(rows, ln["hours"]):
        cells = re.findall(r'<td class="c ([^"]*)" title="([^"]*)">(?:<span class="mk" aria-hidden="true">(.)</span>)?([^<]*)</td>', r)
        assert len(cells) == len(order)
        by = {c["channel"]: c for c in h["channels"]}
        for cid, (classes, title, mark, text) in zip(order, cells):
            cell = by[cid]
            if not cell["allowed"]:
                assert "na" in classes.split() and text == "–"
                continue
            assert text == str(cell["good_days_pct"])  # the whole percent from plan.json
            assert ("win" in classes.split()) == cell["in_window"]
            assert (mark == "◆") == (h["first"] == cid)
        assert ("weak-tag" in r) == h["weak"]


def test_station_pages_say_which_antenna_which_way_and_the_ground(files):
    d = synthetic_data()
    for s in d["stations"]:
        page = html.unescape(re.sub(r"<[^>]+>", "", files[f"test-net/station-{s['id']}.html"].decode()))
        b = s["brief"]
        if len(s["antennas"]) > 1:
            for r in b["antenna_by_channel"]:
                assert r["why"] in page
        else:
            assert f"Rig {s['antennas'][0]} on every channel" in page
        for w in b["wire_runs"]:
            assert w["text"] in page
        if b["to_control"]:
            assert f"{b['to_control']['bearing_deg']:.0f}° ({b['to_control']['compass']}), {b['to_control']['distance_km']:.1f} km" in page
        assert b["ground"]["text"] in page and b["exposure"]["text"] in page
        for m in b["other_members"]:
            assert m["address"] in page


def test_swr_is_printed_from_swr_text():
    d = synthetic_data()
    d["antennas"][0]["channels"][0].update({"swr": 235.0, "swr_text": "> 50:1"})
    files = site.render_site([d])
    page = files[f"test-net/antenna-{d['antennas'][0]['id']}.html"].decode()
    assert "&gt; 50:1" in page and "235.0:1" not in page
    assert "235" not in files[f"test-net/charts/antenna-{d['antennas'][0]['id']}-swr.svg"].decode()


def test_clock_change_gives_two_local_columns_headed_with_dates():
    d = synthetic_data("clock-net", clock_change=True)
    files = site.render_site([d])
    page = files["clock-net/schedule.html"].decode()
    assert "Local UTC+1 to 27 Mar" in page and "Local UTC+2 from 28 Mar" in page
    assert "The clocks change on 2027-03-28" in page
    body = page.split('id="net-schedule"')[1].split("<tbody>")[1].split("</tbody>")[0]
    first = body.split("</tr>")[0]
    assert '<th scope="row" class="t">01:00</th>' in first and '<td class="t">02:00</td>' in first
    overview = files["clock-net/index.html"].decode()
    assert "UTC+1 / UTC+2" in overview
