"""One source of truth: the site, the field cards and plan.json say the same thing.

For the demo plans and an invented net with gaps across a clock change
(synthetic.GAPPY_PLAN), the site's pages (HTML) and the cards (their PDF text,
read back with pdfplumber) are checked against plan.json: the gap hours of
every link, the percent and weak mark of every hour, the second choices, the
scan-list status of every channel, the UTC offset and the revision.
"""

from __future__ import annotations

import html
import re
from pathlib import Path

import pytest

from cardread import open_pdf, page_texts, timetable
from synthetic import GAPPY_PLAN

from planpack.compile import compile_plan
from planpack.plan import read_plan
from planpack.publish import cards, site

REPO = Path(__file__).resolve().parents[2]
NO_LINK = re.compile(r"serves no\b.*\blink\b")  # a wrapped note's words may interleave with the row's others


@pytest.fixture(scope="module")
def built(tmp_path_factory):
    """[(plan.json data, site files, card files)] for the demo plans and the invented gappy net."""
    folder = tmp_path_factory.mktemp("one-source")
    (folder / "moor-gaps.yaml").write_text(GAPPY_PLAN)
    paths = sorted((REPO / "plans").glob("*.yaml")) + [folder / "moor-gaps.yaml"]
    datas = []
    for p in paths:
        r = read_plan(str(p))
        assert r.ok, [d.format() for d in r.diagnostics]
        datas.append(compile_plan(r.plan).data)
    files = site.render_site(datas)
    return [(d, files, cards.render_cards(d)) for d in datas]


def _text(b: bytes) -> str:
    """A page's visible text, tags dropped, entities decoded, whitespace made single spaces."""
    body = b.decode().split("<main", 1)[1]
    return " ".join(html.unescape(re.sub(r"<[^>]+>", " ", body)).split())


def _flat(s: str) -> str:
    return " ".join(s.replace("\xa0", " ").split())


def _table_rows(page: bytes, table_id: str) -> list[list[str]]:
    """The body rows of an HTML table as lists of cell texts."""
    body = page.decode().split(f'id="{table_id}"', 1)[1].split("<tbody>", 1)[1].split("</tbody>", 1)[0]
    rows = []
    for tr in body.split("</tr>")[:-1]:
        cells = re.findall(r"<t[hd][^>]*>(.*?)</t[hd]>", tr, re.S)
        rows.append([" ".join(html.unescape(re.sub(r"<[^>]+>", " ", c)).split()) for c in cells])
    return rows


def test_gap_hours_per_link_agree_on_overview_link_pages_and_net_card(built):
    for d, files, pdfs in built:
        net = d["net"]["id"]
        overview = _table_rows(files[f"{net}/index.html"], "ln-cap")
        assert [r[0] for r in overview] == [ln["id"] for ln in d["links"]]
        for row, ln in zip(overview, d["links"]):
            if ln["gap_utc_hours"]:
                assert row[1].startswith(f"gaps {ln['gap_utc_text']} UTC"), (net, row)
            else:
                assert row[1] == "none", (net, row)
            page = _text(files[f"{net}/link-{ln['id']}.html"])
            assert (f"Gap hours on this link: {ln['gap_utc_text']} UTC" in page) == bool(ln["gap_utc_hours"])
        # the net card: every gap in the same words, and a cross in a station's column exactly at its link's gap hours
        card = _flat(" ".join(page_texts(pdfs["net-control.pdf"])))
        for g in d["gaps"]:
            assert _flat(g["short"]) in card, (net, g["short"])
        crosses = _net_card_crosses(pdfs["net-control.pdf"], d)
        control = d["net"]["control"]
        for ln in d["links"]:
            member = ln["to"] if ln["from"] == control else ln["from"]
            address = next(s["address"] for s in d["stations"] if s["id"] == member)
            # a station without a column follows the net channel at every hour: it has no gap hours
            assert crosses.get(address, set()) == set(ln["gap_utc_hours"]), (net, ln["id"])


def _net_card_crosses(pdf: bytes, d: dict) -> dict[str, set[int]]:
    """UTC hours with a cross (gap) in each station column of the net card's timetable, by ALE address."""
    out: dict[str, set[int]] = {}
    with open_pdf(pdf) as doc:
        page = doc.pages[0]
        columns: dict[float, list[dict]] = {}
        for c in page.chars:
            if not c.get("upright", True):
                columns.setdefault(round(c["x0"], 0), []).append(c)
        heads = {"".join(c["text"] for c in sorted(cs, key=lambda c: -c["top"])): (cs[0]["x0"] + cs[0]["x1"]) / 2
                 for cs in columns.values()}
        addresses = {s["address"] for s in d["stations"]}
        heads = {a: x for a, x in heads.items() if a in addresses}
        assert heads, "no station columns found on the net card"
        table = timetable(page)
        rows = table.rows
        for a in heads:
            out[a] = set()
        for i, row in enumerate(rows):
            bottom = rows[i + 1].top if i + 1 < len(rows) else row.top + 12
            for c in page.chars:
                if c["text"] == "✕" and row.top - 2 <= c["top"] < bottom - 2:
                    x = (c["x0"] + c["x1"]) / 2
                    a = min(heads, key=lambda k: abs(heads[k] - x))
                    if abs(heads[a] - x) < 6:
                        out[a].add(int(row.utc))
    return out


def test_every_hour_agrees_on_site_schedule_station_pages_and_cards(built):
    for d, files, pdfs in built:
        net = d["net"]["id"]
        n_periods = len(d["net"]["periods"])
        # the net: schedule page and net card
        rows = _table_rows(files[f"{net}/schedule.html"], "net-schedule")
        _same_hours(rows, d["net_schedule"]["hours"], n_periods, net)
        with open_pdf(pdfs["net-control.pdf"]) as doc:
            _same_card_hours(timetable(doc.pages[0]), d["net_schedule"]["hours"], n_periods, f"{net} net card")
        # each member: its station page and its own card front
        for s in d["stations"]:
            if s["role"] == "control":
                continue
            hours = s["brief"]["hours"]
            _same_hours(_table_rows(files[f"{net}/station-{s['id']}.html"], "station-schedule"), hours, n_periods,
                        f"{net}/{s['id']}")
            with open_pdf(pdfs[f"{s['id']}.pdf"]) as doc:
                _same_card_hours(timetable(doc.pages[0]), hours, n_periods, f"{net}/{s['id']} card")


def _same_hours(rows: list[list[str]], hours: list[dict], n_periods: int, where: str) -> None:
    assert len(rows) == 24, where
    for cells, h in zip(rows, hours):
        assert cells[:n_periods] == h["local_times"], where
        assert cells[n_periods] == f"{h['utc_hour']:02d}:00", where
        channel, works, second, second_works, fails = cells[n_periods + 1:]
        assert channel.split()[0] == (h["first"] or "no"), where
        if h["first"]:
            assert works.split()[:2] == [str(h["good_days_pct"]), "%"], (where, h["utc_hour"])
        assert ("weak" in works.split()) == h["weak"], (where, h["utc_hour"])
        useful = (h["second_good_days_pct"] or 0) > 0
        assert second.split()[0] == (h["second"] if useful else "–"), (where, h["utc_hour"])
        if useful:
            assert second_works == f"{h['second_good_days_pct']} %"
        assert fails == ((h["fallback"] or {}).get("text") or ""), (where, h["utc_hour"])


def _same_card_hours(table, hours: list[dict], n_periods: int, where: str) -> None:
    assert table is not None, f"{where}: no timetable"
    by_utc = {int(r.utc): r for r in table.rows if r.utc.isdigit()}
    assert sorted(by_utc) == list(range(24)), where
    for h in hours:
        r = by_utc[h["utc_hour"]]
        assert r.locals == h["local_times"][:len(r.locals)] and len(r.locals) == n_periods, (where, r)
        if h["first"]:
            assert r.pct == f"{h['good_days_pct']}%", (where, h["utc_hour"], r.pct)
        assert r.pct_white == h["weak"], (where, h["utc_hour"])  # the weak mark: white on black
        useful = (h["second_good_days_pct"] or 0) > 0
        if h["weak"] and useful and r.if_not:
            assert f"{h['second']} {h['second_good_days_pct']}%" in r.if_not, (where, h["utc_hour"], r.if_not)


def test_scan_list_status_agrees_on_scan_page_station_pages_and_cards(built):
    for d, files, pdfs in built:
        net = d["net"]["id"]
        scan = _text(files[f"{net}/scan.html"])
        for sl in d["scan_lists"]:
            wasted = ", ".join(sl["wasted"]) or "none"
            assert f"Never useful for this station: {wasted}." in scan
            s = next(x for x in d["stations"] if x["id"] == sl["station"])
            assert f"Never useful for this station: {wasted}." in _text(files[f"{net}/station-{s['id']}.html"])
            named = {h[k] for h in s["brief"]["hours"] for k in ("first", "second")
                     if h[k] and (k == "first" or (h["second_good_days_pct"] or 0) > 0)}
            assert not named & set(sl["wasted"]), (net, s["id"])  # what the card tells a team to use is scanned
            # a row of the card's channel table may align its lines at the top or the bottom: one of the two
            # readings must give "serves no link" exactly for the wasted channels
            readings = [_card_channel_notes(pdfs[f"{s['id']}.pdf"], [c["id"] for c in d["channels"]], align)
                        for align in ("top", "middle", "bottom")]
            assert readings[0], (net, s["id"], "no channel table on the card")
            assert any(all(bool(NO_LINK.search(note)) == (cid in sl["wasted"]) for cid, note in r.items())
                       for r in readings), (net, s["id"], sl["wasted"], readings)


def _card_channel_notes(pdf: bytes, channel_ids: list[str], align: str) -> dict[str, str]:
    """The text of each channel's row in a station card's channel table, read by position: a row runs from
    its id's line down to the next id (``align="top"``), up from the previous one (``"bottom"``), or around
    its id's line (``"middle"``)."""
    out: dict[str, str] = {}
    with open_pdf(pdf) as doc:
        for page in doc.pages:
            words = page.extract_words()
            head = next((w for w in words if w["text"] == "Channels"), None)
            if head is None:
                continue
            below = [w for w in words if w["top"] > head["bottom"]]
            ids = []
            for w in sorted((w for w in below if w["text"] in channel_ids and w["x0"] < head["x0"] + 8),
                            key=lambda w: w["top"]):
                if any(x["text"] == w["text"] for x in ids):
                    break  # the next table on the side (SWR) lists the channels again
                ids.append(w)
            for i, w in enumerate(ids):
                if align == "top":  # by the tops of the lines
                    lo, hi = w["top"] - 1, (ids[i + 1]["top"] - 1 if i + 1 < len(ids) else w["top"] + 12)
                    band = [x for x in below if lo <= x["top"] < hi and x is not w]
                elif align == "bottom":  # by the baselines (text of another size on the id's line shares its bottom)
                    lo, hi = (ids[i - 1]["bottom"] + 1 if i else head["bottom"] + 1), w["bottom"] + 1
                    band = [x for x in below if lo <= x["bottom"] < hi and x is not w]
                else:  # cells centred on their row: each word to the id whose line is nearest its centre
                    def mid(x):
                        return (x["top"] + x["bottom"]) / 2
                    band = [x for x in below if x is not w and x not in ids and x["top"] < ids[-1]["bottom"] + 12
                            and min(ids, key=lambda y: abs(mid(y) - mid(x))) is w]
                out[w["text"]] = " ".join(x["text"] for x in sorted(band, key=lambda x: (round(x["top"]), x["x0"])))
            if out:
                return out
    return out


def test_offset_and_revision_on_every_page_and_card_side(built):
    for d, files, pdfs in built:
        net = d["net"]["id"]
        label = d["revision"]["label"]
        for path, b in files.items():
            if path.startswith(f"{net}/") and path.endswith(".html"):
                assert label in b.decode(), path
        for name in ("schedule.html", "index.html"):
            assert d["net"]["utc_offset_label"] in _text(files[f"{net}/{name}"]) or len(d["net"]["periods"]) > 1
        for name, pdf in pdfs.items():
            for i, text in enumerate(page_texts(pdf)):
                assert label in text, (net, name, i)
        for s in d["stations"]:
            front = page_texts(pdfs[f"{s['id']}.pdf"])[0]
            for p in d["net"]["periods"]:
                assert p["label"] in front, (net, s["id"], p["label"])


def test_clock_change_named_on_member_cards_and_schedule(built):
    d, files, pdfs = next(b for b in built if b[0]["net"]["clock_changes"])
    change = d["net"]["clock_changes"][0]["date"]
    assert f"The clocks change on {change}" in _text(files[f"{d['net']['id']}/schedule.html"])
    for s in d["stations"]:
        text = _flat(" ".join(page_texts(pdfs[f"{s['id']}.pdf"])))
        day = int(change[-2:])
        assert re.search(rf"\b{day}\b", text) and ("Mar" in text or change in text), s["id"]


def test_requests_page_and_sheet_exactly_when_plan_json_has_a_request_and_they_agree_with_it(built):
    """The demo with gaps (southern-alps-sar) and the invented gappy net get a Requests page whose every figure is
    plan.json's ``requests`` (requestcheck), and a one-page sheet with the same frequencies, windows and percents;
    the demo without gaps (danube-relief) gets neither, and no link to one."""
    from requestcheck import check_requests_page, window

    from planpack.publish.requestsheet import render_request_sheet
    from planpack.requests import report

    has = {}
    for d, files, _ in built:
        net = d["net"]["id"]
        r = d["requests"]
        has[net] = r is not None
        assert (f"{net}/requests.html" in files) == has[net], net
        assert (b'href="requests.html"' in files[f"{net}/index.html"]) == has[net], net
        assert bool(d["gaps"]) == has[net], net  # compile asks whenever there are gaps
        if r is None:
            continue
        check_requests_page(files[f"{net}/requests.html"], d)
        assert r["revision"]["label"] == d["revision"]["label"] and r["net"]["handling"] == d["net"]["handling"]
        assert r["before"]["gap_hours"] == sum(len(ln["gap_utc_hours"]) for ln in d["links"])  # gaps as plan.json
        sheet = _flat(" ".join(page_texts(render_request_sheet(r))))
        assert len(page_texts(render_request_sheet(r))) == 1
        assert d["revision"]["label"] in sheet
        if d["net"]["handling"]:
            assert sheet.count(_flat(d["net"]["handling"])) == 2, net
        for p in r["proposals"]:
            assert report.khz(p["khz"]) in sheet and window(p["window_khz"]) in sheet, p
            assert f"{p['worst_good_days_pct']} %" in sheet, p  # the site's whole percent, rounded down alike
    assert has["southern-alps-sar"] and not has["danube-relief"] and has["moor-gaps"]
