"""The published site in real headless Chromium, from file:// and from a static server under a sub-path."""

from __future__ import annotations

import io
import json
from urllib.parse import urlsplit

import pytest

from synthetic import INJECTION


def _pages(folder):
    return sorted(str(p.relative_to(folder)) for p in folder.rglob("*.html"))


class Watch:
    """Everything a page did that it should not: console errors, failed or foreign requests, dialogs."""

    def __init__(self, page, base: str) -> None:
        self.problems: list[str] = []
        self.base = base
        page.on("console", lambda m: m.type in ("error", "warning") and self.problems.append(f"console {m.type}: {m.text}"))
        page.on("pageerror", lambda e: self.problems.append(f"page error: {e}"))
        page.on("requestfailed", lambda r: self.problems.append(f"failed: {r.url} {r.failure}"))
        page.on("request", self._request)
        page.on("response", lambda r: r.status >= 400 and self.problems.append(f"HTTP {r.status}: {r.url}"))
        page.on("dialog", lambda d: (self.problems.append(f"dialog: {d.message}"), d.dismiss()))

    def _request(self, r) -> None:
        if not r.url.startswith(self.base) and not r.url.startswith("data:"):
            self.problems.append(f"request outside the site: {r.url}")


@pytest.mark.parametrize("how", ["file", "http"])
def test_every_page_loads_clean_and_stays_local(browser, built_site, http_base, how):
    folder, _ = built_site
    base = folder.as_uri() + "/" if how == "file" else http_base
    if how == "http":
        assert urlsplit(base).hostname == "127.0.0.1" and urlsplit(base).path == "/nets/site/"
    ctx = browser.new_context(viewport={"width": 1280, "height": 900}, service_workers="block")
    page = ctx.new_page()
    watch = Watch(page, base)
    pages = _pages(folder)
    assert len(pages) >= 9
    try:
        for rel in pages:
            page.goto(base + rel, wait_until="load")
            # every image decoded (a broken SVG has naturalWidth 0)
            broken = page.evaluate("[...document.images].filter(i => !i.complete || i.naturalWidth === 0).map(i => i.src)")
            assert broken == [], (rel, broken)
            assert page.evaluate("document.scripts.length") == 0
        # the stylesheet applied: the handling marking is a dark bar, not plain text
        page.goto(base + "test-net/index.html")
        bg = page.eval_on_selector(".marking-top", "e => getComputedStyle(e).backgroundColor")
        assert bg not in ("rgba(0, 0, 0, 0)", "transparent")
    finally:
        ctx.close()
    assert watch.problems == []


def test_schedule_tables_show_what_plan_json_holds(browser, built_site, http_base):
    folder, datas = built_site
    ctx = browser.new_context()
    page = ctx.new_page()
    try:
        for d in datas:
            net = d["net"]["id"]
            plan = json.loads((folder / net / "plan.json").read_text(encoding="utf-8"))
            assert plan == d
            periods = len(plan["net"]["periods"])
            page.goto(http_base + f"{net}/schedule.html")
            rows = page.eval_on_selector_all(
                "#net-schedule tbody tr", "rows => rows.map(r => [...r.cells].map(c => c.innerText.trim()))")
            assert len(rows) == 24
            for cells, h in zip(rows, plan["net_schedule"]["hours"]):
                assert cells[:periods] == h["local_times"] and cells[periods] == f"{h['utc_hour']:02d}:00"
                channel, works, second, _, fails = cells[periods + 1:]
                if h["first"] is None:
                    assert "no channel" in channel
                else:
                    khz = next(c["freq_khz"] for c in plan["channels"] if c["id"] == h["first"])
                    assert channel.split()[0] == h["first"] and f"{khz:g}" in channel
                    assert works.split()[:2] == [str(h["good_days_pct"]), "%"]
                assert ("WEAK" in works.upper().split()) == h["weak"]
                assert fails == ((h["fallback"] or {}).get("text") or "")
                if (h["second_good_days_pct"] or 0) > 0:
                    assert second.split()[0] == h["second"]
            ln = plan["links"][0]
            page.goto(http_base + f"{net}/link-{ln['id']}.html")
            rows = page.eval_on_selector_all(
                "#link-grid tbody tr", "rows => rows.map(r => [...r.cells].map(c => c.innerText.trim()))")
            order = [c["id"] for c in sorted(plan["channels"], key=lambda c: (c["freq_khz"], c["id"]))]
            assert len(rows) == 24
            for cells, h in zip(rows, ln["hours"]):
                assert cells[periods] == f"{h['utc_hour']:02d}:00"
                by = {c["channel"]: c for c in h["channels"]}
                shown = cells[periods + 1:periods + 1 + len(order)]
                for cid, text in zip(order, shown):
                    want = "–" if not by[cid]["allowed"] else str(by[cid]["good_days_pct"])
                    assert text.lstrip("◆◇") == want, (net, h["utc_hour"], cid)
                    assert text.startswith("◆") == (h["first"] == cid and by[cid]["allowed"])
    finally:
        ctx.close()


def test_script_injection_in_a_station_name_stays_text(browser, built_site):
    folder, _ = built_site
    ctx = browser.new_context()
    page = ctx.new_page()
    dialogs = []
    page.on("dialog", lambda d: (dialogs.append(d.message), d.dismiss()))
    try:
        for rel in ("test-net/index.html", "test-net/safety.html", "test-net/link-ops--ridge.html", "test-net/scan.html"):
            page.goto((folder / rel).as_uri())
            assert INJECTION in page.inner_text("main"), rel
            assert page.evaluate("document.scripts.length") == 0
        assert dialogs == []
        # markdown: raw HTML shown as text, javascript: link not made a link
        page.goto((folder / "test-net/scan.html").as_uri())
        hrefs = page.eval_on_selector_all(".instructions a", "as => as.map(a => a.getAttribute('href'))")
        assert not any(h.lower().startswith("javascript") for h in hrefs)
        assert "<b>raw</b>" in page.inner_text(".instructions")
    finally:
        ctx.close()


@pytest.mark.parametrize("width", [390, 1280])
def test_screenshots_and_no_page_wide_scroll(browser, built_site, screenshot_dir, width):
    folder, datas = built_site
    ctx = browser.new_context(viewport={"width": width, "height": 900}, device_scale_factor=1)
    page = ctx.new_page()
    shots = ["index.html"]
    for d in datas:
        net = d["net"]["id"]
        shots += [f"{net}/index.html", f"{net}/schedule.html", f"{net}/link-{d['links'][0]['id']}.html",
                  f"{net}/antenna-{d['antennas'][0]['id']}.html", f"{net}/scan.html", f"{net}/safety.html",
                  f"{net}/station-{d['stations'][-1]['id']}.html"]
    try:
        for rel in shots:
            page.goto((folder / rel).as_uri())
            # wide tables scroll inside their own region; the page itself never scrolls sideways
            assert page.evaluate("document.documentElement.scrollWidth") <= width + 1, rel
            out = screenshot_dir / f"{rel.replace('/', '_').removesuffix('.html')}-{width}.png"
            page.screenshot(path=str(out), full_page=True)
            assert out.stat().st_size > 5000
    finally:
        ctx.close()
    print(f"screenshots in {screenshot_dir}")


def test_keyboard_reaches_the_skip_link_first_and_regions_are_focusable(browser, built_site):
    folder, _ = built_site
    ctx = browser.new_context()
    page = ctx.new_page()
    try:
        page.goto((folder / "test-net/schedule.html").as_uri())
        page.keyboard.press("Tab")
        assert page.evaluate("document.activeElement.className") == "skip"
        assert page.evaluate("[...document.querySelectorAll('.table-wrap')].every(e => e.tabIndex === 0 && e.getAttribute('aria-labelledby'))")
        assert page.evaluate("[...document.querySelectorAll('table')].every(t => t.caption && t.querySelector('th[scope]'))")
        assert page.evaluate("document.documentElement.lang") == "en"
    finally:
        ctx.close()


@pytest.mark.parametrize("paper", ["A4", "Letter"])
def test_print_puts_the_handling_marking_on_every_page(browser, built_site, paper):
    pypdf = pytest.importorskip("pypdf")
    folder, _ = built_site
    ctx = browser.new_context()
    page = ctx.new_page()
    try:
        page.goto((folder / "test-net/schedule.html").as_uri())  # a page that prints on several sheets
        pdf = page.pdf(format=paper, print_background=False)
    finally:
        ctx.close()
    reader = pypdf.PdfReader(io.BytesIO(pdf))
    assert len(reader.pages) >= 2
    for i, p in enumerate(reader.pages):
        text = p.extract_text()
        assert text.count("EXERCISE ONLY") >= 2, (paper, i)  # top and bottom margin of each sheet
