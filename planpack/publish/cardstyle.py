"""Type, rules and small drawing pieces shared by every card.

A :class:`Look` is the type scale of one card size: nothing on any card is
set below :data:`MIN_PT` (7 pt, the smallest size a reader at arm's length
under a torch is expected to manage; common practice, no source), and the
larger A6 card scales every size up by its larger width, so it is read more
easily rather than left half empty. Paragraph styles are made once per scale
and reused (building them is a measurable share of rendering time).
"""

from __future__ import annotations

import functools
from dataclasses import dataclass
from xml.sax.saxutils import escape

from reportlab.lib import colors
from reportlab.lib.enums import TA_LEFT
from reportlab.lib.styles import ParagraphStyle
from reportlab.pdfbase.pdfmetrics import stringWidth
from reportlab.platypus import Flowable, Paragraph, Table, TableStyle

from planpack.publish import cardfonts

R, B = cardfonts.REGULAR, cardfonts.BOLD
MIN_PT = 7.0
#: The 3.5 x 5 in card the sizes below are set for [pt].
BASE_W, BASE_H = 252.0, 360.0
#: Base sizes [pt] at scale 1: body text, the hour table, headings, addresses.
SIZES = {"body": 7.0, "table": 7.5, "head": 8.0, "value": 9.5, "strip": 9.0}
SHADE = colors.Color(0.86, 0.86, 0.86)  # zebra rows: stays light under a red torch and on a laser print
CELL_PAD = 1.6


def card_scale(w: float, h: float) -> float:
    """How much larger than the 3.5 x 5 in card this card's type is set (never smaller)."""
    return max(1.0, min(w / BASE_W, h / BASE_H))


@functools.lru_cache(maxsize=None)
def _styles(scale: float) -> dict[str, ParagraphStyle]:
    def st(name: str, size: float, font: str = R, lead: float = 1.16, **kw) -> ParagraphStyle:
        size = round(max(MIN_PT, size * scale), 2)
        return ParagraphStyle(name, fontName=font, fontSize=size, leading=round(size * lead, 2), alignment=TA_LEFT,
                              textColor=colors.black, bulletFontName=B, bulletFontSize=size, **kw)

    body = SIZES["body"]
    return {
        "body": st("body", body),
        "bold": st("bold", body, B),
        "head": st("head", SIZES["head"], B, spaceBefore=3.0 * scale, spaceAfter=1.0 * scale),
        "title": st("title", SIZES["head"], B),
        "item": st("item", body, leftIndent=8 * scale, bulletIndent=1),
        "item2": st("item2", body, leftIndent=16 * scale, bulletIndent=9 * scale),
        "label": st("label", body),
        "value": st("value", SIZES["value"], B, lead=1.1),
        "cell": st("cell", SIZES["table"], lead=1.06),
        "cellb": st("cellb", SIZES["table"], B, lead=1.06),
        "strip": st("strip", SIZES["strip"], B, lead=1.12),
    }


@dataclass(frozen=True)
class Look:
    """The type scale and story width of one card size."""

    width: float  # story width [pt]
    scale: float

    def pt(self, name: str) -> float:
        return max(MIN_PT, round(SIZES.get(name, SIZES["body"]) * self.scale, 2))

    def style(self, name: str) -> ParagraphStyle:
        return _styles(self.scale)[name]

    def P(self, markup: str, style: str = "body", bullet: str | None = None) -> Paragraph:
        """A paragraph of already-escaped markup."""
        return Paragraph(markup, self.style(style), bulletText=bullet)

    def T(self, text: object, style: str = "body") -> Paragraph:
        """A paragraph of plain text (escaped here)."""
        return Paragraph(escape(str(text)), self.style(style))

    def width_of(self, text: str, font: str = R, size: str | float = "body") -> float:
        pt = size if isinstance(size, (int, float)) else self.pt(size)
        return stringWidth(text, font, pt)


def fmt_khz(v: float) -> str:
    """Frequency as printed [kHz]: whole kHz without decimals, else up to three decimals."""
    if float(v).is_integer():
        return str(int(v))
    return f"{v:.3f}".rstrip("0").rstrip(".")


def fmt_m(v: float) -> str:
    """A length as printed: metres to the centimetre."""
    return f"{v:.2f}"


def table(rows, widths, style_cmds, look: Look, repeat: int = 0) -> Table:
    t = Table(rows, colWidths=widths, repeatRows=repeat, hAlign="LEFT")
    base = [("FONT", (0, 0), (-1, -1), R, look.pt("body")),
            ("TEXTCOLOR", (0, 0), (-1, -1), colors.black),
            ("LEFTPADDING", (0, 0), (-1, -1), CELL_PAD), ("RIGHTPADDING", (0, 0), (-1, -1), CELL_PAD),
            ("TOPPADDING", (0, 0), (-1, -1), 0.4), ("BOTTOMPADDING", (0, 0), (-1, -1), 1.0),
            ("VALIGN", (0, 0), (-1, -1), "MIDDLE")]
    t.setStyle(TableStyle(base + style_cmds))
    return t


def text_width(cells: list[tuple[str, str, float]]) -> float:
    """The widest of (text, font, size) cells, with the cell padding [pt]."""
    return max((stringWidth(t, f, s) for t, f, s in cells), default=0.0) + 2 * CELL_PAD + 0.5


class Keep(Flowable):
    """A few flowables kept on one card side; split apart only when they exceed a whole side."""

    def __init__(self, items: list[Flowable]):
        super().__init__()
        self.items = [f for f in items if f is not None]
        self._sizes: list[tuple[float, float]] = []

    def wrap(self, aw, ah):
        self._sizes = [f.wrap(aw, ah) for f in self.items]
        self.width = aw
        self.height = sum(h for _, h in self._sizes) + sum(getattr(f, "spaceBefore", 0) + getattr(f, "spaceAfter", 0)
                                                        for f in self.items[1:])
        return aw, self.height

    def split(self, aw, ah):
        # Called when it does not fit the space left: move whole to the next side unless
        # it is taller than a full side (the paginator says so with _full_side).
        return list(self.items) if getattr(self, "_full_side", False) else []

    def draw(self):
        y = self.height
        for i, (f, (_, h)) in enumerate(zip(self.items, self._sizes)):
            if i:
                y -= getattr(f, "spaceBefore", 0)
            y -= h
            f.drawOn(self.canv, 0, y)
            y -= getattr(f, "spaceAfter", 0)


class Rule(Flowable):
    """A thin full-width rule with a little air above and below."""

    def __init__(self, weight: float = 0.6, air: float = 2.0):
        super().__init__()
        self.weight, self.air = weight, air

    def wrap(self, aw, ah):
        self.width = aw
        self.height = self.weight + 2 * self.air
        return aw, self.height

    def draw(self):
        self.canv.setLineWidth(self.weight)
        self.canv.line(0, self.air + self.weight / 2, self.width, self.air + self.weight / 2)


def weak_mark() -> str:
    """The mark of an hour below target: a warning sign, or '!' in a font without one."""
    return "⚠" if cardfonts.register().full_unicode else "!"
