"""Pocket field cards as PDF: one card set per station, a net card for control.

Public API (pure, no I/O, deterministic):

- :func:`render_cards` — file name -> PDF bytes
- :func:`card_deck` — the paginated cards, for tests and for the site's links
- :func:`planpack.publish.cardlayout.front_slots` / ``back_slot`` — imposition

A card has two sides. A station's front story (schedule, channels, sun,
instructions) and back story (antenna cut sheet, SWR, grounding, exposure,
safety, QR code) are poured into pages of the card's size; when a story does
not fit one side it continues on the same side of the next card, and both
cards say so ("continued on card 4 / 17"). Type never shrinks to make room.

Every card is numbered within the whole deck ("3 / 17"): stations in plan
order, then the net card. Each page carries the handling marking at the top
and bottom, the plan revision and the card number.
"""

from __future__ import annotations

import io
from dataclasses import dataclass, field

from reportlab.lib import colors
from reportlab.pdfbase.pdfmetrics import stringWidth
from reportlab.pdfgen.canvas import Canvas

from planpack.publish import cardfonts, cardlayout
from planpack.publish.cardlayout import CardSizeError, card_size
from planpack.publish.cardstory import (CardLayoutError, control_station, net_back, net_front, station_back,
                                        station_front)

MARGIN = 9.0  # inside the card edge; a laminating pouch seals about 3 mm [pt]
BAR_H = 11.0  # handling bar height [pt]
BAR_PT = 7.5
SUB_H = 12.0  # the line naming whose card it is
FOOT_H = 9.5
FOOT_PT = 6.5
NET_CARD = "net-control"
ALL_CARDS = "all-cards"

__all__ = ["render_cards", "card_deck", "text_warnings", "Deck", "Card", "Side", "CardLayoutError", "CardSizeError",
           "NET_CARD", "ALL_CARDS", "imposed_name"]


@dataclass
class Side:
    """One side of one card: flowables with their positions inside the frame."""

    placed: list = field(default_factory=list)  # (flowable, x, y) in card coordinates
    continued_from: int | None = None  # card number
    continued_to: int | None = None


@dataclass
class Card:
    number: int
    owner: str  # station id or NET_CARD; also the file stem
    title: str  # whose card: station name or "Net card"
    front: Side
    back: Side


@dataclass
class Deck:
    size: str
    width: float
    height: float
    cards: list[Card]

    @property
    def total(self) -> int:
        return len(self.cards)

    def of(self, owner: str) -> list[Card]:
        return [c for c in self.cards if c.owner == owner]


def _frame(w: float, h: float) -> tuple[float, float, float, float]:
    """(x, y, width, height) of the story area inside a card."""
    x = MARGIN
    y = MARGIN + BAR_H + FOOT_H
    return x, y, w - 2 * MARGIN, h - 2 * MARGIN - 2 * BAR_H - SUB_H - FOOT_H


def _paginate(story: list, fw: float, fh: float, what: str, max_pages: int | None = None) -> tuple[list[list], list]:
    """Pour (tag, flowable) pairs into pages of fw x fh.

    Returns (pages, left over): each page is [(flowable, y_from_top, height, tag)];
    with max_pages, pouring stops there and the rest of the story is returned.
    Splits tables by rows and paragraphs by lines; anything that cannot fit an
    empty page is an error, never clipped.
    """
    pages: list[list] = [[]]
    used = 0.0
    todo = list(story)
    while todo:
        tag, f = todo.pop(0)
        space = fh - used
        before = getattr(f, "spaceBefore", 0) if pages[-1] else 0
        w, h = f.wrap(fw, space)
        if h + before <= space + 1e-6:
            used += before
            pages[-1].append((f, used, h, tag))
            used += h + (getattr(f, "spaceAfter", 0) or 0)
            continue
        if not pages[-1]:
            f._full_side = True  # a kept block taller than a whole side may now break up
        parts = f.split(fw, space - before) if space - before > 0 else []
        if parts and len(parts) > 1:
            todo[:0] = [(tag, p) for p in parts]
            continue
        if not pages[-1]:
            raise CardLayoutError(f"{what}: a block {h:.0f} pt tall does not fit on an empty card side "
                                  f"({fh:.0f} pt); use a larger card size")
        if max_pages is not None and len(pages) == max_pages:
            return pages, [(tag, f)] + todo
        pages.append([])
        used = 0.0
        todo.insert(0, (tag, f))
    if not pages[-1]:
        pages.pop()
    return pages, []


def _sides(front: list, back: list, fw: float, fh: float, what: str) -> list[list]:
    """The pages of one card set, in print order (front, back, front, back, ...).

    The first card holds the start of the front story on its front and the start
    of the back story on its back. What is left of both then flows, front story
    first, over the sides of the following cards, so that no side is left empty
    while another card is needed.
    """
    f1, f_rest = _paginate([("front", f) for f in front], fw, fh, f"{what} (front)", max_pages=1)
    b1, b_rest = _paginate([("back", f) for f in back], fw, fh, f"{what} (back)", max_pages=1)
    rest, _ = _paginate(f_rest + b_rest, fw, fh, f"{what} (continued)")
    sides = [f1[0] if f1 else [], b1[0] if b1 else []] + rest
    if len(sides) % 2:
        sides.append([])
    return sides


def card_deck(data: dict, size: str | None = None) -> Deck:
    """Lay out every card of the net (no drawing yet)."""
    cardfonts.register()
    size = size or data["net"].get("card_size") or cardlayout.DEFAULT_CARD_SIZE
    w, h = card_size(size)
    fx, fy, fw, fh = _frame(w, h)
    owners = [s["id"] for s in data["stations"]]
    if NET_CARD in owners or ALL_CARDS in owners:
        raise CardLayoutError(f"a station id '{NET_CARD}' or '{ALL_CARDS}' would overwrite the net card files; rename the station")
    sets = [(s["id"], s["name"], _sides(station_front(data, s, fw), station_back(data, s, fw), fw, fh,
                                        f"card of station {s['id']}")) for s in data["stations"]]
    if data.get("links"):
        sets.append((NET_CARD, "Net card", _sides(net_front(data, fw), net_back(data, fw), fw, fh, "net card")))
    cards: list[Card] = []
    for owner, title, pages in sets:
        first = len(cards) + 1
        card_of = [first + i // 2 for i in range(len(pages))]
        made = [Side(placed=[(f, fx, fy + fh - y - fh_) for f, y, fh_, _ in page]) for page in pages]
        for i, page in enumerate(pages):
            tags = [t for *_, t in page]
            if not tags:
                continue
            # the story this side starts with came from an earlier side?
            earlier = [k for k in range(i) if tags[0] in [t for *_, t in pages[k]]]
            if earlier:
                made[i].continued_from = card_of[earlier[-1]]
            later = [k for k in range(i + 1, len(pages)) if tags[-1] in [t for *_, t in pages[k]]]
            if later:
                made[i].continued_to = card_of[later[0]]
        for i in range(0, len(made), 2):
            cards.append(Card(card_of[i], owner, title, made[i], made[i + 1]))
    return Deck(size, w, h, cards)


# ---------------------------------------------------------------- drawing

def _centred(c: Canvas, text: str, font: str, pt: float, cx: float, y: float) -> None:
    c.setFont(font, pt)
    c.drawCentredString(cx, y, text)


def _fit(text: str, font: str, pt: float, width: float) -> str:
    """Text cut with an ellipsis to fit width (only for the one-line name strip; the full name is on the card)."""
    if stringWidth(text, font, pt) <= width:
        return text
    while text and stringWidth(text + "…", font, pt) > width:
        text = text[:-1]
    return text + "…"


def draw_side(c: Canvas, data: dict, deck: Deck, card: Card, back: bool) -> None:
    """Draw one side of a card with its lower-left corner at the canvas origin."""
    w, h = deck.width, deck.height
    side = card.back if back else card.front
    handling = data["net"].get("handling")
    c.saveState()
    c.setFillColor(colors.white)
    c.rect(0, 0, w, h, stroke=0, fill=1)
    c.setFillColor(colors.black)
    c.setStrokeColor(colors.black)
    B, R = cardfonts.BOLD, cardfonts.REGULAR
    # Handling marking, top and bottom: white on a black bar, the strongest contrast there is.
    for y in (h - MARGIN - BAR_H, MARGIN):
        if handling:
            c.setFillColor(colors.black)
            c.rect(MARGIN, y, w - 2 * MARGIN, BAR_H, stroke=0, fill=1)
            c.setFillColor(colors.white)
            _centred(c, _fit(handling, B, BAR_PT, w - 2 * MARGIN - 4), B, BAR_PT, w / 2, y + 3.0)
            c.setFillColor(colors.black)
        else:
            c.setLineWidth(1.2)
            c.line(MARGIN, y + BAR_H / 2, w - MARGIN, y + BAR_H / 2)
    # Whose card, which side, continued from.
    sub_y = h - MARGIN - BAR_H - SUB_H + 2.5
    left = card.title
    right = ("BACK" if back else "FRONT")
    if side.continued_from:
        right = f"cont'd from card {side.continued_from} / {deck.total} · " + right
    c.setFont(R, FOOT_PT)
    rw = stringWidth(right, R, FOOT_PT)
    c.drawRightString(w - MARGIN, sub_y, right)
    c.setFont(B, 8.5)
    c.drawString(MARGIN, sub_y, _fit(left, B, 8.5, w - 2 * MARGIN - rw - 6))
    c.setLineWidth(0.6)
    c.line(MARGIN, sub_y - 2.2, w - MARGIN, sub_y - 2.2)
    # Story.
    if side.placed:
        for f, x, y in side.placed:
            f.drawOn(c, x, y)
    else:
        fx, fy, fw, fh = _frame(w, h)
        c.setFont(R, 7)
        c.drawCentredString(w / 2, fy + fh / 2, "(nothing more on this side)")
    # Footer: revision and card number; the continuation notice in bold.
    foot_y = MARGIN + BAR_H + 2.8
    c.setLineWidth(0.6)
    c.line(MARGIN, foot_y + FOOT_PT + 0.8, w - MARGIN, foot_y + FOOT_PT + 0.8)
    c.setFont(R, FOOT_PT)
    c.drawString(MARGIN, foot_y, f"rev {data['revision']['id']}")
    if side.continued_to:
        c.setFont(B, FOOT_PT)
        c.drawCentredString(w / 2, foot_y, f"continued on card {side.continued_to} / {deck.total}")
    c.setFont(B, FOOT_PT + 1)
    c.drawRightString(w - MARGIN, foot_y, f"card {card.number} / {deck.total}")
    c.restoreState()


def _canvas(buf, pagesize, data: dict, title: str) -> Canvas:
    c = Canvas(buf, pagesize=pagesize, invariant=1, pageCompression=1,
               initialFontName=cardfonts.REGULAR, initialFontSize=7)
    rev = data["revision"]["id"]
    c.setTitle(title)
    c.setAuthor("planpack")
    c.setCreator(f"planpack {data.get('generator', {}).get('version', '')}".strip())
    c.setSubject(f"net {data['net']['id']}, plan revision {rev}")
    c.setKeywords(f"revision {rev}")
    return c


def _cards_pdf(data: dict, deck: Deck, cards: list[Card], title: str) -> bytes:
    buf = io.BytesIO()
    c = _canvas(buf, (deck.width, deck.height), data, title)
    for card in cards:
        for back in (False, True):
            draw_side(c, data, deck, card, back)
            c.showPage()
    c.save()
    return buf.getvalue()


def imposed_name(sheet: str) -> str:
    return f"cards-{sheet}.pdf"


def _imposed_pdf(data: dict, deck: Deck, sheet: str) -> bytes:
    fronts = cardlayout.front_slots(sheet, deck.size)
    backs = [cardlayout.back_slot(s, sheet) for s in fronts]
    marks_f, marks_b = cardlayout.crop_marks(fronts), cardlayout.crop_marks(backs)
    buf = io.BytesIO()
    c = _canvas(buf, cardlayout.sheet_size(sheet), data, f"{data['net']['title']}: cards on {sheet} sheets")
    per = len(fronts)
    for start in range(0, deck.total, per):
        group = deck.cards[start:start + per]
        for back, slots, marks in ((False, fronts, marks_f), (True, backs, marks_b)):
            c.setLineWidth(0.4)
            c.setStrokeColor(colors.black)
            for x0, y0, x1, y1 in marks:
                c.line(x0, y0, x1, y1)
            for card, slot in zip(group, slots):
                c.saveState()
                c.translate(slot.x, slot.y)
                c.rotate(slot.angle)
                p = c.beginPath()
                p.rect(0, 0, deck.width, deck.height)
                c.clipPath(p, stroke=0, fill=0)
                draw_side(c, data, deck, card, back)
                c.restoreState()
            c.showPage()
    c.save()
    return buf.getvalue()


def render_cards(data: dict, size: str | None = None, impose: str | None = None) -> dict[str, bytes]:
    """Every card PDF of a compiled plan.

    Parameters
    ----------
    data : dict
        ``CompiledPlan.data`` (the content of plan.json).
    size : str, optional
        "3.5x5in", "a6" or "3x5in"; default the plan's ``net.card_size``.
    impose : str, optional
        "a4" or "letter": also write the cards several to a sheet with crop
        marks, backs mirrored for long-edge duplex.

    Returns
    -------
    dict
        File name -> PDF bytes: ``<station-id>.pdf`` for each station,
        ``net-control.pdf`` (when the plan has links), ``all-cards.pdf`` and,
        with impose, ``cards-<sheet>.pdf``. Sorted by name.

    Raises
    ------
    CardSizeError, CardLayoutError
        For an unknown size or sheet, or content that cannot be placed without clipping.
    """
    if impose is not None:
        cardlayout.sheet_size(impose)
    deck = card_deck(data, size)
    out: dict[str, bytes] = {}
    owners = [s["id"] for s in data["stations"]] + ([NET_CARD] if deck.of(NET_CARD) else [])
    for owner in owners:
        cards = deck.of(owner)
        title = cards[0].title
        out[f"{owner}.pdf"] = _cards_pdf(data, deck, cards, f"{data['net']['title']}: {title}")
    out[f"{ALL_CARDS}.pdf"] = _cards_pdf(data, deck, deck.cards, f"{data['net']['title']}: all cards")
    if impose is not None:
        out[imposed_name(impose)] = _imposed_pdf(data, deck, impose)
    return dict(sorted(out.items()))


def text_warnings(data: dict) -> list[str]:
    """Plan text the card font cannot print (those characters would show as empty boxes)."""
    net = data["net"]
    texts = [("net.title", net["title"]), ("net.handling", net.get("handling") or ""),
             ("net.instructions", net.get("instructions_md") or "")]
    texts += [(f"stations.{s['id']}.name", s["name"]) for s in data["stations"]]
    texts += [(f"channels[{c['id']}].note", c.get("note") or "") for c in data["channels"]]
    out = []
    for where, text in texts:
        missing = cardfonts.missing_glyphs(text)
        if missing:
            shown = " ".join(f"U+{ord(ch):04X}" for ch in missing[:8])
            out.append(f"{where}: the card font has no glyph for {shown}; those characters print as boxes")
    return out
