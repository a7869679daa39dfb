"""What goes on the cards: reportlab flowables built from the compiled plan's data.

Pure presentation. Every figure is taken from ``CompiledPlan.data`` and only
formatted here (kHz, metres to two decimals, feet and inches); nothing is
recomputed. Each builder returns a list of flowables (a "story") that the
paginator in :mod:`planpack.publish.cards` pours onto card pages.

Type sizes [pt]: nothing below :data:`MIN_PT`. The hourly table is the
largest text after the station name, because it is what a team reads most.
"""

from __future__ import annotations

from xml.sax.saxutils import escape

from reportlab.lib import colors
from reportlab.lib.enums import TA_LEFT
from reportlab.lib.styles import ParagraphStyle
from reportlab.pdfbase.pdfmetrics import stringWidth
from reportlab.platypus import Flowable, Paragraph, Spacer, Table, TableStyle

from planpack.publish import cardfonts, qr
from planpack.publish.cardtext import markdown_blocks

MIN_PT = 6.0
BODY_PT = 7.0
TABLE_PT = 7.5
R, B = cardfonts.REGULAR, cardfonts.BOLD
SHADE = colors.Color(0.86, 0.86, 0.86)  # zebra rows: light enough for black text on a laser print
CELL_PAD = 1.6


class CardLayoutError(ValueError):
    """Something in the plan cannot be laid out on the chosen card without clipping."""


def _style(name: str, size: float, font: str = R, lead: float | None = None, **kw) -> ParagraphStyle:
    return ParagraphStyle(name, fontName=font, fontSize=size, leading=lead or size * 1.22,
                          alignment=TA_LEFT, textColor=colors.black, bulletFontName=B,
                          bulletFontSize=size, **kw)


ST = {
    "body": _style("body", BODY_PT),
    "small": _style("small", 6.5),
    "head": _style("head", 8.0, B, spaceBefore=3.5, spaceAfter=1.5),
    "title": _style("title", 8.0, B),
    "station": _style("station", 11.0, B, lead=12.5),
    "item": _style("item", BODY_PT, leftIndent=8, bulletIndent=1),
    "item2": _style("item2", BODY_PT, leftIndent=16, bulletIndent=9),
    "smallitem": _style("smallitem", 6.5, leftIndent=8, bulletIndent=0),
    "label": _style("label", 6.0),
    "value": _style("value", 9.0, B, lead=10.5),
}


def P(text: str, style: str = "body") -> Paragraph:
    """A paragraph of already-escaped markup."""
    return Paragraph(text, ST[style])


def T(text: object, style: str = "body") -> Paragraph:
    """A paragraph of plain text (escaped here)."""
    return Paragraph(escape(str(text)), ST[style])


def fmt_khz(v: float) -> str:
    """Frequency as printed [kHz]: whole kHz without decimals, else up to three decimals."""
    if float(v).is_integer():
        return str(int(v))
    return f"{v:.3f}".rstrip("0").rstrip(".")


def fmt_m(v: float) -> str:
    """A length as printed: metres to the centimetre."""
    return f"{v:.2f}"


def feet_inches(data_cut: dict, key: str) -> str:
    """The feet-and-inches form of cut[key]: the compiled plan's own string when it has one."""
    stem = key[:-2] if key.endswith("_m") else key
    for k in (stem + "_ft_in", stem + "_ftin", stem + "_feet_inches", key + "_ft_in"):
        if isinstance(data_cut.get(k), str):
            return data_cut[k]
    from planpack.antennas.cut import feet_inches as convert  # same convention as the compiler

    return convert(data_cut[key]) or ""


# ---------------------------------------------------------------- lookups

def station_by_id(data: dict, sid: str) -> dict:
    return next(s for s in data["stations"] if s["id"] == sid)


def control_station(data: dict) -> dict | None:
    cid = data["net"].get("control")
    if cid:
        return station_by_id(data, cid)
    return next((s for s in data["stations"] if s["role"] == "control"), None)


def channel_map(data: dict) -> dict[str, dict]:
    return {c["id"]: c for c in data["channels"]}


def _table(rows, widths, style_cmds, repeat=0) -> Table:
    t = Table(rows, colWidths=widths, repeatRows=repeat, hAlign="LEFT")
    base = [("FONT", (0, 0), (-1, -1), R, BODY_PT),
            ("TEXTCOLOR", (0, 0), (-1, -1), colors.black),
            ("LEFTPADDING", (0, 0), (-1, -1), CELL_PAD), ("RIGHTPADDING", (0, 0), (-1, -1), CELL_PAD),
            ("TOPPADDING", (0, 0), (-1, -1), 0.6), ("BOTTOMPADDING", (0, 0), (-1, -1), 1.2),
            ("VALIGN", (0, 0), (-1, -1), "MIDDLE")]
    t.setStyle(TableStyle(base + style_cmds))
    return t


def _fit_widths(columns: list[list[tuple[str, str, float]]], avail: float, what: str) -> list[float]:
    """Column widths that hold every cell's text (font, size) on one line."""
    widths = [max(stringWidth(text, font, size) for text, font, size in col) + 2 * CELL_PAD + 0.5 for col in columns]
    if sum(widths) > avail + 0.01:
        raise CardLayoutError(f"{what} needs {sum(widths):.0f} pt of width but the card has {avail:.0f} pt; "
                              "use shorter channel ids or a wider card size")
    spare = (avail - sum(widths)) / len(widths)
    return [w + spare for w in widths]


# ---------------------------------------------------------------- front

def header_block(data: dict, station: dict | None, avail: float, subtitle: str | None = None) -> list[Flowable]:
    """Net title and validity on one small line, then the three addresses in large bold type.

    The station's name is in the strip at the top of every side (drawn by the page chrome).
    """
    net = data["net"]
    out: list[Flowable] = [P(f"<b>{escape(net['title'])}</b> · {escape(net['valid']['from'])} to "
                             f"{escape(net['valid']['to'])} · {escape(net['timezone'])}", "small")]
    if subtitle:
        out.append(T(subtitle, "small"))
    if station is not None:
        ctl = control_station(data)
        cells = [("SELF", station["address"]), ("NET", net.get("net_address") or "none"),
                 ("CONTROL", ctl["address"] if ctl else "none")]
        rows = [[T(lbl, "label") for lbl, _ in cells], [T(v, "value") for _, v in cells]]
        widths = [avail * f for f in (0.34, 0.33, 0.33)]
        out.append(_table(rows, widths, [("LEFTPADDING", (0, 0), (-1, -1), 0), ("TOPPADDING", (0, 0), (-1, -1), 0),
                                         ("BOTTOMPADDING", (0, 0), (-1, -1), 0)]))
    return out


def _local_order(hours: list[dict]) -> list[dict]:
    """The 24 hours in local-time order, so a team reads its own day top to bottom."""
    return sorted(hours, key=lambda h: (h["local_time"], h["utc_hour"]))


def hourly_table(data: dict, avail: float) -> Table:
    """Local | UTC | first: ch kHz mode | second: ch kHz mode, 24 rows in local-time order."""
    chans = channel_map(data)

    def block(cid):
        if cid is None:
            return ["none", "", ""]
        c = chans[cid]
        return [cid, fmt_khz(c["freq_khz"]), c["mode"]]

    head1 = ["Local", "UTC", "FIRST", "", "", "SECOND", "", ""]
    head2 = ["", "", "ch", "kHz", "mode", "ch", "kHz", "mode"]
    body = []
    for h in _local_order(data["net_schedule"]["hours"]):
        second = block(h["second"]) if h["second"] is not None else ["—", "", ""]
        body.append([h["local_time"], f"{h['utc_hour']:02d}"] + block(h["first"]) + second)
    fonts = [B, R, B, B, R, R, R, R]
    cols = [[(r[i], fonts[i], TABLE_PT) for r in body] + [(head1[i] if i not in (2, 5) else "", B, 6.5), (head2[i], B, 6.5)]
            for i in range(8)]
    widths = _fit_widths(cols, avail, "the hourly table")
    rows = [head1, head2] + body
    lead = TABLE_PT * 1.12
    cmds = [("FONT", (0, 0), (-1, 1), B, 6.5, 7.0), ("SPAN", (2, 0), (4, 0)), ("SPAN", (5, 0), (7, 0)),
            ("FONT", (0, 2), (-1, -1), R, TABLE_PT, lead), ("FONT", (0, 2), (0, -1), B, TABLE_PT, lead),
            ("FONT", (2, 2), (3, -1), B, TABLE_PT, lead), ("TOPPADDING", (0, 0), (-1, -1), 0.3),
            ("BOTTOMPADDING", (0, 0), (-1, -1), 1.0),
            ("LINEBELOW", (0, 1), (-1, 1), 1.0, colors.black),
            ("LINEBEFORE", (2, 0), (2, -1), 0.8, colors.black), ("LINEBEFORE", (5, 0), (5, -1), 0.5, colors.black),
            ("ALIGN", (3, 0), (3, -1), "RIGHT"), ("ALIGN", (6, 0), (6, -1), "RIGHT"),
            ("ALIGN", (2, 0), (2, 0), "LEFT"), ("ALIGN", (5, 0), (5, 0), "LEFT")]
    for i in range(len(body)):
        if i % 2 == 1:
            cmds.append(("BACKGROUND", (0, i + 2), (-1, i + 2), SHADE))
        if i and body[i][2] != body[i - 1][2]:  # the first channel changes: a heavier rule, not a colour
            cmds.append(("LINEABOVE", (0, i + 2), (-1, i + 2), 1.0, colors.black))
    return _table(rows, widths, cmds, repeat=2)


def _scan_marks(data: dict, sid: str) -> dict[str, str]:
    """Channel id -> which of the station's ALE scan groups hold it ("all groups" shown as "yes")."""
    groups = [g for sl in data.get("scan_lists", []) if sl["station"] == sid for g in sl["groups"]]
    marks: dict[str, str] = {}
    for cid in {c for g in groups for c in g["channels"]}:
        names = [g["name"] for g in groups if cid in g["channels"]]
        if len(names) == len(groups):
            marks[cid] = "yes"
        else:
            marks[cid] = "+".join(n for n in names if n != "all") or "all"
    return marks


def channel_table(data: dict, station: dict, avail: float) -> list[Flowable]:
    marks = _scan_marks(data, station["id"])
    wasted = set()
    note = None
    groups = []
    for sl in data.get("scan_lists", []):
        if sl["station"] == station["id"]:
            wasted |= set(sl.get("wasted", []))
            note = sl.get("note")
            groups = sl["groups"]
    rows = [["ch", "kHz", "mode", "ALE scan", "hours / note"]]
    for c in data["channels"]:
        scan = marks.get(c["id"], "–")
        extra = []
        if c.get("hours_local"):
            extra.append(" ".join(c["hours_local"]))
        if c.get("note"):
            extra.append(c["note"])
        if c["id"] in wasted:
            extra.append("scanned, serves no link")
        rows.append([c["id"], fmt_khz(c["freq_khz"]), c["mode"], scan, ", ".join(extra)])
    fixed = [[(r[i], B if i in (0, 3) else R, BODY_PT) for r in rows] for i in range(4)]
    w4 = [max(stringWidth(t, f, s) for t, f, s in col) + 2 * CELL_PAD + 0.5 for col in fixed]
    rest = avail - sum(w4)
    if rest < 30:
        raise CardLayoutError("the channel list does not fit the card's width; use shorter channel ids")
    body_rows = [r[:4] + [T(r[4], "small")] for r in rows[1:]]
    cmds = [("FONT", (0, 0), (-1, 0), B, 6.5), ("FONT", (0, 1), (0, -1), B, BODY_PT), ("FONT", (3, 1), (3, -1), B, BODY_PT),
            ("LINEBELOW", (0, 0), (-1, 0), 0.8, colors.black), ("ALIGN", (1, 0), (1, -1), "RIGHT")]
    for i in range(1, len(rows)):
        if i % 2 == 0:
            cmds.append(("BACKGROUND", (0, i), (-1, i), SHADE))
    out: list[Flowable] = [T("Channels", "head"), _table([rows[0]] + body_rows, w4 + [rest], cmds, repeat=1)]
    if groups:
        bits = []
        for g in groups:
            when = ""
            if g.get("utc_hours"):
                from planpack.publish.qr import hour_spans
                when = " (UTC " + hour_spans(g["utc_hours"]) + ")"
            bits.append(f"{g['name']}{when}: {len(g['channels'])} ch, scan {g['scan_period_s']:.1f} s, "
                        f"call {g['call_time_s']:.1f} s")
        out.append(T("ALE scan list — " + "; ".join(bits), "small"))
    if note:
        out.append(T(note, "small"))
    return out


def sun_block(station: dict) -> list[Flowable]:
    sun = station.get("sun") or {}
    rise, set_ = sun.get("sunrise_local"), sun.get("sunset_local")
    head = T(f"Sun here on {sun.get('date', '?')}", "head")
    if rise is None and set_ is None:
        return [head, P("No sunrise or sunset that day (polar day or night).")]

    def one(word, loc, utc):  # no-break spaces keep each time whole on one line
        if not loc:
            return f"{word}: none"
        return f"<b>{word}\u00a0{escape(loc)}</b>\u00a0({escape(utc or '')}\u00a0UTC)"
    return [head, P(one("rise", rise, sun.get("sunrise_utc")) + " · " + one("set", set_, sun.get("sunset_utc")))]


def instructions_block(data: dict) -> list[Flowable]:
    src = data["net"].get("instructions_md")
    if not src:
        return []
    out: list[Flowable] = [T("Standing instructions", "head")]
    for b in markdown_blocks(src):
        if b.kind == "heading":
            out.append(P(b.markup, "title"))
        elif b.kind == "item":
            out.append(Paragraph(b.markup, ST["item" if b.depth == 0 else "item2"], bulletText=b.bullet or None))
        else:
            out.append(P(b.markup))
        out.append(Spacer(1, 1.2))
    return out


def station_front(data: dict, station: dict, avail: float) -> list[Flowable]:
    return (header_block(data, station, avail)
            + [Spacer(1, 3), hourly_table(data, avail)]
            + [Keep(channel_table(data, station, avail)), Keep(sun_block(station))] + instructions_block(data))


# ---------------------------------------------------------------- back

CUT_LABELS = [  # key in antennas[].cut -> label on the card (order of the cut sheet)
    ("total_m", "Total span, tip to tip"),
    ("leg_m", "Each leg, feed point to tip"),
    ("total_cut_with_extra_m", "Wire to cut, total (with loops)"),
    ("leg_cut_with_extra_m", "Wire to cut, each leg (with loops)"),
    ("end_height_m", "Leg ends at height"),
    ("min_end_height_m", "Leg ends no lower than"),
    ("reflector_m", "Reflector wire"),
    ("reflector_cut_with_extra_m", "Reflector to cut (with loops)"),
    ("reflector_below_m", "Reflector below the dipole"),
    ("reflector_height_m", "Reflector height"),
    ("spacing_m", "Wire spacing"),
    ("end_allowance_m", "Extra at each end for loops"),
    ("rule_of_thumb_total_m", "Check: 468/f rule, total"),
]
TOTAL_LABEL = {"whip": "Whip length", "folded-terminated": "Length, end to end"}
SKIP_CUT = {"rule_of_thumb_leg_m"}  # the rule's total is shown; its half adds nothing
KIND_WORDS = {"dipole": "half-wave dipole", "inverted-v": "inverted-V dipole", "dipole-reflector": "dipole over a reflector wire",
              "folded-terminated": "terminated folded dipole (broadband)", "whip": "vertical whip"}


def _cut_rows(cut: dict, kind: str = "") -> list[tuple[str, str, str]]:
    rows, seen = [], set(SKIP_CUT)
    for key, label in CUT_LABELS:
        if isinstance(cut.get(key), (int, float)) and not isinstance(cut.get(key), bool):
            if key == "total_m":
                label = TOTAL_LABEL.get(kind, label)
            rows.append((label, fmt_m(cut[key]) + " m", feet_inches(cut, key)))
            seen.add(key)
    for key in sorted(cut):  # any further length the compiler reports is shown, not dropped
        v = cut[key]
        if key not in seen and key.endswith("_m") and isinstance(v, (int, float)) and not isinstance(v, bool):
            rows.append((key[:-2].replace("_", " ").capitalize(), fmt_m(v) + " m", feet_inches(cut, key)))
    return rows


def antenna_block(data: dict, station: dict, ant: dict, avail: float) -> list[Flowable]:
    out: list[Flowable] = [T(f"Antenna {ant['id']}: {KIND_WORDS.get(ant['kind'], ant['kind'])}", "head")]
    facts = []
    cut = ant.get("cut") or {}

    def num(key):
        for src in (ant, cut):
            if isinstance(src.get(key), (int, float)) and not isinstance(src.get(key), bool):
                return src[key]
        return None
    if isinstance(ant.get("height_m"), (int, float)):
        where = {"inverted-v": "apex", "whip": "base"}.get(ant["kind"], "feed point")
        facts.append(f"{where} at <b>{fmt_m(ant['height_m'])} m</b>")
    if num("apex_deg") is not None and ant["kind"] == "inverted-v":
        facts.append(f"legs {num('apex_deg'):g}° apart")
    balun = ant.get("balun")
    if balun is None and num("transformer_ratio") is not None:
        balun = f"{num('transformer_ratio'):g}:1"
    if balun and ant["kind"] != "whip":
        facts.append(f"balun <b>{escape(str(balun))}</b> at the feed point")
    if num("resistor_ohm") is not None:
        facts.append(f"terminating resistor <b>{num('resistor_ohm'):g} Ω</b>")
    if isinstance(ant.get("height_wavelengths"), (int, float)):
        facts.append(f"{ant['height_wavelengths']:.2f} λ high")
    if facts:
        out.append(P(" · ".join(facts)))
    if cut:
        rows = [["", "metres", "feet-inches"]] + [list(r) for r in _cut_rows(cut, ant["kind"])]
        cols = [[(r[i], B if i == 1 else R, BODY_PT) for r in rows] for i in range(3)]
        widths = [max(stringWidth(t, f, s) for t, f, s in c) + 2 * CELL_PAD + 0.5 for c in cols]
        widths[0] = max(avail - widths[1] - widths[2], 40)
        body = [rows[0]] + [[T(r[0])] + r[1:] for r in rows[1:]]
        cmds = [("FONT", (0, 0), (-1, 0), B, 6.5), ("FONT", (1, 1), (1, -1), B, BODY_PT + 0.5),
                ("ALIGN", (1, 0), (2, -1), "RIGHT"), ("LINEBELOW", (0, 0), (-1, 0), 0.8, colors.black)]
        cmds += [("BACKGROUND", (0, i), (-1, i), SHADE) for i in range(2, len(body), 2)]
        out.append(_table(body, widths, cmds, repeat=1))
    for n in ant.get("notes", []) or []:
        out.append(T(n, "small"))
    for w in ant.get("warnings", []) or []:  # SWR warnings are the SWR table's job
        if isinstance(w, dict) and w.get("message") and not str(w.get("code", "")).startswith("swr"):
            out.append(Paragraph(f"<b>{escape(w['message'])}</b>", ST["item"], bulletText="⚠"))
    return out


def swr_table(data: dict, station: dict, ants: list[dict], avail: float) -> list[Flowable]:
    """SWR and its class in words on every channel, one column pair per antenna of the station."""
    if not ants:
        return []
    by_ant = [{c["channel"]: c for c in a["channels"]} for a in ants]
    head = ["ch", "kHz"] + [x for a in ants for x in (f"SWR {a['id']}" if len(ants) > 1 else "SWR", "")]
    rows = [head]
    for ch in data["channels"]:
        row = [ch["id"], fmt_khz(ch["freq_khz"])]
        for m in by_ant:
            c = m.get(ch["id"])
            row += [f"{c['swr']:.1f}", c["swr_class"]] if c else ["–", "not analysed"]
        rows.append(row)
    cols = [[(r[i], B if i == 0 or (i >= 2 and i % 2 == 1) else R, BODY_PT) for r in rows[1:]] for i in range(len(head))]
    widths = [max(stringWidth(t, f, s) for t, f, s in c) + 2 * CELL_PAD + 0.5 for c in cols]
    if sum(widths) > avail:
        raise CardLayoutError("the SWR table does not fit the card's width")
    cmds = [("FONT", (0, 0), (-1, 0), B, 6.0), ("FONT", (0, 1), (0, -1), B, BODY_PT),
            ("LINEBELOW", (0, 0), (-1, 0), 0.8, colors.black), ("ALIGN", (1, 0), (1, -1), "RIGHT")]
    for j in range(len(ants)):
        cmds += [("SPAN", (2 + 2 * j, 0), (3 + 2 * j, 0)), ("FONT", (3 + 2 * j, 1), (3 + 2 * j, -1), B, BODY_PT)]
    for i in range(1, len(rows)):
        if i % 2 == 0:
            cmds.append(("BACKGROUND", (0, i), (-1, i), SHADE))
    # Header spans need their width; give spare to the class columns.
    spare = max(avail - sum(widths), 0) / len(widths)
    widths = [w + spare for w in widths]
    return [T("SWR on each channel", "head"),
            T("fine: no tuner needed · tuner: use the set's tuner · poor: avoid on this antenna", "small"),
            _table(rows, widths, cmds, repeat=1)]


GROUND_WORDS = {
    "rods": "Drive the ground rod(s) beside the set and bond set, tuner and coax shield to them with short, heavy wire.",
    "radials": "Lay the radial wires out straight from the whip base, evenly spaced, and bond them to the set's ground.",
    "counterpoise": "Run the counterpoise wire along the ground under the antenna and bond it to the set's ground stud.",
    "none": "No ground system: keep the set's case bonded to the coax shield and expect more loss and RF on the case.",
}


def ground_block(station: dict) -> list[Flowable]:
    g = station.get("ground") or {}
    system, soil = g.get("system", "none"), g.get("soil", "unknown")
    text = f"<b>{escape(system)}</b> on {escape(soil)} soil. " + escape(g.get("instruction") or GROUND_WORDS.get(system, ""))
    return [T("Grounding", "head"), P(text),
            T("Disconnect and ground the feedline when storms approach; never work on an antenna in a storm.", "small")]


def exposure_block(station: dict, ants: list[dict]) -> list[Flowable]:
    rows = []
    for a in ants:
        for e in a.get("exposure", []):
            if e["station"] == station["id"]:
                rows.append(f"{escape(a['id'])}: keep the public <b>{e['general_public_m']:.1f} m</b> and operators "
                            f"<b>{e['occupational_m']:.1f} m</b> from the antenna while transmitting"
                            + (" (inside the near field: treat as a minimum)" if e.get("within_near_field") else ""))
    if not rows:
        return []
    return [T("RF exposure", "head")] + [P(r) for r in rows] + [
        T("Far-field estimate from power and gain; close to an HF antenna it is only a guide.", "small")]


DEFAULT_CAUTIONS = [  # used only when a compiled plan carries no safety section
    {"topic": "power lines", "text": "Keep every mast, wire and rope well clear of power lines: at least the fall length plus a margin."},
    {"topic": "lightning", "text": "Take antennas down or disconnect and ground them when a storm approaches."},
    {"topic": "RF exposure", "text": "Do not touch the antenna or let anyone near it while transmitting."},
]
DEFAULT_DEFERRAL = ("These cautions do not replace local electrical and building codes, the equipment's manuals "
                    "or licensed practice; where they differ, follow those.")


def safety_block(data: dict) -> list[Flowable]:
    s = data.get("safety") or {}
    cautions = s.get("cautions") or DEFAULT_CAUTIONS
    deferral = s.get("deferral") or DEFAULT_DEFERRAL
    out: list[Flowable] = [T("Safety", "head")]
    for c in cautions:
        title = c.get("title") or c["topic"].replace("-", " ")
        out.append(Paragraph(f"<b>{escape(title)}:</b> {escape(c['text'])}", ST["smallitem"], bulletText="⚠"))
    out.append(P(f"<i>{escape(deferral)}</i>", "small"))
    return out


class Keep(Flowable):
    """A few flowables kept on one card side; split apart only when they exceed a whole side."""

    def __init__(self, items: list[Flowable]):
        super().__init__()
        self.items = [f for f in items]
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


class QRFlowable(Flowable):
    """A QR code with a caption to its right."""

    def __init__(self, text: str, caption: str, size: float = 66.0):
        super().__init__()
        self.text, self.size = text, size
        self.caption = Paragraph(escape(caption), ST["small"])

    def wrap(self, aw, ah):
        self._aw = aw
        cw, ch = self.caption.wrap(max(aw - self.size - 6, 40), ah)
        self.height = max(self.size, ch) + 4
        self.width = aw
        return aw, self.height

    def draw(self):
        qr.draw(self.canv, self.text, 0, self.height - self.size, self.size)
        _, ch = self.caption.wrap(max(self._aw - self.size - 6, 40), self.height)
        self.caption.drawOn(self.canv, self.size + 6, self.height - ch - 6)


def qr_block(data: dict, station: dict | None) -> list[Flowable]:
    text = qr.payload(data, station)
    if data["net"].get("base_url"):
        caption = "Scan to open the net's page: " + text
    else:
        caption = f"Scan for the plan revision {data['revision']['id']} and the net's channels by hour, as text."
    return [Spacer(1, 3), QRFlowable(text, caption)]


def station_antennas(data: dict, station: dict) -> list[dict]:
    by_id = {a["id"]: a for a in data["antennas"]}
    return [by_id[a] for a in station["antennas"] if a in by_id]


def station_back(data: dict, station: dict, avail: float) -> list[Flowable]:
    ants = station_antennas(data, station)
    out: list[Flowable] = []
    for a in ants:
        out.append(Keep(antenna_block(data, station, a, avail)))
    out.append(Keep(swr_table(data, station, ants, avail)))
    out += [Keep(ground_block(station)), Keep(exposure_block(station, ants)), Keep(safety_block(data)),
            Keep(qr_block(data, station))]
    return out


# ---------------------------------------------------------------- net card

def link_label(data: dict, link: dict) -> str:
    a, b = station_by_id(data, link["from"]), station_by_id(data, link["to"])
    ctl = control_station(data)
    if ctl and link["from"] == ctl["id"]:
        return f"{b['address']} {b['name']}"
    if ctl and link["to"] == ctl["id"]:
        return f"{a['address']} {a['name']}"
    return f"{a['address']}–{b['address']}"


def differing_links(data: dict) -> list[tuple[int, dict]]:
    """Links whose first choice differs from the net's first at some hour, numbered L1.. in plan order."""
    net_first = {h["utc_hour"]: h["first"] for h in data["net_schedule"]["hours"]}
    out = []
    for i, link in enumerate(data["links"], start=1):
        if any(h["first"] != net_first[h["utc_hour"]] for h in link["hours"]):
            out.append((i, link))
    return out


def net_tables(data: dict, avail: float) -> list[Flowable]:
    """Per hour: the net's first channel, then each differing link's first where it differs (blank = as the net)."""
    diff = differing_links(data)
    hours = _local_order(data["net_schedule"]["hours"])
    if not diff:
        return [P("Every link's first choice equals the net channel at every hour.")]
    fixed_cols = [[(h["local_time"], B, TABLE_PT) for h in hours] + [("Local", B, 6.5)],
                  [(f"{h['utc_hour']:02d}", R, TABLE_PT) for h in hours] + [("UTC", B, 6.5)],
                  [(h["first"] or "none", B, TABLE_PT) for h in hours] + [("net", B, 6.5)]]
    fixed_w = [max(stringWidth(t, f, s) for t, f, s in c) + 2 * CELL_PAD + 0.5 for c in fixed_cols]
    link_w = {}
    for n, link in diff:
        vals = [(h["first"] or "none") for h in link["hours"]] + [f"L{n}"]
        link_w[n] = max(stringWidth(v, B, TABLE_PT) for v in vals) + 2 * CELL_PAD + 0.5
    groups, cur, used = [], [], sum(fixed_w)
    for n, link in diff:
        if cur and used + link_w[n] > avail:
            groups.append(cur)
            cur, used = [], sum(fixed_w)
        cur.append((n, link))
        used += link_w[n]
    groups.append(cur)
    out: list[Flowable] = []
    for g in groups:
        by_hour = [{h["utc_hour"]: h["first"] for h in link["hours"]} for _, link in g]
        rows = [["Local", "UTC", "net"] + [f"L{n}" for n, _ in g]]
        for h in hours:
            row = [h["local_time"], f"{h['utc_hour']:02d}", h["first"] or "none"]
            for m in by_hour:
                f = m[h["utc_hour"]]
                row.append("" if f == h["first"] else (f or "none"))
            rows.append(row)
        widths = fixed_w + [link_w[n] for n, _ in g]
        spare = min(max(avail - sum(widths), 0) / len(widths), 8.0)  # a little air, the rest left blank
        widths = [w + spare for w in widths]
        lead = TABLE_PT * 1.12
        cmds = [("FONT", (0, 0), (-1, 0), B, 6.5, 7.0), ("FONT", (0, 1), (-1, -1), B, TABLE_PT, lead),
                ("FONT", (1, 1), (1, -1), R, TABLE_PT, lead), ("TOPPADDING", (0, 0), (-1, -1), 0.3),
                ("BOTTOMPADDING", (0, 0), (-1, -1), 1.0),
                ("LINEBELOW", (0, 0), (-1, 0), 1.0, colors.black), ("LINEBEFORE", (3, 0), (3, -1), 0.8, colors.black),
                ("ALIGN", (3, 0), (-1, -1), "CENTER")]
        for i in range(1, len(rows)):
            if i % 2 == 0:
                cmds.append(("BACKGROUND", (0, i), (-1, i), SHADE))
        if len(groups) > 1:
            out.append(T(f"Links L{g[0][0]} to L{g[-1][0]}", "small"))
        out.append(_table(rows, widths, cmds, repeat=1))
        out.append(Spacer(1, 3))
    return out


def link_legend(data: dict) -> list[Flowable]:
    diff = {n for n, _ in differing_links(data)}
    rows = []
    same = []
    for i, link in enumerate(data["links"], start=1):
        if i in diff:
            rows.append(P(f"<b>L{i}</b> {escape(link_label(data, link))} · {link['distance_km']:.0f} km"))
        else:
            same.append(link_label(data, link))
    out: list[Flowable] = [T("Links", "head")] + rows
    if same:
        out.append(T("Always on the net channel: " + "; ".join(same), "small"))
    return out


def gaps_block(data: dict) -> list[Flowable]:
    out: list[Flowable] = [T("Gaps", "head")]
    if not data.get("gaps"):
        return out + [P("None: every hour has a channel that serves every link.")]
    for g in data["gaps"]:
        if g.get("message"):  # the compiler's own sentence names the links, hours and window
            out.append(Paragraph(escape(g["message"]), ST["item"], bulletText="•"))
            continue
        hours = ", ".join(g["local_hours"])
        win = g.get("window_mhz")
        links = ", ".join(g["links"])
        text = f"<b>{escape(hours)}</b> local: {escape(links)}"
        if win:
            text += f" · a channel in {win[0]:.1f}–{win[1]:.1f}\u00a0MHz would serve"
        out.append(Paragraph(text, ST["item"], bulletText="•"))
    return out


def net_front(data: dict, avail: float) -> list[Flowable]:
    ctl = control_station(data)
    sub = f"For control{(' ' + ctl['address']) if ctl else ''}: each link's first channel where it differs from the net; blank = net channel"
    return header_block(data, None, avail, subtitle=sub) + [Spacer(1, 2)] + net_tables(data, avail)


def net_back(data: dict, avail: float) -> list[Flowable]:
    ns = data["net_schedule"]
    out = [Keep(link_legend(data)), Keep(gaps_block(data)),
           T(f"The net changes channel {ns['changes_per_day']} times a day.", "small")]
    return out + [Keep(qr_block(data, None))]
