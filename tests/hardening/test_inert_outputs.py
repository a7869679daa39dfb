"""Nothing runs that the plan wrote, checked in the files themselves: every page, chart, style sheet and
card of a site built from a plan with an injection attempt in every free-text field.

The browser test (test_browser_inert.py) loads the same site in Chromium; this module reads the bytes,
so it runs without a browser and names the exact file and element when something slips through.
"""

from __future__ import annotations

import re
import shutil
import subprocess
import xml.etree.ElementTree as ET
from html.parser import HTMLParser
from pathlib import Path

import pytest

from planpack.publish import site
from tests.hardening import hostile

ACTIVE_TAGS = {"script", "iframe", "frame", "object", "embed", "applet", "base", "form", "input", "button", "textarea",
               "style", "svg", "math", "foreignobject", "template", "portal", "audio", "video", "source", "track"}


class _Page(HTMLParser):
    def __init__(self) -> None:
        super().__init__(convert_charrefs=True)
        self.tags: list[str] = []
        self.events: list[str] = []
        self.text: list[str] = []
        self.metas: list[dict] = []

    def handle_starttag(self, tag, attrs):
        self.tags.append(tag)
        a = dict(attrs)
        self.events += [f"<{tag} {k}>" for k in a if k.startswith("on") or k == "style"]
        if tag == "meta":
            self.metas.append(a)

    def handle_data(self, data):
        self.text.append(data)


def page(path: Path) -> _Page:
    p = _Page()
    p.feed(path.read_text(encoding="utf-8"))
    p.close()
    return p


def squash(text: str) -> str:
    return re.sub(r"\s+", "", text)


@pytest.fixture(scope="module")
def out(hostile_build):
    return hostile_build["out"]


def test_every_page_is_free_of_active_markup_and_carries_the_csp(out):
    pages = sorted(out.rglob("*.html"))
    assert len(pages) >= 10
    for path in pages:
        p = page(path)
        assert not ACTIVE_TAGS & set(p.tags), (path, ACTIVE_TAGS & set(p.tags))
        assert p.events == [], (path, p.events)
        csp = [m["content"] for m in p.metas if (m.get("http-equiv") or "").lower() == "content-security-policy"]
        assert csp == [site.CSP], path
        refresh = [m for m in p.metas if (m.get("http-equiv") or "").lower() == "refresh"]
        assert refresh == []
    policy = dict(part.strip().split(" ", 1) for part in site.CSP.split(";"))
    assert policy["default-src"] == "'none'" and "script-src" not in policy  # no script at all, inline or not
    assert "unsafe" not in site.CSP


def test_hostile_text_is_shown_as_text_on_every_page_it_belongs_to(out, hostile_build):
    fields = hostile_build["fields"]
    checked = 0
    for path in sorted(out.rglob("*.html")):
        rel = str(path.relative_to(out))
        text = "".join(page(path).text)
        for value in hostile.shown_on(rel, fields):
            value = value.replace("{canary}", str(hostile_build["canary"]))
            assert squash(value) in squash(text), (rel, value)
            checked += 1
    assert checked >= 40
    # a template expression in the plan is not evaluated (it is a channel note)
    assert "{{ 7*7 }} {% raw %} ${7*7} #{7*7}" in "".join(page(out / "hostile-net" / "index.html").text)


def test_markdown_links_keep_only_safe_targets(out):
    from tests.hardening.test_output_escape import bad_urls, urls_in

    scan = out / "hostile-net" / "scan.html"
    links = [u for t, a, u in urls_in(scan) if t == "a"]
    assert bad_urls(out) == []
    # the attempts that markdown-it-py refuses stay as their text; the image became a plain link, nothing fetched
    text = "".join(page(scan).text)
    for literal in ("[click me](javascript:alert(8))", "[local file](file:///etc/passwd)", "<javascript:alert(14)>"):
        assert literal in text
    assert "https://evil.example/track.png" in links and not [t for t in page(scan).tags if t == "img"]


def test_every_chart_is_well_formed_and_inert(out, hostile_build):
    charts = sorted(out.rglob("*.svg"))
    assert charts
    title = hostile_build["fields"]["net.title"]
    for path in charts:
        root = ET.fromstring(path.read_bytes())  # well-formed: a '<' from the plan could not open an element
        for el in root.iter():
            tag = el.tag.rsplit("}", 1)[-1].lower()
            assert tag not in ("script", "foreignobject", "iframe", "handler", "listener", "set", "animate"), (path, tag)
            for k, v in el.attrib.items():
                name = k.rsplit("}", 1)[-1].lower()
                assert not name.startswith("on"), (path, k)
                if name == "href":
                    assert not re.match(r"\s*(javascript|vbscript|file|data):", v, re.I), (path, v)
    the_map = ET.fromstring((out / "hostile-net" / "charts" / "map.svg").read_bytes())
    assert any(title in (el.text or "") for el in the_map.iter())


def test_the_marking_style_sheet_has_no_rule_the_plan_wrote(out, hostile_build):
    """The handling marking goes into CSS as a string; outside the strings the sheet is planpack's own."""
    handling = hostile_build["fields"]["net.handling"]
    strings = re.compile(r'"(?:[^"\\\n]|\\[0-9a-fA-F]{1,6} ?|\\.)*"')
    for path in (out / "marking.css", out / "hostile-net" / "marking.css"):
        css = path.read_text(encoding="utf-8")
        assert strings.sub('""', css) == strings.sub('""', site.marking_css("x"))
        assert "</style" not in css.lower() and "@import" not in css and "url(" not in css
        assert handling not in css  # only its escaped form


def _pdftotext(path: Path) -> str:
    return subprocess.run(["pdftotext", "-raw", str(path), "-"], capture_output=True, text=True, check=True).stdout


@pytest.mark.skipif(shutil.which("pdftotext") is None, reason="pdftotext (poppler-utils) is not installed")
def test_cards_print_the_hostile_text_as_text_and_carry_no_actions(out, hostile_build):
    fields = hostile_build["fields"]
    cards = sorted((out / "hostile-net" / "cards").glob("*.pdf"))
    assert cards
    every = squash("".join(_pdftotext(p) for p in cards))
    wanted = [fields["net.title"], fields["net.handling"]] + [v for k, v in fields.items() if k.startswith(("stations.", "channels["))]
    wanted += [s.replace("{canary}", str(hostile_build["canary"])) for s in hostile.MARKUP if s.startswith("<")]
    missing = [w for w in wanted if squash(w) not in every]
    assert missing == []
    for path in cards:
        raw = path.read_bytes()
        for action in (b"/JavaScript", b"/JS ", b"/JS(", b"/Launch", b"/SubmitForm", b"/ImportData", b"/EmbeddedFile",
                       b"/URI (javascript", b"/URI (file", b"/URI (data", b"/RichMedia", b"/XFA"):
            assert action not in raw, (path, action)
