"""Checks that a net's Requests page says exactly what plan.json's ``requests`` holds.

The expected text of each cell is built here from the plan.json fields (the
hour lists spelt out with the project's clock-range formatter), and compared
with the page's cells read back from the HTML: frequencies, windows, the
links and hours each proposal serves (UTC and local), the percents (the
``..._pct`` fields), before and after, merges, what no frequency serves and
the solver's status.
"""

from __future__ import annotations

import html
import re

from planpack.scheduling.hours import format_hours


def text_of(fragment: str) -> str:
    """Visible text of an HTML fragment: tags dropped (as spaces, none before a comma), entities decoded,
    whitespace single."""
    return " ".join(html.unescape(re.sub(r"<[^>]+>", " ", fragment)).split()).replace(" ,", ",")


def plain(text: str) -> str:
    """Plan or data text as a page shows it: whitespace made single (markup in it is text, not tags)."""
    return " ".join(text.split())


def table_rows(page: str, table_id: str) -> list[list[str]]:
    """The body rows of the table with this id, as lists of cell texts."""
    body = page.split(f'id="{table_id}"', 1)[1].split("<tbody>", 1)[1].split("</tbody>", 1)[0]
    return [[text_of(c) for c in re.findall(r"<t[hd][^>]*>(.*?)</t[hd]>", tr, re.S)] for tr in body.split("</tr>")[:-1]]


def pretty(link: str) -> str:
    return link.replace("--", "–")


def pct(p) -> str:
    return "–" if p is None else f"{p} %"


def window(w) -> str:
    return f"{w[0]:g} kHz only" if w[0] == w[1] else f"{w[0]:g}–{w[1]:g} kHz"


def served_text(serves: list[dict], labels: list[str]) -> list[str]:
    """What the page should say for a list of {link, utc_hours}: links with the same hours on one line."""
    by: dict[tuple, list[str]] = {}
    for s in serves:
        by.setdefault(tuple(s["utc_hours"]), []).append(pretty(s["link"]))
        assert format_hours(s["utc_hours"], labels).startswith(s["local_hours"][0]), s  # the data agrees with itself
    return [f"{', '.join(links)} {format_hours(list(h))} UTC ({format_hours(list(h), labels)} local)"
            for h, links in sorted(by.items())]


def clock(hours: list[int], labels: list[str] | None = None) -> str:
    return format_hours(hours, labels) if hours else "none"


def check_requests_page(page_bytes: bytes, d: dict) -> None:
    """Assert that the Requests page shows every figure of ``d["requests"]`` and nothing else in its tables."""
    page = page_bytes.decode("utf-8")
    r = d["requests"]
    labels = r["local_time_labels"]
    main = text_of(page.split("<main", 1)[1].split("</main>", 1)[0])
    assert plain(r["summary"]) in main
    # the frequencies to ask for
    rows = table_rows(page, "asks") if r["proposals"] else []
    assert len(rows) == len(r["proposals"])
    for cells, p in zip(rows, r["proposals"]):
        rid, freq, win, serves, worst = cells
        assert rid == p["id"]
        assert freq == f"{p['khz']:g} kHz", (freq, p)
        assert win == window(p["window_khz"])
        assert worst == pct(p["worst_good_days_pct"])
        want = served_text(p["serves"], labels)
        if p["net_channel_utc_hours"]:
            h = p["net_channel_utc_hours"]
            want.append(f"one channel for the whole net at {format_hours(h)} UTC ({format_hours(h, labels)} local)")
        assert serves == " ".join(want), (serves, want)
    # before and after, when there is something to ask for
    b, a = r["before"], r["after"]
    if r["proposals"]:
        change = table_rows(page, "change")
        assert change[0][1:] == [str(b["gap_hours"]), str(a["gap_hours"])]
        assert change[1][1:] == [str(b["unserved_pairs"]), str(a["unserved_pairs"])]
        assert change[1][0] == f"pairs with no channel working on {r['target_good_days_pct']} % of days"
        assert change[2][1:] == [clock(b["utc_hours"]), clock(a["utc_hours"])]
        assert change[3][1:] == [clock(b["utc_hours"], labels), clock(a["utc_hours"], labels)]
    else:
        assert 'id="change"' not in page
    # merges and what no frequency serves, in the data's own words
    for m in r["merges"]:
        assert plain(m["message"]) in main
    never = table_rows(page, "never") if r["unservable"] else []
    assert len(never) == len(r["unservable"])
    for cells, u in zip(never, r["unservable"]):
        assert cells == [pretty(u["link"]), format_hours(u["utc_hours"]), format_hours(u["utc_hours"], labels),
                         pct(u["best_good_days_pct"]), plain(u["message"])], (cells, u)
    for s in served_text(r["left_out"], labels):
        assert s in main
    # the solver's status in one line, and the target the whole page counts against
    solver = text_of(re.search(r'<p class="solver[^"]*">(.*?)</p>', page, re.S)[1])
    assert plain(r["solver"]["status"]) in solver, solver
    if r["solver"]["stages"]:
        assert ("not proven optimal" in solver) == (not r["solver"]["optimal"]), solver
    assert f"at least {r['target_good_days_pct']} % of days" in main
