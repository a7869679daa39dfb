"""Checks on a rendered site held as {relative path: bytes}: links, images, anchors, escaping."""

from __future__ import annotations

import posixpath
import xml.etree.ElementTree as ET
from html.parser import HTMLParser
from urllib.parse import unquote, urlsplit


class PageParser(HTMLParser):
    def __init__(self) -> None:
        super().__init__(convert_charrefs=True)
        self.refs: list[tuple[str, str, dict]] = []  # (tag, url, attrs)
        self.ids: set[str] = set()
        self.bad_attrs: list[str] = []
        self.tags: list[str] = []
        self.imgs: list[dict] = []

    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        self.tags.append(tag)
        if "id" in a:
            self.ids.add(a["id"])
        for k in a:
            if k.startswith("on") or k == "style":
                self.bad_attrs.append(f"<{tag} {k}=...>")
        if tag == "img":
            self.imgs.append(a)
        for key in ("href", "src"):
            if key in a:
                self.refs.append((tag, a[key], a))


def parse(html: bytes) -> PageParser:
    p = PageParser()
    p.feed(html.decode("utf-8"))
    return p


def broken_refs(files: dict[str, bytes]) -> list[str]:
    """Every internal href/src that does not resolve to a file (and anchor) in the site."""
    parsed = {path: parse(b) for path, b in files.items() if path.endswith(".html")}
    problems = []
    for path, page in parsed.items():
        for tag, url, attrs in page.refs:
            parts = urlsplit(url)
            if parts.scheme in ("http", "https"):
                # a link the reader may follow is fine; nothing may be fetched from outside
                if not (tag == "a" or (tag == "link" and attrs.get("rel") == "canonical")):
                    problems.append(f"{path}: external {tag} {url}")
                continue
            if url == "data:," and tag == "link":  # the empty icon that keeps browsers from asking for one
                continue
            if parts.scheme or parts.netloc or url.startswith("/"):
                problems.append(f"{path}: not a relative link: {url}")
                continue
            target = posixpath.normpath(posixpath.join(posixpath.dirname(path), unquote(parts.path))) if parts.path else path
            if target not in files:
                problems.append(f"{path}: {tag} {url} -> {target} missing")
                continue
            if parts.fragment and target.endswith(".html") and parts.fragment not in parsed[target].ids:
                problems.append(f"{path}: {url}: no id {parts.fragment!r} in {target}")
    return problems


def svg_problems(files: dict[str, bytes]) -> list[str]:
    out = []
    for path, b in files.items():
        if path.endswith(".svg"):
            try:
                root = ET.fromstring(b)
            except ET.ParseError as exc:
                out.append(f"{path}: not well-formed: {exc}")
                continue
            ns = "{http://www.w3.org/2000/svg}"
            if root.find(ns + "title") is None or root.find(ns + "desc") is None:
                out.append(f"{path}: no title/desc")
            for el in root.iter():
                for k in el.attrib:
                    if k.startswith("on") or k == "style" or k.endswith("href"):
                        out.append(f"{path}: attribute {k} on {el.tag}")
                if el.tag in (ns + "script", ns + "foreignObject", ns + "image"):
                    out.append(f"{path}: element {el.tag}")
    return out
