"""Layout as a user sees it: phone rows no taller than their content, key columns on screen, no clipped
headers on a desktop, headings kept with what follows in print. Real headless Chromium at 390 and 1280 px."""

from __future__ import annotations

import io
import re

import pytest

PHONE, DESKTOP = 390, 1280


def _pages(datas):
    out = []
    for d in datas:
        net = d["net"]["id"]
        out += [f"{net}/index.html", f"{net}/schedule.html", f"{net}/link-{d['links'][-1]['id']}.html",
                f"{net}/station-{d['stations'][-1]['id']}.html", f"{net}/scan.html"]
    return out


@pytest.fixture(scope="module")
def phone(browser):
    ctx = browser.new_context(viewport={"width": PHONE, "height": 800}, device_scale_factor=1)
    yield ctx.new_page()
    ctx.close()


@pytest.fixture(scope="module")
def desktop(browser):
    ctx = browser.new_context(viewport={"width": DESKTOP, "height": 900}, device_scale_factor=1)
    yield ctx.new_page()
    ctx.close()


# each row's height, its line height and the length of the text in each of its cells
ROW_HEIGHTS = """
els => els.map(tr => ({
  h: tr.getBoundingClientRect().height,
  line: parseFloat(getComputedStyle(tr.cells[0] || tr).lineHeight) || 20,
  cells: [...tr.cells].filter(c => getComputedStyle(c).display !== 'none').map(c => c.innerText.trim().length),
  text: tr.innerText.slice(0, 60),
}))
"""
CHARS_PER_LINE = 36  # a 390 px screen holds at least this many characters of 14 px text


def test_phone_rows_are_no_taller_than_their_content(phone, built_site):
    folder, datas = built_site
    for rel in _pages(datas):
        phone.goto((folder / rel).as_uri())
        for sel in ("table.hours tbody tr", "table.gaps tbody tr", "table.links tbody tr"):
            for row in phone.eval_on_selector_all(sel, ROW_HEIGHTS):
                # even with every cell on lines of its own, full width: what the text needs, and no more
                lines = sum(max(1, -(-n // CHARS_PER_LINE)) for n in row["cells"])
                assert row["h"] <= lines * row["line"] + 24, (rel, sel, row)
        # the hour list: one line per hour, plus one for "if it fails" on a weak hour
        for row in phone.eval_on_selector_all("table.hours tbody tr", ROW_HEIGHTS):
            assert row["h"] <= 4 * row["line"] + 12, (rel, row)


def test_phone_key_columns_are_on_screen(phone, built_site):
    folder, datas = built_site
    for d in datas:
        net = d["net"]["id"]
        for rel in (f"{net}/schedule.html", f"{net}/station-{d['stations'][-1]['id']}.html"):
            phone.goto((folder / rel).as_uri())
            # local time, UTC, channel and how often it works: all inside the 390 px screen
            right = phone.evaluate("""() => {
              const t = document.querySelector('table.hours');
              const row = t.tBodies[0].rows[0];
              return [...row.cells].filter(c => !c.classList.contains('opt') && !c.classList.contains('fb')
                                            && getComputedStyle(c).display !== 'none')
                                   .map(c => c.getBoundingClientRect().right);
            }""")
            assert right and max(right) <= PHONE + 0.5, (rel, right)
            # the fallback of a weak hour wraps inside the screen
            fb = phone.evaluate("[...document.querySelectorAll('table.hours td.fb')].filter(c => c.innerText.trim())"
                                ".map(c => c.getBoundingClientRect().right)")
            assert all(x <= PHONE + 0.5 for x in fb), rel
        # the timetable scrolls sideways inside its frame, its hour column stays in view
        phone.goto((folder / f"{net}/link-{d['links'][0]['id']}.html").as_uri())
        phone.eval_on_selector(".grid-wrap", "e => { e.scrollLeft = 10000; }")
        left = phone.eval_on_selector("table.grid tbody tr th", "e => e.getBoundingClientRect().left")
        assert 0 <= left < 30
        assert phone.evaluate("document.documentElement.scrollWidth") <= PHONE + 1


def test_desktop_headers_are_not_clipped(desktop, built_site):
    folder, datas = built_site
    for rel in _pages(datas):
        desktop.goto((folder / rel).as_uri())
        clipped = desktop.evaluate("""() => [...document.querySelectorAll('thead th')].filter(th => {
            const wrap = th.closest('.table-wrap');
            const r = th.getBoundingClientRect();
            const w = wrap ? wrap.getBoundingClientRect() : {left: 0, right: innerWidth};
            return th.scrollWidth > th.clientWidth + 1 || r.right > w.right + 1 || r.left < w.left - 1;
          }).map(th => th.innerText)""")
        assert clipped == [], (rel, clipped)
        # the roster fits the page: no sideways scrolling for a planner at a desktop
        if rel.endswith("index.html"):
            assert desktop.eval_on_selector("table.roster", "t => t.closest('.table-wrap').scrollWidth <= "
                                            "t.closest('.table-wrap').clientWidth + 1"), rel


# the texts that must never end a printed page: headings, captions and table heads
STARTERS = """() => [...document.querySelectorAll('main h2, main caption, main thead tr')]
  .map(e => e.innerText.replace(/\\s+/g, '').toLowerCase()).filter(t => t)"""


@pytest.mark.parametrize("paper", ["A4", "Letter"])
def test_print_keeps_headings_with_what_follows(browser, built_site, paper):
    pdfplumber = pytest.importorskip("pdfplumber")
    folder, datas = built_site
    ctx = browser.new_context()
    page = ctx.new_page()
    marking = {d["net"].get("handling") for d in datas} - {None}
    try:
        for rel in _pages(datas) + [f"{d['net']['id']}/link-{ln['id']}.html" for d in datas for ln in d["links"]]:
            page.goto((folder / rel).as_uri())
            starters = page.evaluate(STARTERS)
            pdf = page.pdf(format=paper, print_background=False)
            with pdfplumber.open(io.BytesIO(pdf)) as doc:
                for i, p in enumerate(doc.pages[:-1]):  # the last page may end anywhere
                    lines = [ln for ln in p.extract_text_lines() if ln["text"].strip() not in marking]
                    if not lines:
                        continue
                    lowest = re.sub(r"\s+", "", max(lines, key=lambda ln: ln["bottom"])["text"]).lower()
                    assert not (len(lowest) > 3 and any(lowest in s for s in starters)), \
                        (paper, rel, i, lowest)
    finally:
        ctx.close()
