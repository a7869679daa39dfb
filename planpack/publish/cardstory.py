"""What goes on a station's cards: reportlab flowables built from the compiled plan's data.

A station's file is one card of essentials and one annex card:

- essentials, front: the period and its UTC offset (both offsets and the
  date of the change when the clock changes), the station's own, control's
  and the net's addresses and the other stations', then the timetable
  (:mod:`planpack.publish.cardschedule`) with its legend;
- essentials, back: which antenna to rig on which channel, each antenna's
  cut lengths in metres and feet, the direction to run the wire, bearing and
  distance to control, the ground with its radial or counterpoise lengths,
  the cautions in short with a pointer to the full ones, the QR code and a
  box for notes;
- annex, front: standing instructions, the channel list with the ALE scan
  list, weak hours in words, every station's address and name, sunrise and
  sunset;
- annex, back: the full cautions, SWR on every channel, RF exposure
  distances and the full cut sheets.

Pure presentation: every figure and sentence comes from ``CompiledPlan.data``
through :mod:`planpack.publish.carddata`; this module only lays it out.
Annex blocks are :class:`Optional`: when one does not fit the annex card it
is left to the site and the card says so, so a member's file stays at two
cards. The essentials back says whether the full cautions made it onto the annex.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from xml.sax.saxutils import escape

from reportlab.lib import colors
from reportlab.platypus import Flowable, Spacer

from planpack.labels import cut_label
from planpack.publish import carddata as cd
from planpack.publish import qr
from planpack.publish.cardschedule import hour_table, legend
from planpack.publish.cardstyle import B, CELL_PAD, R, SHADE, Keep, Look, fmt_khz, fmt_m, table, text_width, weak_mark
from planpack.publish.cardtext import markdown_blocks


class CardLayoutError(ValueError):
    """Something in the plan cannot be laid out on the chosen card without clipping."""


@dataclass
class Optional:
    """An annex block the card may leave to the site when it does not fit: ``what`` names it in the pointer."""

    what: str
    flowable: Flowable


# ---------------------------------------------------------------- small pieces

def feet_inches(cut: dict, key: str) -> str:
    """The feet-and-inches string the compiled plan carries beside cut[key] ("leg_m" -> "leg_ft_in"); blank
    when it has none (the card never converts)."""
    v = cut.get(key[:-2] + "_ft_in") if key.endswith("_m") else None
    return v if isinstance(v, str) else ""


def _num(v) -> bool:
    return isinstance(v, (int, float)) and not isinstance(v, bool)


def _spans(ids: list[str], order: list[str]) -> str:
    """Channel ids as runs in card order: ['D1','D2','D3','D5'] -> 'D1–D3, D5'."""
    pos = {c: i for i, c in enumerate(order)}
    idx = sorted(pos[c] for c in ids if c in pos)
    runs: list[list[int]] = []
    for i in idx:
        if runs and i == runs[-1][1] + 1:
            runs[-1][1] = i
        else:
            runs.append([i, i])
    return ", ".join(order[a] if a == b else f"{order[a]}–{order[b]}" for a, b in runs)


class NotesBox(Flowable):
    """A ruled box to write in: a label, then lines about a handwriting height apart."""

    def __init__(self, look: Look, height: float, label: str = "Notes / log (UTC)"):
        super().__init__()
        self.look, self.box_h, self.label = look, height, label

    def wrap(self, aw, ah):
        self.width = aw
        self.height = self.box_h
        return aw, self.height

    def draw(self):
        c, pt = self.canv, self.look.pt("body")
        c.setLineWidth(0.7)
        c.setStrokeColor(colors.black)
        c.rect(0, 0, self.width, self.height, stroke=1, fill=0)
        c.setFont(B, pt)
        c.drawString(2.5, self.height - pt - 1.5, self.label)
        c.setLineWidth(0.35)
        step = 11.0 * self.look.scale
        y = self.height - pt - 3.5 - step
        while y > 3:
            c.line(3, y, self.width - 3, y)
            y -= step


class QRBox(Flowable):
    """The QR code on the left; to its right a caption and a notes box that takes the rest of the side."""

    def __init__(self, text: str, caption: str, look: Look, notes: bool = True):
        super().__init__()
        self.text, self.look, self.notes = text, look, notes
        # about 0.45 mm a module (a phone reads it at arm's length; common practice, no source), 54-80 pt
        self.size = min(max(54.0, 1.3 * len(qr.matrix(text))), 80.0)
        self.caption = look.T(caption)

    def _min_height(self, aw: float) -> float:
        self._cw = max(aw - self.size - 5, 40)
        _, self._ch = self.caption.wrap(self._cw, 10_000)
        return max(self.size, self._ch + (26 * self.look.scale if self.notes else 0))

    def wrap(self, aw, ah):
        self.width = aw
        low = self._min_height(aw)
        self.height = max(low, min(ah, low + 80 * self.look.scale)) if self.notes else low
        return aw, self.height

    def split(self, aw, ah):
        return []

    def draw(self):
        qr.draw(self.canv, self.text, 0, self.height - self.size, self.size)
        x = self.size + 5
        self.caption.drawOn(self.canv, x, self.height - self._ch)
        if self.notes:
            box_h = self.height - self._ch - 3
            box = NotesBox(self.look, box_h)
            box.wrap(self._cw, box_h)
            box.drawOn(self.canv, x, 0)


def qr_caption(data: dict) -> str:
    """What the code opens."""
    if data["net"].get("base_url"):
        return "Scan for the net's pages (full cautions, SWR, every hour): " + qr.payload(data, None)
    return f"Scan for the plan revision {data['revision']['id']} and the net's channels by hour, as text."


# ---------------------------------------------------------------- essentials, front

def title_line(data: dict, look: Look) -> list[Flowable]:
    return [look.P(f"<b>{escape(data['net']['title'])}</b>")]


def period_block(data: dict, look: Look) -> list[Flowable]:
    """The dates and the UTC offset written out; across a clock change, both offsets and the date of the change."""
    net = data["net"]
    ps = cd.periods(data)
    valid = cd.date_span(net["valid"]["from"], net["valid"]["to"])
    zone = escape(net["timezone"])
    if len(ps) == 1:
        return [look.P(f"<b>{escape(valid)}</b> · local time <b>{escape(ps[0].label)}</b> ({zone})")]
    changes = cd.clock_changes(data)
    when = ", ".join(cd.short_date(c["date"], False) for c in changes) or cd.short_date(ps[1].start, False)
    return [look.P(f"<b>{escape(valid)}</b> · <b>clocks change {escape(when)}</b> ({zone})")]


def address_block(data: dict, station: dict, look: Look) -> list[Flowable]:
    """SELF, CONTROL and NET addresses on one line in large type, then the other stations' addresses."""
    ctl = cd.control_station(data)
    cells = [("SELF", station["address"]), ("CONTROL", ctl["address"] if ctl else "none"),
             ("NET", cd.net_address(data) or "none")]
    pairs = [f"<font name={R} size={look.pt('body')}>{lbl}</font>\u00a0{escape(v)}" for lbl, v in cells]
    need = [look.width_of(lbl + " ", R, "body") + look.width_of(v, B, "value") + 4 for lbl, v in cells]
    spare = look.width - sum(need)
    if spare >= 0:  # three columns
        out: list[Flowable] = [table([[look.P(p, "value") for p in pairs]], [n + spare / 3 for n in need],
                                     [("LEFTPADDING", (0, 0), (-1, -1), 0), ("TOPPADDING", (0, 0), (-1, -1), 0),
                                      ("BOTTOMPADDING", (0, 0), (-1, -1), 0.5)], look)]
    else:  # long addresses: the pairs flow and wrap between pairs, never inside an address
        out = [look.P(" \u2003".join(pairs), "value")]
    others = cd.other_members(station)
    if others:
        word = "Members" if ctl and station["id"] == ctl["id"] else "Others"
        out.append(look.P(f"<b>{word}:</b> " + " · ".join(escape(o["address"]) for o in others)))
    return out


def station_front(data: dict, station: dict, look: Look, compact: bool = False) -> list[Flowable]:
    """The essentials' front; ``compact`` leaves out the net's title (it is on the annex) when the side is full."""
    ctl = cd.control_station(data)
    whose = "the net's links" if ctl and ctl["id"] == station["id"] else "your links"
    hours = cd.station_hours(data, station)
    return (([] if compact else title_line(data, look)) + period_block(data, look) + [Spacer(1, 1.5)]
            + address_block(data, station, look)
            + [Spacer(1, 2.5), hour_table(data, hours, look), Spacer(1, 1.5)] + legend(data, hours, look, whose))


# ---------------------------------------------------------------- essentials, back

KIND_WORDS = {"dipole": "half-wave dipole", "inverted-v": "inverted-V dipole",
              "dipole-reflector": "dipole over a reflector wire",
              "folded-terminated": "terminated folded dipole (broadband)", "whip": "vertical whip"}

#: The order of the full cut sheet; the words are the ones pages and ``diff`` use (planpack.labels).
CUT_ORDER = ("total_m", "leg_m", "total_cut_with_extra_m", "leg_cut_with_extra_m", "end_height_m", "min_end_height_m",
             "reflector_m", "reflector_cut_with_extra_m", "reflector_below_m", "reflector_height_m", "spacing_m",
             "end_allowance_m", "rule_of_thumb_total_m")
TOTAL_LABEL = {"whip": "Whip length", "folded-terminated": "Length, end to end"}
SKIP_CUT = {"rule_of_thumb_leg_m"}  # the rule's total is shown; its half adds nothing
#: The lengths a team needs to cut and hang each kind (the rest is on the annex).
ESSENTIAL_CUT = {
    "dipole": ("leg_m", "leg_cut_with_extra_m"),
    "inverted-v": ("leg_m", "leg_cut_with_extra_m", "end_height_m"),
    "dipole-reflector": ("leg_m", "leg_cut_with_extra_m", "reflector_cut_with_extra_m", "reflector_below_m"),
    "folded-terminated": ("total_m", "spacing_m"),
    "whip": ("total_m",),
}


def _cut_rows(cut: dict, kind: str, keys: tuple[str, ...] | None = None) -> list[tuple[str, str, str]]:
    rows, seen = [], set(SKIP_CUT)
    wanted = list(keys) if keys else list(CUT_ORDER)
    for key in wanted:
        if _num(cut.get(key)):
            label = TOTAL_LABEL.get(kind, cut_label(key)) if key == "total_m" else cut_label(key)
            rows.append((label, fmt_m(cut[key]) + " m", feet_inches(cut, key)))
            seen.add(key)
    if keys is None:
        for key in sorted(cut):  # any further length the compiler reports is shown, not dropped
            if key not in seen and key.endswith("_m") and _num(cut[key]):
                rows.append((cut_label(key), fmt_m(cut[key]) + " m", feet_inches(cut, key)))
    return rows


def cut_table(cut: dict, kind: str, look: Look, keys: tuple[str, ...] | None = None) -> Flowable | None:
    rows = _cut_rows(cut, kind, keys)
    if keys and not rows:
        rows = _cut_rows(cut, kind)[:3]
    if not rows:
        return None
    pt = look.pt("body")
    w1 = text_width([(r[1], B, pt) for r in rows])
    w2 = text_width([(r[2], R, pt) for r in rows])
    w0 = max(look.width - w1 - w2, 40)
    if w0 + w1 + w2 > look.width + 0.01:  # a very narrow card: the lengths stack under their label
        body = [[look.P(f"{escape(r[0])}: <b>{escape(r[1])}</b> {escape(r[2])}")] for r in rows]
        return table(body, [look.width], [], look)
    fits = w0 - 2 * CELL_PAD  # a label that fits is a plain string (drawn far faster than a paragraph)
    body = [[r[0] if look.width_of(r[0]) <= fits else look.T(r[0]), r[1], r[2]] for r in rows]
    cmds = [("FONT", (1, 0), (1, -1), B, pt), ("ALIGN", (1, 0), (2, -1), "RIGHT"),
            ("LINEABOVE", (0, 0), (-1, 0), 0.5, colors.black)]
    cmds += [("BACKGROUND", (0, i), (-1, i), SHADE) for i in range(1, len(body), 2)]
    return table(body, [w0, w1, w2], cmds, look)


def antenna_facts(ant: dict) -> list[str]:
    """Markup snippets: where it hangs, the leg angle, the balun, the resistor."""
    facts = []
    cut = ant.get("cut") or {}

    def num(key):
        for src in (ant, cut):
            if _num(src.get(key)):
                return src[key]
        return None
    if _num(ant.get("height_m")):
        where = {"inverted-v": "apex", "whip": "base"}.get(ant["kind"], "feed point")
        facts.append(f"{where} at <b>{ant['height_m']:.1f} m</b>")
    if num("apex_deg") is not None and ant["kind"] == "inverted-v":
        facts.append(f"legs {num('apex_deg'):g}° apart")
    balun = ant.get("balun")
    if balun is None and num("transformer_ratio") is not None:
        balun = f"{num('transformer_ratio'):g}:1"
    if balun and ant["kind"] != "whip":
        facts.append(f"balun <b>{escape(str(balun))}</b>")
    if num("resistor_ohm") is not None:
        facts.append(f"resistor <b>{num('resistor_ohm'):g} Ω</b>")
    return facts


def rig_block(data: dict, station: dict, look: Look) -> list[Flowable]:
    """Which antenna on which channel, then each antenna in short: facts, essential lengths, the wire's direction."""
    ants = cd.station_antennas(data, station)
    order = [c["id"] for c in data["channels"]]
    out: list[Flowable] = []
    by_ch = cd.antenna_by_channel(station)
    groups: dict[str, list[str]] = {}
    if len(ants) > 1:
        for e in by_ch:
            groups.setdefault(e["antenna"], []).append(e["channel"])
    runs = cd.wire_runs(station)
    run_texts = [runs[a["id"]]["text"] for a in ants if runs.get(a["id"], {}).get("text")]
    for a in ants:
        use = groups.get(a["id"])
        if groups and not use:  # never the one to rig: named, its cut sheet is on the annex
            out.append(look.P(f"<b>{escape(a['id'])}</b> ({escape(KIND_WORDS.get(a['kind'], a['kind']))}): "
                              "not the better antenna on any channel; its cut sheet is on the annex."))
            continue
        on = f" <b>on {escape(_spans(use, order))}</b>" if use else ""
        head = look.P(f"<b>{escape(a['id'])}</b>{on}: {escape(KIND_WORDS.get(a['kind'], a['kind']))}", "title")
        items: list[Flowable] = [head]
        facts = antenna_facts(a)
        if facts:
            items.append(look.P(" · ".join(facts)))
        t = cut_table(a.get("cut") or {}, a["kind"], look, ESSENTIAL_CUT.get(a["kind"]))
        if t is not None:
            items.append(t)
        run = runs.get(a["id"])
        if run and run.get("text") and run_texts.count(run["text"]) == 1:
            items.append(look.P("<b>Wire:</b> " + _bold_compass(escape(run["text"]), run.get("run_compass"))))
        out.append(Keep(items))
    shared = [t for t in dict.fromkeys(run_texts) if run_texts.count(t) > 1]
    for text in shared:  # the same direction for several wires: said once
        compass = next(r.get("run_compass") for r in runs.values() if r.get("text") == text)
        out.append(look.P("<b>Wires:</b> " + _bold_compass(escape(text), compass)))
    return out


def _bold_compass(text: str, compass: str | None) -> str:
    """The compass direction in a sentence in bold: it is what the team lays out."""
    if compass:
        c = escape(compass)
        return text.replace(c, f"<b>{c}</b>", 1)
    return text


def control_line(data: dict, station: dict, look: Look) -> list[Flowable]:
    to = cd.to_control(station)
    ctl = cd.control_station(data)
    if not to or not ctl or ctl["id"] == station["id"]:
        return []
    compass = f" ({escape(to['compass'])})" if to.get("compass") else ""
    return [look.P(f"<b>To control {escape(ctl['address'])}</b>: bearing <b>{to['bearing_deg']:.0f}°</b>{compass}, "
                   f"<b>{to['distance_km']:.0f} km</b>")]


def ground_block(station: dict, look: Look) -> list[Flowable]:
    """The ground system and the compile side's short instruction (with its radial or counterpoise length)."""
    g = cd.ground(station)
    system, soil = g.get("system", "none"), g.get("soil")
    head = f"<b>Ground: {escape(system)}</b>" + (f" on {escape(soil)} soil" if soil else "")
    how = g.get("text") or g.get("instruction") or ""
    return [Keep([look.P(head + (": " + _bold_metres(escape(how)) if how else "."))])]


def ground_detail(station: dict, look: Look) -> list[Flowable]:
    """The annex's ground: the full instruction and the rule the lengths come from."""
    g = cd.ground(station)
    out = [look.T("Ground", "head")]
    if g.get("instruction"):
        out.append(look.T(g["instruction"]))
    if g.get("basis") and (_num(g.get("radial_m")) or _num(g.get("counterpoise_m"))):
        out.append(look.P(f"<i>Lengths: {escape(g['basis'])}</i>"))
    return out if len(out) > 1 else []


def _bold_metres(text: str) -> str:
    """Distances in a sentence in bold ("1.7 m")."""
    return re.sub(r"(\d+(?:\.\d+)?\s?m)\b", r"<b>\1</b>", text)


def short_cautions(data: dict, station: dict, look: Look, on_annex: bool) -> list[Flowable]:
    """The cautions in short, this station's RF exposure distance, and where the full cautions are."""
    lines, pointer = cd.safety_short(data)
    if on_annex and pointer.startswith("Full cautions:") and ". " in pointer:
        # the compile side's pointer names the site; this station's file also has them on its annex
        pointer = "Full cautions: on the annex card and the net's site. " + pointer.split(". ", 1)[1]
    out: list[Flowable] = [Spacer(1, 1)]
    out += [look.P(escape(x), "item", bullet=weak_mark()) for x in lines]
    exp = cd.exposure(station)
    if exp and exp.get("text"):  # "the distance on this card" of the short RF caution
        text = exp["text"][:1].upper() + exp["text"][1:]
        out.append(look.P(_bold_metres(escape(text)), "item", bullet=weak_mark()))
    head, _, rest = pointer.partition(":")
    out.append(look.P(f"<b>{escape(head)}:</b>{escape(rest)}" if rest else escape(pointer)))
    return [Keep(out)]


def station_back(data: dict, station: dict, look: Look, cautions_on_annex: bool = True) -> list[Flowable]:
    return (rig_block(data, station, look) + control_line(data, station, look)
            + ground_block(station, look) + short_cautions(data, station, look, cautions_on_annex)
            + [Spacer(1, 1), QRBox(qr.payload(data, station), qr_caption(data), look)])


# ---------------------------------------------------------------- annex, front

def instructions_block(data: dict, look: Look) -> list[Flowable]:
    src = data["net"].get("instructions_md")
    if not src:
        return []
    out: list[Flowable] = [look.T("Standing instructions", "head")]
    for b in markdown_blocks(src):
        if b.kind == "heading":
            out.append(look.P(b.markup, "title"))
        elif b.kind == "item":
            out.append(look.P(b.markup, "item" if b.depth == 0 else "item2", bullet=b.bullet or None))
        else:
            out.append(look.P(b.markup))
        out.append(Spacer(1, 1.0))
    return out


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


def channel_table(data: dict, station: dict, look: Look) -> list[Flowable]:
    marks = _scan_marks(data, station["id"])
    wasted, note, groups = set(), None, []
    for sl in data.get("scan_lists", []):
        if sl["station"] == station["id"]:
            wasted |= set(sl.get("wasted", []))
            note = sl.get("note")
            groups = sl["groups"]
    pt = look.pt("body")
    head = ["ch", "kHz", "mode", "ALE scan", "hours / note"]
    rows = []
    for c in data["channels"]:
        extra = []
        if c.get("hours_local"):
            extra.append(" ".join(c["hours_local"]))
        if c.get("note"):
            extra.append(c["note"])
        if c["id"] in wasted:
            extra.append("scanned, serves no link")
        rows.append([c["id"], fmt_khz(c["freq_khz"]), c["mode"], marks.get(c["id"], "–"), ", ".join(extra)])
    widths = [text_width([(r[i], B if i in (0, 3) else R, pt) for r in rows] + [(head[i], B, pt)]) for i in range(4)]
    rest = look.width - sum(widths)
    if rest < 30:  # long ids or modes: every column wraps in an even share
        widths = [look.width / 5] * 5
        body = [[look.T(x) for x in r] for r in rows]
    else:
        widths.append(rest)
        body = [r[:4] + [r[4] if look.width_of(r[4]) <= rest - 2 * CELL_PAD else look.T(r[4])] for r in rows]
    cmds = [("FONT", (0, 0), (-1, 0), B, pt), ("FONT", (0, 1), (0, -1), B, pt), ("FONT", (3, 1), (3, -1), B, pt),
            ("LINEBELOW", (0, 0), (-1, 0), 0.8, colors.black), ("ALIGN", (1, 0), (1, -1), "RIGHT")]
    cmds += [("BACKGROUND", (0, i), (-1, i), SHADE) for i in range(2, len(body) + 1, 2)]
    out: list[Flowable] = [look.T("Channels", "head"), table([head] + body, widths, cmds, look, repeat=1)]
    if groups:
        bits = []
        for g in groups:
            when = f" (UTC {qr.hour_spans(g['utc_hours'])})" if g.get("utc_hours") else ""
            bits.append(f"{g['name']}{when}: {len(g['channels'])} ch, scan {g['scan_period_s']:.1f} s, "
                        f"call {g['call_time_s']:.1f} s")
        out.append(look.T("ALE scan list: " + "; ".join(bits)))
    if note:
        out.append(look.T(note))
    return out


def stations_block(data: dict, station: dict | None, look: Look) -> list[Flowable]:
    """Every station's address and full name (the front shows addresses only)."""
    ctl = cd.control_station(data)
    items = [look.T("Stations", "head")]
    for s in data["stations"]:
        role = " (control)" if ctl and s["id"] == ctl["id"] else ""
        you = " (this card)" if station is not None and s["id"] == station["id"] else ""
        items.append(look.P(f"<b>{escape(s['address'])}</b> {escape(s['name'])}{role}{you}"))
    return items


def weak_hours_block(runs: list[dict], look: Look) -> list[Flowable]:
    """The weak hours as the compile side words them, one line per run."""
    if not runs:
        return []
    return [look.T("Weak hours", "head")] + [look.P(escape(r["text"]), "item", bullet=weak_mark()) for r in runs]


def sun_block(station: dict, look: Look) -> list[Flowable]:
    sun = station.get("sun") or {}
    rise, set_ = sun.get("sunrise_local"), sun.get("sunset_local")
    head = look.T(f"Sun here on {sun.get('date', '?')}", "head")
    if rise is None and set_ is None:
        return [head, look.P("No sunrise or sunset that day (polar day or night).")]

    def one(word, loc, utc):  # no-break spaces keep each time whole on one line
        if not loc:
            return f"{word}: none"
        return f"<b>{word}\u00a0{escape(loc)}</b>\u00a0({escape(utc or '')}\u00a0UTC)"
    return [head, look.P(one("rise", rise, sun.get("sunrise_utc")) + " · " + one("set", set_, sun.get("sunset_utc")))]


# ---------------------------------------------------------------- annex, back

DEFAULT_CAUTIONS = [  # used only when a compiled plan carries no safety section
    {"topic": "power lines", "text": "Keep every mast, wire and rope well clear of power lines: at least the fall length plus a margin."},
    {"topic": "lightning", "text": "Take antennas down or disconnect and ground them when a storm approaches."},
    {"topic": "RF exposure", "text": "Do not touch the antenna or let anyone near it while transmitting."},
]
DEFAULT_DEFERRAL = ("These cautions do not replace local electrical and building codes, the equipment's manuals "
                    "or licensed practice; where they differ, follow those.")


def safety_block(data: dict, look: Look) -> list[Flowable]:
    s = data.get("safety") or {}
    cautions = s.get("cautions") or DEFAULT_CAUTIONS
    deferral = s.get("deferral") or DEFAULT_DEFERRAL
    out: list[Flowable] = [look.T("Safety: the full cautions", "head")]
    for c in cautions:
        title = c.get("title") or c["topic"].replace("-", " ")
        out.append(look.P(f"<b>{escape(title)}:</b> {escape(c['text'])}", "item", bullet="•"))
    out.append(look.P(f"<i>{escape(deferral)}</i>"))
    return out


def swr_table(data: dict, station: dict, look: Look) -> list[Flowable]:
    """SWR as the antenna side wrote it ("1.4:1", "> 50:1") and its class in words, one column per antenna."""
    ants = cd.station_antennas(data, station)
    if not ants:
        return []
    pt = look.pt("body")
    by_ant = [{c["channel"]: c for c in a["channels"]} for a in ants]
    rows = []
    for ch in data["channels"]:
        row = [ch["id"], fmt_khz(ch["freq_khz"])]
        for m in by_ant:
            c = m.get(ch["id"])
            row.append(" ".join(x for x in ((cd.swr_text(c) or ""), c.get("swr_class", "")) if x) if c else "–")
        rows.append(row)
    ncol = 2 + len(ants)
    fixed = [text_width([(r[i], B if i == 0 else R, pt) for r in rows] + [(("ch", "kHz")[i], B, pt)]) for i in range(2)]
    need = [text_width([(r[i], R, pt) for r in rows]) for i in range(2, ncol)]
    spare = look.width - sum(fixed) - sum(need)
    if spare < 0:
        return []  # too many antennas for one table on this card: the site has them
    widths = fixed + [w + spare / len(need) for w in need]
    head = [look.T("ch", "bold"), look.T("kHz", "bold")] + [look.T(a["id"], "bold") for a in ants]
    cmds = [("FONT", (0, 1), (0, -1), B, pt), ("LINEBELOW", (0, 0), (-1, 0), 0.8, colors.black),
            ("ALIGN", (1, 0), (1, -1), "RIGHT"), ("VALIGN", (0, 0), (-1, 0), "BOTTOM")]
    cmds += [("BACKGROUND", (0, i), (-1, i), SHADE) for i in range(2, len(rows) + 1, 2)]
    return [look.T("SWR on each channel", "head"),
            look.T("fine: no tuner needed · tuner: use the set's tuner · poor: avoid on this antenna"),
            table([head] + rows, widths, cmds, look, repeat=1)]


def full_cut_sheets(data: dict, station: dict, look: Look) -> list[Flowable]:
    out: list[Flowable] = []
    for a in cd.station_antennas(data, station):
        t = cut_table(a.get("cut") or {}, a["kind"], look)
        if t is None:
            continue
        out += [look.P(f"Cut sheet <b>{escape(a['id'])}</b>: {escape(KIND_WORDS.get(a['kind'], a['kind']))}", "head"), t]
        for n in a.get("notes", []) or []:
            out.append(look.T(n))
        for w in a.get("warnings", []) or []:  # SWR warnings are the SWR table's job
            if isinstance(w, dict) and w.get("message") and not str(w.get("code", "")).startswith("swr"):
                out.append(look.P(f"<b>{escape(w['message'])}</b>", "item", bullet=weak_mark()))
    return out


def annex_blocks(data: dict, station: dict, look: Look, shared: dict | None = None) -> list[Optional]:
    """The annex card's blocks in order of importance; the first that fit are printed, the rest left to the site.

    ``shared`` keeps the blocks that are the same on every station's annex (title, instructions, full
    cautions) so that a deck builds and measures them once; a flowable may be drawn on many cards.
    """
    shared = {} if shared is None else shared
    if not shared:
        shared.update(title=Keep(title_line(data, look)), instructions=Keep(instructions_block(data, look)),
                      cautions=Keep(safety_block(data, look)))
    same = [("the net's title", shared["title"]), ("standing instructions", shared["instructions"]),
            ("full cautions", shared["cautions"])]
    blocks = [same[0], same[1],
              ("channel list", channel_table(data, station, look)),
              same[2],
              ("weak hours in words", weak_hours_block(cd.station_weak_runs(data, station), look)),
              ("SWR table", swr_table(data, station, look)),
              ("station list", stations_block(data, station, look)),
              ("sunrise and sunset", sun_block(station, look)),
              ("full cut sheets", full_cut_sheets(data, station, look)),
              ("ground instructions", ground_detail(station, look))]
    return [Optional(what, items if isinstance(items, Keep) else Keep(items)) for what, items in blocks
            if (items.items if isinstance(items, Keep) else items)]


def left_out_note(what: list[str], look: Look) -> Flowable:
    """Names the annex blocks that did not fit: they are on the site (the QR code on card 1 opens it)."""
    return look.P("<b>On the site, not on this card:</b> " + escape("; ".join(what)) + ".")
