"""Pocket field cards as PDF: one card of essentials and one annex card per station, a net card for control.

Public API (pure, no I/O, deterministic):

- :func:`render_cards` — file name -> PDF bytes
- :func:`card_deck` — the paginated cards, for tests and for the site's links
- :func:`planpack.publish.cardlayout.front_slots` / ``back_slot`` — imposition

A station's cards (see :mod:`planpack.publish.cardstory` for what is on
each side): card 1 holds the essentials, its front story (timetable,
addresses) on the front and its back story (antenna, ground, orientation,
cautions, QR, notes) on the back; card 2 is the annex. When an essentials
story does not fit its side it continues on the same side of the next card,
and both sides say so. Type never shrinks to make room. The annex is one
card: an optional block that does not fit it is left to the site and the
annex says which. The net card for control follows the stations.

Cards are numbered within their owner's file ("card 1/2"). Each side
carries the handling marking at the top and bottom, whose card it is (the
full name, wrapped, never cut), the readable revision and the UTC offset.
"""

from __future__ import annotations

import contextlib
import io
from dataclasses import dataclass, field

from reportlab import rl_config
from reportlab.lib import colors
from reportlab.lib.utils import simpleSplit
from reportlab.pdfbase.pdfmetrics import stringWidth
from reportlab.pdfgen.canvas import Canvas

from planpack.publish import carddata as cd
from planpack.publish import cardfonts, cardlayout
from planpack.publish.cardlayout import CardSizeError, card_size
from planpack.publish.cardnet import net_back, net_front
from planpack.publish.cardstory import (CardLayoutError, annex_blocks, left_out_note, station_back,
                                        station_front)
from planpack.publish.cardstyle import Look, card_scale

MARGIN = 9.0  # inside the card edge; a laminating pouch seals about 3 mm [pt]
BAR_PT = 7.5  # handling marking
FOOT_PT = 7.0
NET_CARD = "net-control"
ALL_CARDS = "all-cards"

__all__ = ["render_cards", "card_deck", "text_warnings", "Deck", "Card", "Side", "CardLayoutError", "CardSizeError",
           "NET_CARD", "ALL_CARDS", "imposed_name"]


@dataclass
class Side:
    """One side of one card: flowables with their positions inside the frame."""

    placed: list = field(default_factory=list)  # (flowable, x, y) in card coordinates
    label: str = "front"  # "front", "back", "annex front", "annex back"
    continued_from: int | None = None  # card number within the set
    continued_to: int | None = None


@dataclass
class Card:
    number: int  # within the owner's set
    of: int  # cards in the owner's set
    owner: str  # station id or NET_CARD; also the file stem
    title: str  # whose card: the station's full name or "Net card"
    front: Side
    back: Side
    deck_number: int = 0  # within the whole deck (all-cards.pdf)


@dataclass
class Chrome:
    """The fixed parts of a side for one owner: bar, title strip and footer heights [pt]."""

    bar_lines: list[str]
    bar_h: float
    title: list[str]  # the owner's full name in lines: the first beside the side label, the rest full width
    title_pt: float
    title_h: float
    strip_h: float
    foot_h: float
    foot_lines: int = 1


@dataclass
class Deck:
    size: str
    width: float
    height: float
    look: Look
    cards: list[Card]
    chrome: dict[str, Chrome] = field(default_factory=dict)
    left_out: dict[str, list[str]] = field(default_factory=dict)  # owner -> annex blocks left to the site

    @property
    def total(self) -> int:
        return len(self.cards)

    def of(self, owner: str) -> list[Card]:
        return [c for c in self.cards if c.owner == owner]


# ---------------------------------------------------------------- chrome and frames

#: The longest text at the right of the title strip, without and with continuations.
RIGHT_SHORT = "annex front"
RIGHT_LONG = "annex front · from card 9"


def _more(n: int) -> str:
    return f"more on {n} " + ("▸" if cardfonts.register().full_unicode else ">")


def _chrome(data: dict, title: str, w: float, look: Look, continues: bool = False) -> Chrome:
    """The fixed parts of every side of one owner's cards; ``continues`` leaves room for the continuation notes."""
    right = RIGHT_LONG if continues else RIGHT_SHORT
    inner = w - 2 * MARGIN
    handling = data["net"].get("handling")
    bar_lines = simpleSplit(handling, cardfonts.BOLD, BAR_PT, inner - 6) if handling else []
    bar_h = len(bar_lines) * (BAR_PT + 1.5) + 1.5 if bar_lines else 4.0  # no marking: a rule
    right_w = stringWidth(right, cardfonts.REGULAR, FOOT_PT) + 6
    for pt in sorted({look.pt("strip"), 8.0, 7.0}, reverse=True):  # a long name steps down, never below 7 pt
        lines = title_lines(title, cardfonts.BOLD, pt, inner - right_w, inner)
        if len(lines) <= 2:
            break
    th = len(lines) * pt * 1.12
    strip_h = th + 3.0
    # the footer: the revision label left, "card 1/2 · more on card 2" right; two lines when both do not fit
    right_foot = "card 9/9" + (" · " + _more(9) if continues else "")
    need = stringWidth(cd.revision_label(data), cardfonts.REGULAR, FOOT_PT) + 6 \
        + stringWidth(right_foot, cardfonts.BOLD, FOOT_PT + 0.5)
    foot = 1 if need <= inner else 2
    return Chrome(bar_lines, bar_h, lines, pt, th, strip_h, foot * (FOOT_PT + 1.5) + 2.0, foot)


def title_lines(text: str, font: str, pt: float, first_w: float, rest_w: float) -> list[str]:
    """Words of text in lines no wider than first_w (the first line) and rest_w (the others); a word too long for
    a line is broken between letters. Nothing is dropped: the whole name is printed."""
    lines: list[str] = []
    cur = ""
    for word in text.split():
        width = first_w if not lines else rest_w
        trial = (cur + " " + word).strip()
        if stringWidth(trial, font, pt) <= width:
            cur = trial
            continue
        if cur:
            lines.append(cur)
            width = rest_w
        cur = word
        while stringWidth(cur, font, pt) > width:  # break a long word
            k = len(cur)
            while k > 1 and stringWidth(cur[:k], font, pt) > width:
                k -= 1
            lines.append(cur[:k])
            cur = cur[k:]
            width = rest_w
    if cur or not lines:
        lines.append(cur)
    return lines


def _frame(w: float, h: float, ch: Chrome) -> tuple[float, float, float, float]:
    """(x, y, width, height) of the story area inside a card."""
    x = MARGIN
    y = MARGIN + ch.bar_h + ch.foot_h
    return x, y, w - 2 * MARGIN, h - 2 * MARGIN - 2 * ch.bar_h - ch.strip_h - ch.foot_h


# ---------------------------------------------------------------- pouring stories into sides

def _pour(story: list, fw: float, fh: float, what: str, max_pages: int | None = None) -> tuple[list[list], list]:
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
        _, h = f.wrap(fw, space)
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
    """The pages of one story pair, in print order (front, back, front, back, ...).

    The first card holds the start of the front story on its front and the start
    of the back story on its back. What is left of both then flows, front story
    first, over the sides of the following cards, so that no side is left empty
    while another card is needed.
    """
    f1, f_rest = _pour([("front", f) for f in front], fw, fh, f"{what} (front)", max_pages=1)
    b1, b_rest = _pour([("back", f) for f in back], fw, fh, f"{what} (back)", max_pages=1)
    rest, _ = _pour(f_rest + b_rest, fw, fh, f"{what} (continued)")
    sides = [f1[0] if f1 else [], b1[0] if b1 else []] + rest
    if len(sides) % 2:
        sides.append([])
    return sides


def _annex(data: dict, station: dict, look: Look, fw: float, fh: float,
           shared: dict | None = None) -> tuple[list[list], list[str]]:
    """The annex card: its blocks in order of importance, each on the first of its two sides with room for it
    (first fit), then a note naming what was left to the site."""
    blocks = annex_blocks(data, station, look, shared)
    heights = [b.flowable.wrap(fw, fh)[1] for b in blocks]
    sides: list[list[int]] = [[], []]  # block indexes
    used = [0.0, 0.0]
    gap = 2.0
    for i, h in enumerate(heights):
        for k in (0, 1):
            if used[k] + h <= fh + 1e-6:
                sides[k].append(i)
                used[k] += h + gap
                break
    left = [i for i in range(len(blocks)) if i not in sides[0] + sides[1]]
    note, note_side = None, 1
    while left:
        note = left_out_note([blocks[i].what for i in left], look)
        nh = note.wrap(fw, fh)[1]
        fits = [k for k in (1, 0) if used[k] + nh <= fh + 1e-6]
        if fits or not (sides[0] or sides[1]):
            note_side = fits[0] if fits else 1
            break
        k = 1 if sides[1] else 0  # the least important block on the back makes room for the note
        i = max(sides[k])
        sides[k].remove(i)
        used[k] -= heights[i] + gap
        left = sorted(left + [i])
    pages: list[list] = []
    for k, tag in ((0, "annex-front"), (1, "annex-back")):
        y, page = 0.0, []
        for i in sorted(sides[k]):
            page.append((blocks[i].flowable, y, heights[i], tag))
            y += heights[i] + gap
        if note is not None and k == note_side:
            page.append((note, y + 1.0, note.wrap(fw, fh)[1], tag))
        pages.append(page)
    return pages, [blocks[i].what for i in left]


def _station_pages(data: dict, s: dict, look: Look, fw: float, fh: float,
                   shared: dict) -> tuple[list[list], list[str], list[str]]:
    """(pages, side labels, annex blocks left to the site) of one station (fresh flowables on every call but
    the annex blocks every station shares)."""
    what = f"card of station {s['id']}"
    annex, dropped = _annex(data, s, look, fw, fh, shared.setdefault((fw, fh), {}))
    back = station_back(data, s, look, cautions_on_annex="full cautions" not in dropped)
    # a long title or name: the title gives way (it is on the annex)
    front = station_front(data, s, look)
    if len(_pour([("front", f) for f in front], fw, fh, what)[0]) > 1:  # fresh flowables after a pour that split
        front = station_front(data, s, look, compact=True)
    essentials = _sides(front, back, fw, fh, what)
    labels = ["front", "back"] * (len(essentials) // 2) + ["annex front", "annex back"] * (len(annex) // 2)
    return essentials + annex, labels, dropped


def _net_pages(data: dict, look: Look, fw: float, fh: float) -> tuple[list[list], list[str], list[str]]:
    pages = _sides(net_front(data, look), net_back(data, look), fw, fh, "net card")
    return pages, ["front", "back"] * (len(pages) // 2), []


def _continues(pages: list[list]) -> bool:
    """Does any story run over from one side to a later one?"""
    seen: set[str] = set()
    for page in pages:
        tags = {t for *_, t in page}
        if tags & seen:
            return True
        seen |= tags
    return False


def card_deck(data: dict, size: str | None = None) -> Deck:
    """Lay out every card of the net (no drawing yet)."""
    cardfonts.register()
    size = size or data["net"].get("card_size") or cardlayout.DEFAULT_CARD_SIZE
    w, h = card_size(size)
    owners = [s["id"] for s in data["stations"]]
    if NET_CARD in owners or ALL_CARDS in owners:
        raise CardLayoutError(f"a station id '{NET_CARD}' or '{ALL_CARDS}' would overwrite the net card files; rename the station")
    look = Look(width=w - 2 * MARGIN, scale=card_scale(w, h))
    deck = Deck(size, w, h, look, [])
    shared: dict = {}  # annex blocks every station shares, by frame size
    jobs = [(s["id"], s["name"], lambda fw, fh, s=s: _station_pages(data, s, look, fw, fh, shared))
            for s in data["stations"]]
    if data.get("links"):
        jobs.append((NET_CARD, "Net card for control", lambda fw, fh: _net_pages(data, look, fw, fh)))
    for owner, title, lay in jobs:
        ch = _chrome(data, title, w, look)
        pages, labels, dropped = lay(*_frame(w, h, ch)[2:])
        if _continues(pages):  # room for "from card N" and "more on card N": lay out again
            ch = _chrome(data, title, w, look, continues=True)
            pages, labels, dropped = lay(*_frame(w, h, ch)[2:])
        deck.chrome[owner], deck.left_out[owner] = ch, dropped
        fx, fy, fw, fh = _frame(w, h, ch)
        card_of = [1 + i // 2 for i in range(len(pages))]
        made = [Side(placed=[(f, fx, fy + fh - y - fh_) for f, y, fh_, _ in page], label=labels[i])
                for i, page in enumerate(pages)]
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
        n = len(made) // 2
        for i in range(0, len(made), 2):
            deck.cards.append(Card(card_of[i], n, owner, title, made[i], made[i + 1], len(deck.cards) + 1))
    return deck


# ---------------------------------------------------------------- drawing

def _footer_left(data: dict, width: float) -> str:
    """The revision a person can read aloud, and the UTC offset when there is room for both."""
    rev = cd.revision_label(data)
    both = f"{rev} · {cd.offset_label(data)}"
    return both if stringWidth(both, cardfonts.REGULAR, FOOT_PT) <= width else rev


def draw_side(c: Canvas, data: dict, deck: Deck, card: Card, back: bool) -> None:
    """Draw one side of a card with its lower-left corner at the canvas origin."""
    w, h = deck.width, deck.height
    ch = deck.chrome[card.owner]
    side = card.back if back else card.front
    c.saveState()
    c.setFillColor(colors.white)
    c.rect(0, 0, w, h, stroke=0, fill=1)
    c.setFillColor(colors.black)
    c.setStrokeColor(colors.black)
    B, R = cardfonts.BOLD, cardfonts.REGULAR
    # Handling marking, top and bottom: white on a black bar, the strongest contrast there is.
    for y in (h - MARGIN - ch.bar_h, MARGIN):
        if ch.bar_lines:
            c.setFillColor(colors.black)
            c.rect(MARGIN, y, w - 2 * MARGIN, ch.bar_h, stroke=0, fill=1)
            c.setFillColor(colors.white)
            c.setFont(B, BAR_PT)
            for i, line in enumerate(ch.bar_lines):
                c.drawCentredString(w / 2, y + ch.bar_h - (i + 1) * (BAR_PT + 1.5) + 1.6, line)
            c.setFillColor(colors.black)
        else:
            c.setLineWidth(1.2)
            c.line(MARGIN, y + ch.bar_h / 2, w - MARGIN, y + ch.bar_h / 2)
    # Whose card (the full name, wrapped), which side, continued from.
    strip_top = h - MARGIN - ch.bar_h - 1.0
    pt = ch.title_pt
    c.setFont(B, pt)
    for i, line in enumerate(ch.title):
        c.drawString(MARGIN, strip_top - pt * (0.86 + 1.12 * i), line)
    right = side.label.upper() if side.label in ("front", "back") else side.label
    if side.continued_from:
        right += f" · from card {side.continued_from}"
    c.setFont(R, FOOT_PT)
    c.drawRightString(w - MARGIN, strip_top - FOOT_PT - 0.5, right)
    c.setLineWidth(0.6)
    rule_y = h - MARGIN - ch.bar_h - ch.strip_h + 0.8
    c.line(MARGIN, rule_y, w - MARGIN, rule_y)
    # Story.
    fx, fy, fw, fh = _frame(w, h, ch)
    if side.placed:
        for f, x, y in side.placed:
            f.drawOn(c, x, y)
    else:
        c.setFont(R, FOOT_PT)
        c.drawCentredString(w / 2, fy + fh / 2, "(nothing more on this side)")
    # Footer: the revision (and the UTC offset), the card number in the owner's file, where the story goes on.
    foot_y = MARGIN + ch.bar_h + 2.0 + (ch.foot_lines - 1) * (FOOT_PT + 1.5)
    c.setLineWidth(0.6)
    c.line(MARGIN, foot_y + FOOT_PT + 1.0, w - MARGIN, foot_y + FOOT_PT + 1.0)
    number = f"card {card.number}/{card.of}" + (" · " + _more(side.continued_to) if side.continued_to else "")
    nw = stringWidth(number, B, FOOT_PT + 0.5)
    c.setFont(R, FOOT_PT)
    room = w - 2 * MARGIN - (nw + 6 if ch.foot_lines == 1 else 0)
    c.drawString(MARGIN, foot_y, _footer_left(data, room))
    c.setFont(B, FOOT_PT + 0.5)
    c.drawRightString(w - MARGIN, foot_y - (ch.foot_lines - 1) * (FOOT_PT + 1.5), number)
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
    with _binary_streams():
        return _render(data, size, impose)


@contextlib.contextmanager
def _binary_streams():
    """Compressed streams without the ASCII85 layer: a quarter smaller, and encoding them was a tenth of the
    rendering time. reportlab reads this setting when it writes, so it is set around the cards and put back."""
    old = rl_config.useA85
    rl_config.useA85 = 0
    try:
        yield
    finally:
        rl_config.useA85 = old


def _render(data: dict, size: str | None, impose: str | None) -> dict[str, bytes]:
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
