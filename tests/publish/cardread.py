"""Reading field-card PDFs back for the tests: text, type sizes, colours and the timetable's rows.

The timetable is read by position: the header words ("UTC", "Channel",
"Works", "If not") give the column bounds, each hour row is anchored on its
first local time, and the channel blocks (one label per run of hours) are
read from their own column. ISO 32000-1 (8.3.2.3) puts 72 points to the inch.
"""

from __future__ import annotations

import io
import re
from dataclasses import dataclass

import pdfplumber
import pypdf

BASE14 = {"Courier", "Courier-Bold", "Courier-Oblique", "Courier-BoldOblique", "Helvetica", "Helvetica-Bold",
          "Helvetica-Oblique", "Helvetica-BoldOblique", "Times-Roman", "Times-Bold", "Times-Italic",
          "Times-BoldItalic", "Symbol", "ZapfDingbats"}
TIME = re.compile(r"^\d\d:\d\d$")


def open_pdf(pdf_bytes: bytes):
    return pdfplumber.open(io.BytesIO(pdf_bytes))


def page_texts(pdf_bytes: bytes) -> list[str]:
    """Each page's text with whitespace runs made single spaces (no-break spaces included)."""
    with open_pdf(pdf_bytes) as pdf:
        return [" ".join((p.extract_text() or "").replace("\xa0", " ").split()) for p in pdf.pages]


def page_count(pdf_bytes: bytes) -> int:
    return len(pypdf.PdfReader(io.BytesIO(pdf_bytes)).pages)


def type_size(c: dict) -> float:
    """A character's type size [pt]: pdfminer gives a turned character's advance as its "size", so for those
    (the net card's column heads) the extent across the baseline is the size."""
    return c["size"] if c.get("upright", True) else c["x1"] - c["x0"]


def char_sizes(pdf_bytes: bytes) -> list[float]:
    with open_pdf(pdf_bytes) as pdf:
        return [type_size(c) for p in pdf.pages for c in p.chars]


def _fonts_of(obj, seen) -> list:
    """Every font dictionary reachable from a resources dictionary (pages and form XObjects)."""
    out = []
    if obj is None:
        return out
    obj = obj.get_object()
    fonts = obj.get("/Font")
    if fonts is not None:
        for _, ref in fonts.get_object().items():
            f = ref.get_object()
            if id(f) not in seen:
                seen.add(id(f))
                out.append(f)
    xobjs = obj.get("/XObject")
    if xobjs is not None:
        for _, ref in xobjs.get_object().items():
            x = ref.get_object()
            if x.get("/Subtype") == "/Form":
                out += _fonts_of(x.get("/Resources"), seen)
    return out


def assert_fonts_embedded(pdf_bytes: bytes) -> None:
    """ISO 32000-1 9.9: FontFile2 (TrueType) or FontFile3 (CFF) present; no unembedded base-14 font (9.6.2.2)."""
    reader = pypdf.PdfReader(io.BytesIO(pdf_bytes))
    seen: set = set()
    fonts = []
    for page in reader.pages:
        fonts += _fonts_of(page.get("/Resources"), seen)
    assert fonts, "no fonts found at all"
    for f in fonts:
        base = str(f.get("/BaseFont"))
        assert base.split("+")[-1].lstrip("/") not in BASE14, f"base-14 font {base}"
        desc = f
        if f.get("/Subtype") == "/Type0":
            desc = f["/DescendantFonts"][0].get_object()
        fd = desc.get("/FontDescriptor")
        assert fd is not None, f"font {base} has no descriptor (not embedded)"
        fd = fd.get_object()
        assert "/FontFile2" in fd or "/FontFile3" in fd, f"font {base} is not embedded"


@dataclass
class Row:
    locals: list[str]  # one local time per period
    utc: str
    pct: str  # "27%" or "–"
    pct_white: bool  # printed white (on a black box)
    pct_size: float
    if_not: str
    top: float


@dataclass
class Timetable:
    rows: list[Row]
    channels: list[tuple[str, float]]  # each channel block's text and its vertical centre
    head_text: str  # the header's words, left to right, top to bottom


def _words(page) -> list[dict]:
    return page.extract_words(extra_attrs=["size", "non_stroking_color", "upright"], keep_blank_chars=False)


def _white(w) -> bool:
    col = w.get("non_stroking_color")
    return isinstance(col, (tuple, list)) and len(col) >= 1 and all(abs(v - 1.0) < 1e-6 for v in col)


def timetable(page) -> Timetable | None:
    """The hour table on a page (station card front or net card front), or None when the page has none."""
    words = [w for w in _words(page) if w["upright"]]
    heads = {}
    for w in words:
        if w["text"] in ("Channel", "Net", "Works", "If") and w["size"] >= 7.0:
            line = [x for x in words if abs(x["top"] - w["top"]) < 1.0]
            if any(x["text"] == "UTC" for x in line) and any(x["text"] == "Works" for x in line):
                heads[w["text"]] = w
    if "Works" not in heads:
        return None
    chan = heads.get("Channel") or heads.get("Net")
    utc = next(x for x in words if x["text"] == "UTC" and abs(x["top"] - chan["top"]) < 1.0)
    works = heads["Works"]
    ifnot = heads.get("If")
    body_top = works["bottom"]
    legend = min((w["top"] for w in words if w["text"] == "Works:" and w["top"] > body_top), default=page.height)
    body = [w for w in words if body_top < w["top"] < legend - 1]
    anchors = sorted((w for w in body if w["x1"] <= utc["x0"] and TIME.match(w["text"])), key=lambda w: w["top"])
    tops: list[float] = []
    for a in anchors:
        if not tops or a["top"] - tops[-1] > 2.0:
            tops.append(a["top"])
    rows = []
    for i, top in enumerate(tops):
        nxt = tops[i + 1] if i + 1 < len(tops) else legend
        mine = [w for w in body if top - 2.0 <= w["top"] < nxt - 2.0 or (i + 1 == len(tops) and w["top"] >= top - 2.0)]
        loc = [w["text"] for w in sorted(mine, key=lambda w: w["x0"]) if w["x1"] <= utc["x0"] and TIME.match(w["text"])]
        u = [w["text"] for w in mine if utc["x0"] - 2 <= w["x0"] < chan["x0"] - 1]
        pct = [w for w in mine if works["x0"] - 2 <= w["x0"] and (ifnot is None or w["x0"] < ifnot["x0"] - 1)
               and (w["text"].endswith("%") or w["text"] == "–")]
        rest = [w["text"] for w in sorted(mine, key=lambda w: w["x0"]) if ifnot is not None and w["x0"] >= ifnot["x0"] - 1]
        rows.append(Row(loc, u[0] if u else "", pct[0]["text"] if pct else "", bool(pct) and _white(pct[0]),
                        pct[0]["size"] if pct else 0.0, " ".join(rest), top))
    blocks: dict[float, list[dict]] = {}
    for w in body:
        if chan["x0"] - 1 <= w["x0"] < works["x0"] - 2:
            blocks.setdefault(round(w["top"], 0), []).append(w)
    channels = []
    for top in sorted(blocks):
        ws = sorted(blocks[top], key=lambda w: w["x0"])
        channels.append((" ".join(w["text"] for w in ws), (ws[0]["top"] + ws[0]["bottom"]) / 2))
    rule = max((w["bottom"] for w in words if w["bottom"] < works["top"] - 12 and w["x0"] >= chan["x0"]), default=0.0)
    head = [w for w in words if rule < w["top"] <= works["bottom"] + 0.5 and w["x1"] <= chan["x0"] + 1]
    head_text = " ".join(w["text"] for w in sorted(head, key=lambda w: (round(w["top"]), w["x0"])))
    return Timetable(rows, channels, head_text)


def upright_false_words(page) -> list[str]:
    """Column heads turned a quarter turn (the net card's station columns)."""
    chars = [c for c in page.chars if not c.get("upright", True)]
    cols: dict[float, list[dict]] = {}
    for c in chars:
        cols.setdefault(round(c["x0"], 0), []).append(c)
    return ["".join(c["text"] for c in sorted(cs, key=lambda c: -c["top"])) for _, cs in sorted(cols.items())]
