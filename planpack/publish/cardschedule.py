"""The station card's timetable: which channel to be on at each hour, how sure that is, what to do if it fails.

One row per hour of the local day, read top to bottom. The channel is one
boxed block over the run of hours it holds (the eye finds "when do we
change?" at the heavy rules), each hour shows how often that channel works
as a whole percent with a small bar, and the last column names the fallback.

An hour below the plan's target is marked three ways that survive a
black-and-white copy and a red torch (under red light red ink vanishes, so
nothing here relies on colour): the percent is printed white on black, the
fallback starts with a warning sign and is set in bold.

When the validity period holds a change of the UTC offset, the table has one
local-time column per period, each headed with its offset and dates.
"""

from __future__ import annotations

from xml.sax.saxutils import escape

from reportlab.lib import colors
from reportlab.pdfbase.pdfmetrics import stringWidth
from reportlab.platypus import Flowable, Paragraph

from planpack.publish import carddata as cd
from planpack.publish.cardstyle import B, CELL_PAD, R, SHADE, Look, fmt_khz, table, text_width, weak_mark


class Meter(Flowable):
    """How often the hour's channel works: a bar and a whole percent; white on black below target."""

    def __init__(self, pct: int | None, weak: bool, look: Look, bar: bool = True):
        super().__init__()
        self.pct, self.weak, self.look = pct, weak, look
        self.pt = look.pt("table")
        self.bar_w = 11.0 * look.scale if bar else 0.0
        self.text = "–" if pct is None else f"{pct}%"

    @staticmethod
    def need(look: Look, bar: bool = True) -> float:
        return (11.0 * look.scale + 2.0 if bar else 0.0) + stringWidth("100%", B, look.pt("table")) + 3.0

    def wrap(self, aw, ah):
        self.width = aw
        self.height = self.pt * 1.06
        return aw, self.height

    def draw(self):
        c = self.canv
        h = self.height
        x = 0.0
        if self.bar_w:
            bh = self.pt * 0.62
            y = (h - bh) / 2
            c.setLineWidth(0.5)
            c.setStrokeColor(colors.black)
            c.rect(0, y, self.bar_w, bh, stroke=1, fill=0)
            if self.pct:
                c.setFillColor(colors.black)
                c.rect(0, y, self.bar_w * min(self.pct, 100) / 100.0, bh, stroke=0, fill=1)
            x = self.bar_w + 2.0
        tw = stringWidth(self.text, B, self.pt)
        base = (h - self.pt * 0.72) / 2
        if self.weak:
            c.setFillColor(colors.black)
            c.rect(x, base - 1.2, tw + 3.0, self.pt * 0.72 + 2.4, stroke=0, fill=1)
            c.setFillColor(colors.white)
        c.setFont(B, self.pt)
        c.drawString(x + 1.5, base, self.text)
        c.setFillColor(colors.black)


def _channel_markup(ch: dict | None, cid: str | None, two_lines: bool, mode: bool = True) -> str:
    """A channel block: id, frequency and mode (id over the rest when ``two_lines``; no mode when squeezed)."""
    if cid is None:
        return "<b>no channel</b>"
    if ch is None:
        return f"<b>{escape(cid)}</b>"
    sep = "<br/>" if two_lines else " "
    rest = f"\u00a0{escape(ch['mode'])}" if mode else ""
    return f"<b>{escape(cid)}</b>{sep}{fmt_khz(ch['freq_khz'])}{rest}"


def _fallback_text(fb: cd.Fallback | None, weak: bool, mark: str) -> str:
    """The second channel and how often it works, after the mark on a weak hour ("none" there when there is no
    channel to switch to: the instruction is under the table, it can be long). Plain text; weak rows are bold."""
    if fb is None:
        text = "–"
    elif fb.channel is None:
        text = "none" if weak else "–"
    else:
        text = fb.channel + ("" if fb.pct is None else f"\u00a0{fb.pct}%")
    return f"{mark}\u00a0{text}" if weak else text


def local_head_lines(period: cd.Period, n: int, first: bool = True) -> tuple[str, ...]:
    """The head of a local-time column: 'Local' over the offset; across a clock change the offset over its dates
    ('UTC', 'to', '27 Mar' and 'UTC+1', 'from', '28 Mar': the validity period's own ends are on the line above),
    one word a line so the column stays as narrow as its times."""
    if n == 1:
        return ("Local", period.label)
    if first:
        return (period.label, "to", cd.short_date(period.end, False))
    return (period.label, "from", cd.short_date(period.start, False))


def local_heads(periods: list[cd.Period]) -> list[str]:
    """The local columns' heads as table cells (a line a word; the table sets them in bold)."""
    return ["\n".join(local_head_lines(p, len(periods), i == 0)) for i, p in enumerate(periods)]


def rows_in_local_order(data: dict, hours: list[dict]) -> list[dict]:
    """The 24 hours in the local-time order of the first period, so a team reads its own day top to bottom."""
    n = len(cd.periods(data))
    return sorted(hours, key=lambda h: (cd.local_times(h, n)[0], h["utc_hour"]))


def _runs(values: list, longest: int | None = None) -> list[tuple[int, int]]:
    """(first row, last row) of each run of equal values; with ``longest``, no run spans more rows (a table can
    only break between blocks, so a narrow card whose blocks wrap keeps them short enough to break)."""
    out: list[tuple[int, int]] = []
    for i, v in enumerate(values):
        if out and values[out[-1][0]] == v and (longest is None or i - out[-1][0] < longest):
            out[-1] = (out[-1][0], i)
        else:
            out.append((i, i))
    return out


def hour_table(data: dict, hours: list[dict], look: Look) -> Flowable:
    """Local (one column per period) | UTC | channel block | works | if not, for the given 24 schedule hours."""
    chans = cd.channel_map(data)
    periods = cd.periods(data)
    n = len(periods)
    hours = rows_in_local_order(data, hours)
    mark = weak_mark()
    pt = look.pt("table")
    cell = look.style("cell")

    # Header: "Local" over the offset or, across a clock change, each period's offset and dates.
    heads = local_heads(periods) + ["UTC", "Channel", "Works", "If not"]

    locals_ = [cd.local_times(h, n) for h in hours]
    firsts = [h.get("first") for h in hours]
    runs = _runs(firsts)
    weak = [bool(h["weak"]) for h in hours]
    fbs = [cd.fallback(h) for h in hours]

    # Widths: fixed columns hold their text on one line; channel and fallback share the rest.
    avail = look.width
    w_local = [text_width([(lt[i], B, pt) for lt in locals_]
                          + [(w, B, pt) for w in local_head_lines(periods[i], n, i == 0)])
               for i in range(n)]
    w_utc = text_width([("23", R, pt), ("UTC", B, pt)])
    bar = True
    w_meter = max(Meter.need(look, bar) + 2 * CELL_PAD, text_width([("Works", B, pt)]) + 1.0)
    one_line = [f"{c} {fmt_khz(chans[c]['freq_khz'])} {chans[c]['mode']}" if c in chans else (c or "no channel")
                for c in firsts]
    w_chan_need = text_width([(t, B, pt) for t in one_line] + [("Channel", B, pt)])
    fb_texts = [_fallback_text(f, w, mark) for f, w in zip(fbs, weak)]
    w_fb_need = text_width([(t, B, pt) for t in fb_texts if len(t) < 30] + [("If not", B, pt)])
    rest = avail - sum(w_local) - w_utc - w_meter
    if rest < w_chan_need + w_fb_need and bar:  # narrow card: the bar goes first, the figure stays
        bar = False
        w_meter = max(Meter.need(look, bar) + 2 * CELL_PAD, text_width([("Works", B, pt)]) + 1.0)
        rest = avail - sum(w_local) - w_utc - w_meter
    two_lines = False
    if rest >= w_chan_need + w_fb_need:
        w_chan = w_chan_need + (rest - w_chan_need - w_fb_need) / 2
        w_fb = rest - w_chan
    else:
        two_lines = True  # channel id over frequency and mode; long texts wrap
        w_chan = max(rest * 0.55, 10.0)
        w_fb = max(rest - w_chan, 10.0)
    widths = w_local + [w_utc, w_chan, w_meter, w_fb]

    # Plain strings where they fit (drawn far faster than paragraphs); a paragraph wraps what does not.
    room = w_fb - 2 * CELL_PAD
    body = []
    for i, h in enumerate(hours):
        fb = fb_texts[i]
        if stringWidth(fb, B, pt) > room:
            fb = Paragraph(f"<b>{escape(fb)}</b>" if weak[i] else escape(fb), cell)
        body.append(list(locals_[i]) + [f"{h['utc_hour']:02d}", "", Meter(h["good_days_pct"], weak[i], look, bar), fb])
    cc = n + 1  # channel column
    if two_lines:
        runs = _runs(firsts, longest=6)
    for r0, r1 in runs:
        body[r0][cc] = Paragraph(_channel_markup(chans.get(firsts[r0]), firsts[r0], two_lines and r1 > r0), cell)

    lead = round(pt * 1.06, 2)
    cmds = [("FONT", (0, 0), (-1, -1), R, pt, lead), ("FONT", (0, 0), (-1, 0), B, pt, lead),
            ("FONT", (0, 1), (n - 1, -1), B, pt, lead),
            ("TOPPADDING", (0, 0), (-1, -1), 0.25), ("BOTTOMPADDING", (0, 0), (-1, -1), 0.45),
            ("LINEBELOW", (0, 0), (-1, 0), 1.0, colors.black),
            ("LINEBEFORE", (cc, 0), (cc, -1), 1.0, colors.black), ("LINEAFTER", (cc, 0), (cc, -1), 1.0, colors.black),
            ("ALIGN", (n, 0), (n, -1), "CENTER"), ("VALIGN", (0, 0), (-1, 0), "BOTTOM"),
            ("BOX", (0, 0), (-1, -1), 0.6, colors.black)]
    for i in range(len(body)):
        if i % 2 == 1:  # zebra on the hour columns only: the channel block stays white
            cmds.append(("BACKGROUND", (0, i + 1), (n, i + 1), SHADE))
            cmds.append(("BACKGROUND", (cc + 1, i + 1), (-1, i + 1), SHADE))
        if weak[i]:
            cmds.append(("FONT", (cc + 2, i + 1), (cc + 2, i + 1), B, pt, lead))
    for r0, r1 in runs:
        if r1 > r0:
            cmds.append(("SPAN", (cc, r0 + 1), (cc, r1 + 1)))
        if r0:
            cmds.append(("LINEABOVE", (0, r0 + 1), (-1, r0 + 1), 1.0, colors.black))
    return table([heads] + body, widths, cmds, look, repeat=1)


def legend(data: dict, hours: list[dict], look: Look, whose: str = "your links") -> list[Flowable]:
    """What the columns mean, on the same side as the table (two lines on a 3.5 x 5 in card), and the
    instruction for weak hours with no second channel, once, with the hours it applies to."""
    mark = weak_mark()
    text = (f"<b>Works</b>: % of days it carries {whose} (the worst); target {cd.target_pct(data)} %. "
            f"<b>{mark}</b> white on black: below target; repeat calls, then try <b>If not</b>.")
    rows = rows_in_local_order(data, hours)
    notes = [(cd.fallback(h).text if h["weak"] and cd.fallback(h) and cd.fallback(h).channel is None else None)
             for h in rows]
    texts = list(dict.fromkeys(t for t in notes if t))
    for note in texts:  # one paragraph: a short note shares the legend's last line
        when = ""
        if len(texts) > 1:  # say which rows each instruction is for, as runs of the first local column
            n = len(cd.periods(data))
            spans = [f"{cd.local_times(rows[a], n)[0]}–{cd.local_times(rows[b], n)[0]}" if b > a
                     else cd.local_times(rows[a], n)[0] for a, b in _runs(notes) if notes[a] == note]
            when = " (" + ", ".join(spans) + ")"
        text += f" <b>{mark} none</b>{escape(when)}: {escape(note)}."
    return [look.P(text)]
