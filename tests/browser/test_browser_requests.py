"""The Requests page in real headless Chromium at 390 and 1280 px: clean, local, and its key columns in view.

The demo plan with gaps (southern-alps-sar) has a request in plan.json, so
the built site has its Requests page; the cells read back from the browser
must be plan.json's figures (tests/publish/requestcheck.py spells them).
"""

from __future__ import annotations

import json

import pytest

from requestcheck import pretty, window
from tests.browser.test_browser_site import Watch

PHONE, DESKTOP = 390, 1280

# every cell of the given selector, with its box and whether its text is cut
BOXES = """sel => [...document.querySelectorAll(sel)].map(c => {
  const r = c.getBoundingClientRect();
  return {left: r.left, right: r.right, width: r.width, cut: c.scrollWidth > c.clientWidth + 1,
          shown: getComputedStyle(c).display !== 'none' && r.width > 0, text: c.innerText.trim()};
})"""

CLIPPED_HEADERS = """() => [...document.querySelectorAll('main thead th')].filter(th => {
  const wrap = th.closest('.table-wrap');
  const r = th.getBoundingClientRect();
  const w = wrap ? wrap.getBoundingClientRect() : {left: 0, right: innerWidth};
  return th.scrollWidth > th.clientWidth + 1 || r.right > w.right + 1 || r.left < w.left - 1;
}).map(th => th.innerText)"""


def _requested(built_site):
    folder, datas = built_site
    nets = [d for d in datas if d.get("requests")]
    assert any(d["net"]["id"] == "southern-alps-sar" for d in nets), "the demo with gaps has no request"
    return folder, nets


@pytest.mark.parametrize("width", [PHONE, DESKTOP])
def test_requests_page_clean_local_and_key_columns_on_screen(browser, built_site, http_base, screenshot_dir, width):
    folder, nets = _requested(built_site)
    ctx = browser.new_context(viewport={"width": width, "height": 900}, device_scale_factor=1, service_workers="block")
    page = ctx.new_page()
    watch = Watch(page, http_base)
    try:
        for d in nets:
            net = d["net"]["id"]
            r = json.loads((folder / net / "plan.json").read_text(encoding="utf-8"))["requests"]
            assert r == d["requests"]
            page.goto(http_base + f"{net}/requests.html", wait_until="load")
            assert page.evaluate("document.documentElement.scrollWidth") <= width + 1, net
            assert page.evaluate("document.scripts.length") == 0
            # what a planner copies first: request, preferred frequency, window; all in view, none cut
            for sel in ("#asks tbody th.req", "#asks tbody td.freq", "#asks tbody td.win", "#asks tbody td.pct",
                        "#never tbody th", "#never tbody td.t", "#change tbody td"):
                for c in page.evaluate(BOXES, sel):
                    assert c["shown"], (net, width, sel, c)
                    assert c["left"] >= -0.5 and c["right"] <= width + 0.5 and not c["cut"], (net, width, sel, c)
            # the browser shows plan.json's figures
            cells = page.eval_on_selector_all("#asks tbody tr", "rows => rows.map(r => [...r.cells].map(c => c.innerText.trim()))")
            assert len(cells) == len(r["proposals"])
            for row, p in zip(cells, r["proposals"]):
                rid, freq, win, serves, worst = row
                assert rid == p["id"] and freq.split() == [f"{p['khz']:g}", "kHz"], (row, p)
                assert win.removeprefix("Window:").strip() == window(p["window_khz"])
                assert worst.removeprefix("Worst hour:").strip() == f"{p['worst_good_days_pct']} %"
                assert all(pretty(s["link"]) in serves for s in p["serves"])
            if width == DESKTOP:
                assert page.evaluate(CLIPPED_HEADERS) == [], net
                # the request fits the page: no sideways scrolling at a desk
                assert page.eval_on_selector("#asks", "t => t.closest('.table-wrap').scrollWidth <= "
                                                      "t.closest('.table-wrap').clientWidth + 1")
            out = screenshot_dir / f"{net}_requests-{width}.png"
            page.screenshot(path=str(out), full_page=True)
            assert out.stat().st_size > 5000
            # the gap section of the overview leads here
            page.goto(http_base + f"{net}/index.html", wait_until="load")
            page.click("#h-gaps ~ p.ask a")
            assert page.url.endswith(f"{net}/requests.html")
    finally:
        ctx.close()
    assert watch.problems == []
