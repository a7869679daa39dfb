"""Card and sheet geometry: card sizes, and where cards go on an imposed sheet.

All lengths are PDF points (1/72 in). Cards are portrait. Positions are pure
functions so that the tests can check them directly.

Long-edge duplex on a portrait sheet turns the sheet over about its vertical
centre line: a point (x, y) on the front lies behind (W - x, y) on the back.
A card is turned over the same way (about its own long, vertical edge) when
it is read, so card point (u, v) on the front lies behind (w - u, v) on the
back. :func:`back_slot` places each back so that both hold at once.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from reportlab.lib.pagesizes import A4, A6, LETTER

INCH = 72.0

#: card size name -> (width, height) [pt], portrait
CARD_SIZES: dict[str, tuple[float, float]] = {
    "3.5x5in": (3.5 * INCH, 5.0 * INCH),
    "a6": (A6[0], A6[1]),
    "3x5in": (3.0 * INCH, 5.0 * INCH),
}
DEFAULT_CARD_SIZE = "3.5x5in"

#: sheet name -> (width, height) [pt], portrait
SHEETS: dict[str, tuple[float, float]] = {"a4": (A4[0], A4[1]), "letter": (LETTER[0], LETTER[1])}

#: Unprintable edge of most office laser printers plus room for the crop
#: marks [pt] (common practice, no source): about 8 mm.
SHEET_MARGIN = 22.0
#: Gutter between neighbouring cards so that a slightly off guillotine cut
#: never takes a neighbour's edge [pt] (about 3 mm).
GUTTER = 8.5
#: Crop mark length and its gap from the card corner [pt].
MARK_LEN, MARK_GAP = 12.0, 3.0


class CardSizeError(ValueError):
    pass


def card_size(name: str) -> tuple[float, float]:
    try:
        return CARD_SIZES[name]
    except KeyError:
        raise CardSizeError(f"card size '{name}' is not one planpack prints; expected one of "
                            + ", ".join(CARD_SIZES)) from None


def sheet_size(name: str) -> tuple[float, float]:
    try:
        return SHEETS[name]
    except KeyError:
        raise CardSizeError(f"sheet '{name}' is not one planpack imposes on; expected one of "
                            + ", ".join(SHEETS)) from None


@dataclass(frozen=True)
class Slot:
    """Where one card page sits on a sheet page.

    The card's own coordinates (u, v), origin at its bottom-left corner, map
    to the sheet by ``place``: translate to (x, y) then rotate by ``angle``
    degrees counter-clockwise. (x, y) is therefore the sheet position of the
    card's own origin, not necessarily the lower-left corner on the sheet.
    """

    x: float
    y: float
    angle: int  # 0, 90 or -90
    w: float  # card width [pt] (card coordinates)
    h: float

    def place(self, u: float, v: float) -> tuple[float, float]:
        a = math.radians(self.angle)
        ca, sa = round(math.cos(a)), round(math.sin(a))
        return (self.x + ca * u - sa * v, self.y + sa * u + ca * v)

    def box(self) -> tuple[float, float, float, float]:
        """The card's footprint on the sheet: (x0, y0, x1, y1)."""
        pts = [self.place(u, v) for u in (0, self.w) for v in (0, self.h)]
        xs, ys = [p[0] for p in pts], [p[1] for p in pts]
        return (min(xs), min(ys), max(xs), max(ys))


def _grid(sw: float, sh: float, fw: float, fh: float) -> tuple[int, int]:
    cols = int((sw - 2 * SHEET_MARGIN + GUTTER) // (fw + GUTTER))
    rows = int((sh - 2 * SHEET_MARGIN + GUTTER) // (fh + GUTTER))
    return max(cols, 0), max(rows, 0)


def front_slots(sheet: str, size: str) -> list[Slot]:
    """Card positions on the front of a sheet, in reading order (rows top to bottom).

    Cards stand upright when that fits as many as turning them a quarter turn;
    otherwise they are turned (top edge to the left).
    """
    sw, sh = sheet_size(sheet)
    w, h = card_size(size)
    upright = _grid(sw, sh, w, h)
    turned = _grid(sw, sh, h, w)
    turn = turned[0] * turned[1] > upright[0] * upright[1]
    cols, rows = turned if turn else upright
    if cols * rows == 0:
        raise CardSizeError(f"a {size} card does not fit on a {sheet} sheet with its margins")
    fw, fh = (h, w) if turn else (w, h)
    x0 = (sw - (cols * fw + (cols - 1) * GUTTER)) / 2
    y_top = sh - (sh - (rows * fh + (rows - 1) * GUTTER)) / 2
    slots = []
    for r in range(rows):
        for col in range(cols):
            bx = x0 + col * (fw + GUTTER)
            by = y_top - (r + 1) * fh - r * GUTTER
            if turn:  # rotate +90: card origin goes to the footprint's lower-right corner
                slots.append(Slot(bx + fw, by, 90, w, h))
            else:
                slots.append(Slot(bx, by, 0, w, h))
    return slots


def back_slot(front: Slot, sheet: str) -> Slot:
    """Where the back of the card at ``front`` goes on the back of the sheet.

    Requirement: the sheet flip (x -> W - x) of front.place(u, v) equals
    back.place(w - u, v) for every card point (u, v).
    """
    sw, _ = sheet_size(sheet)
    if front.angle == 0:
        # sheet-flip(x + u) = W - x - u = (W - x - w) + (w - u)
        return Slot(sw - front.x - front.w, front.y, 0, front.w, front.h)
    if front.angle == 90:
        # front.place(u, v) = (x - v, y + u); flipped: (W - x + v, y + u).
        # back at angle -90: place(u', v') = (xb + v', yb - u'); with u' = w - u:
        # (xb + v, yb - w + u) -> xb = W - x, yb = y + w.
        return Slot(sw - front.x, front.y + front.w, -90, front.w, front.h)
    raise ValueError(f"unsupported front angle {front.angle}")


def sheet_flip(x: float, y: float, sheet: str) -> tuple[float, float]:
    """Where a point on the front of a sheet lands on its back after a long-edge flip."""
    sw, _ = sheet_size(sheet)
    return (sw - x, y)


def crop_marks(slots: list[Slot]) -> list[tuple[float, float, float, float]]:
    """Crop marks for a sheet: lines (x0, y0, x1, y1) in the margin around the
    block of cards, one pair on the extension of every cut line, so that no
    mark ever prints on a card."""
    boxes = [s.box() for s in slots]
    gx0, gy0 = min(b[0] for b in boxes), min(b[1] for b in boxes)
    gx1, gy1 = max(b[2] for b in boxes), max(b[3] for b in boxes)
    xs = sorted({round(v, 3) for b in boxes for v in (b[0], b[2])})
    ys = sorted({round(v, 3) for b in boxes for v in (b[1], b[3])})
    g, n = MARK_GAP, MARK_LEN
    lines = []
    for x in xs:
        lines.append((x, gy1 + g, x, gy1 + g + n))
        lines.append((x, gy0 - g, x, gy0 - g - n))
    for y in ys:
        lines.append((gx0 - g, y, gx0 - g - n, y))
        lines.append((gx1 + g, y, gx1 + g + n, y))
    return lines
