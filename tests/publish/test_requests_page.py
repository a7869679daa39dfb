"""The Requests page and the request sheet beside the cards, on invented data (synthetic.synthetic_request).

The page exists exactly when plan.json's ``requests`` is not null, every page
of such a net links it, it shows plan.json's figures and escapes its text;
``build`` writes the one-page sheet ``<net>/request.pdf`` beside the cards,
the same bytes every time. The demo plans are checked in test_one_source.
"""

from __future__ import annotations

import copy
import io
from dataclasses import dataclass, field

import pdfplumber
import pytest

from requestcheck import check_requests_page, plain, table_rows, text_of
from sitecheck import broken_refs
from synthetic import INJECTION, synthetic_data, synthetic_request

from planpack import cli
from planpack.publish import site
from planpack.publish.requestpage import PAGE_NAME, SHEET_NAME

NET_PAGES = ("index.html", "schedule.html", "scan.html", "safety.html", "antennas.html", "link-ops--lake.html")


@pytest.fixture
def asked():
    return synthetic_request(synthetic_data())


def test_the_page_exists_exactly_when_plan_json_has_a_request(asked):
    quiet = synthetic_data("quiet-net")
    quiet["requests"] = None
    files = site.render_site([asked, quiet, synthetic_data("old-net")])
    assert f"test-net/{PAGE_NAME}" in files
    assert f"quiet-net/{PAGE_NAME}" not in files and f"old-net/{PAGE_NAME}" not in files
    for name in NET_PAGES:
        assert f'href="{PAGE_NAME}"'.encode() in files[f"test-net/{name}"], name
        assert f'href="{PAGE_NAME}"'.encode() not in files[f"quiet-net/{name}"], name
    assert b'aria-current="page">Requests</a>' in files[f"test-net/{PAGE_NAME}"]
    assert broken_refs(files) == []


def test_overview_and_schedule_point_at_the_request_from_their_gaps(asked):
    files = site.render_site([asked])
    overview = files["test-net/index.html"].decode()
    gaps = overview.split('id="h-gaps"', 1)[1].split("</section>", 1)[0]
    assert f'<a href="{PAGE_NAME}">What to ask the spectrum manager for</a>' in gaps
    assert plain(asked["requests"]["summary"]) in text_of(gaps)
    assert asked["gaps"][0]["short"] in text_of(gaps)
    schedule = files["test-net/schedule.html"].decode().split('id="h-gaps"', 1)[1].split("</section>", 1)[0]
    assert f'href="{PAGE_NAME}"' in schedule
    # a net without gaps says so on its overview
    quiet = synthetic_data("quiet-net")
    quiet["gaps"], quiet["requests"] = [], None
    assert b"No gaps: every link has a channel at every hour." in site.render_site([quiet])["quiet-net/index.html"]


def test_every_figure_is_plan_json(asked):
    page = site.render_site([asked])[f"test-net/{PAGE_NAME}"]
    check_requests_page(page, asked)
    text = page.decode()
    # the grouped line: two links served at the same hour share one line; the window of a single frequency
    assert "ops–ridge, ops–lake 05:00–06:00 UTC (06:00–07:00 local)" in text_of(text)
    assert "3125 kHz only" in text
    # links go to their own pages
    assert '<a href="link-ops--lake.html">ops–lake</a>' in text


def test_the_figures_follow_the_data_not_a_copy_of_it(asked):
    """Change the data, and the page changes with it: nothing on the page is fixed text."""
    d = copy.deepcopy(asked)
    r = d["requests"]
    r["proposals"][0].update(khz=2712.5, window_khz=[2700.0, 2737.5], worst_good_days=0.995, worst_good_days_pct=99,
                             net_channel_utc_hours=[])
    r["before"].update(gap_hours=7, unserved_pairs=5)
    r["target_good_days_pct"] = 80
    r["solver"].update(optimal=False, status="not proven optimal")
    page = site.render_site([d])[f"test-net/{PAGE_NAME}"]
    check_requests_page(page, d)
    assert "not proven optimal within its time limit of 60 s" in page.decode()


def test_a_request_that_closes_every_gap(asked):
    d = copy.deepcopy(asked)
    r = d["requests"]
    r["after"].update(gap_hours=0, unserved_pairs=0, utc_hours=[])
    r["unservable"] = []
    page = site.render_site([d])[f"test-net/{PAGE_NAME}"]
    check_requests_page(page, d)
    assert table_rows(page.decode(), "change")[2] == ["hours with a gap, UTC", "02:00–05:00", "none"]


def test_no_proposal_left_out_pairs_and_no_unservable(asked):
    d = copy.deepcopy(asked)
    r = d["requests"]
    r["left_out"] = [{"link": "ops--ridge", "utc_hours": [22, 23], "local_hours": ["23:00", "00:00"]}]
    r["after"]["left_out_pairs"] = 2
    r["solver"]["max_new"] = 1
    page = site.render_site([d])[f"test-net/{PAGE_NAME}"].decode()
    check_requests_page(page.encode(), d)
    assert "left out to keep to the number of frequencies asked for (--max 1)" in page
    r["proposals"], r["unservable"], r["merges"], r["left_out"] = [], [], [], []
    page = site.render_site([d])[f"test-net/{PAGE_NAME}"].decode()
    check_requests_page(page.encode(), d)
    assert "No new frequency to ask for" in page and 'id="asks"' not in page and 'id="never"' not in page


def test_plan_text_in_the_request_is_shown_as_text(asked):
    page = site.render_site([asked])[f"test-net/{PAGE_NAME}"].decode()
    assert "<script>" not in page
    assert page.count("&lt;script&gt;") >= 4  # summary, merge, reason, assumption
    hostile = copy.deepcopy(asked)
    hostile["requests"]["proposals"][0]["serves"][0]["link"] = '"><img src=x onerror=alert(1)>'
    page = site.render_site([hostile])[f"test-net/{PAGE_NAME}"].decode()
    assert "<img" not in page and "onerror=alert(1)&gt;" in page


def test_the_page_has_the_marking_and_revision_and_says_how_to_get_markdown_and_pdf(asked):
    files = site.render_site([asked], sheets={"test-net": SHEET_NAME})
    page = files[f"test-net/{PAGE_NAME}"].decode()
    assert page.count('class="marking marking-') == 2 and "EXERCISE ONLY" in page
    assert asked["revision"]["label"] in page and "test-net/marking.css" in files
    shown = text_of(page)
    assert "planpack request PLAN --format markdown" in shown and "planpack request PLAN --pdf FILE" in shown
    assert f'<a href="{SHEET_NAME}">' in page
    # the sheet is linked only when the build wrote one (serve, or a site rendered alone, has none)
    assert f'href="{SHEET_NAME}"' not in site.render_site([asked])[f"test-net/{PAGE_NAME}"].decode()
    # and never for a net without a request
    quiet = synthetic_data("quiet-net")
    assert f"quiet-net/{PAGE_NAME}" not in site.render_site([quiet], sheets={"quiet-net": SHEET_NAME})


def test_the_request_tables_have_captions_and_headers(asked):
    page = site.render_site([asked])[f"test-net/{PAGE_NAME}"].decode()
    for tid in ("asks", "change", "never"):
        table = page.split(f'id="{tid}"', 1)[1].split("</table>", 1)[0]
        assert "<caption" in table and '<th scope="col"' in table and '<th scope="row"' in table
        assert table_rows(page, tid)


# ---------------------------------------------------------------- the build writes the sheet


@dataclass(frozen=True)
class _Compiled:
    data: dict
    diagnostics: list = field(default_factory=list)


@pytest.fixture
def compiled_with_request(monkeypatch):
    """planpack's compile replaced: nets whose id ends in '-gaps' get the invented request."""
    def compile_plan(plan):
        d = synthetic_data(plan.net.id, title=plan.net.title, valid_from=plan.net.valid_from.isoformat(),
                           valid_to=plan.net.valid_to.isoformat())
        return _Compiled(synthetic_request(d) if plan.net.id.endswith("-gaps") else d)

    monkeypatch.setattr("planpack.workflow.cache.cached_compile", lambda plan, **kw: compile_plan(plan))


def _plan(tmp_path, net_id: str):
    from test_site_cli import small_plan

    return small_plan(tmp_path, f"{net_id}.yaml", net_id)


def _tree(folder) -> dict[str, bytes]:
    return {str(p.relative_to(folder)): p.read_bytes() for p in sorted(folder.rglob("*")) if p.is_file()}


def test_build_writes_the_one_page_sheet_beside_the_cards(tmp_path, compiled_with_request, fake_cards, capsys):
    plans = tmp_path / "plans"
    plans.mkdir()
    _plan(plans, "lake-gaps")
    _plan(plans, "calm-net")
    out = tmp_path / "site"
    assert cli.main(["build", str(plans), "--out", str(out), "--no-cache"]) == 0
    assert "1 request sheet" in capsys.readouterr().err
    sheet = out / "lake-gaps" / SHEET_NAME
    assert sheet.is_file() and not (out / "calm-net" / SHEET_NAME).exists()
    assert (out / "lake-gaps" / PAGE_NAME).is_file() and not (out / "calm-net" / PAGE_NAME).exists()
    assert f'<a href="{SHEET_NAME}">'.encode() in (out / "lake-gaps" / PAGE_NAME).read_bytes()
    assert (out / "lake-gaps" / "cards").is_dir()  # beside the cards
    with pdfplumber.open(io.BytesIO(sheet.read_bytes())) as pdf:
        assert len(pdf.pages) == 1
        text = pdf.pages[0].extract_text()
    assert text.count("EXERCISE ONLY") == 2
    data = synthetic_request(synthetic_data("lake-gaps"))
    assert data["revision"]["label"] in text
    for p in data["requests"]["proposals"]:
        assert f"{p['khz']:g} kHz" in text and f"{p['worst_good_days_pct']} %" in text
    # the same bytes again, and without the field cards the sheet (no field card) is still written
    again = tmp_path / "again"
    assert cli.main(["build", str(plans), "--out", str(again), "--no-cache", "-q"]) == 0
    assert _tree(again) == _tree(out)
    bare = tmp_path / "bare"
    assert cli.main(["build", str(plans), "--out", str(bare), "--no-cache", "--no-cards", "-q"]) == 0
    assert (bare / "lake-gaps" / SHEET_NAME).read_bytes() == sheet.read_bytes()
    assert not (bare / "lake-gaps" / "cards").exists()


def test_a_sheet_renderer_failure_writes_nothing(tmp_path, compiled_with_request, fake_cards, monkeypatch, capsys):
    plans = tmp_path / "plans"
    plans.mkdir()
    _plan(plans, "lake-gaps")
    out = tmp_path / "site"

    def broken(d, sheet="a4"):
        raise RuntimeError("sheet renderer broke")

    monkeypatch.setattr("planpack.publish.requestsheet.render_request_sheet", broken)
    assert cli.main(["build", str(plans), "--out", str(out), "--no-cache", "-q"]) == 3  # a bug, reported as one
    assert not out.exists()


def test_a_clock_change_is_named_and_utc_is_the_guide():
    d = synthetic_request(synthetic_data(clock_change=True))
    page = site.render_site([d])[f"test-net/{PAGE_NAME}"].decode()
    check_requests_page(page.encode(), d)
    assert "Local times on this page are at UTC+01:00 (Europe/Zurich). The clocks change on 2027-03-28" in page
    assert "The clocks change" not in site.render_site([synthetic_request(synthetic_data())])[f"test-net/{PAGE_NAME}"].decode()
