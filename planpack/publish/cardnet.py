"""The net card for control: the net's timetable with a column per station that needs something else.

Front: per hour of the local day, the net's channel (one block per run, as
on the station cards) and how often it works, then one column per station
whose link differs from the net somewhere: that station's channel where it
is not the net's, a warning sign where that station is below target, a cross
where no channel serves it. The columns are headed by the station's ALE
address and explained under the table on the same side.

Back: the stations with bearing and distance from control, the weak hours
and the gaps in plain words (sentences written by the compile side), the
standing instructions in full (a station's annex leaves long ones to the
site; control's file may run to more cards), the QR code and a notes box.
"""

from __future__ import annotations

from xml.sax.saxutils import escape

from reportlab.lib import colors
from reportlab.pdfbase.pdfmetrics import stringWidth
from reportlab.platypus import Flowable, Paragraph, Spacer

from planpack.publish import carddata as cd
from planpack.publish import qr
from planpack.publish.cardschedule import (Meter, _channel_markup, _runs, local_head_lines, local_heads,
                                           rows_in_local_order)
from planpack.publish.cardstory import QRBox, instructions_block, period_block, qr_caption, weak_hours_block
from planpack.publish.cardstyle import B, CELL_PAD, R, SHADE, Keep, Look, fmt_khz, table, text_width, weak_mark

GAP_MARK = "✕"


def gap_mark() -> str:
    return GAP_MARK if weak_mark() == "⚠" else "x"


class Upright(Flowable):
    """A column head turned a quarter turn, read from the bottom up: narrow columns keep their full name."""

    def __init__(self, text: str, pt: float):
        super().__init__()
        self.text, self.pt = text, pt

    def wrap(self, aw, ah):
        self.width = self.pt * 1.15
        self.height = stringWidth(self.text, B, self.pt) + 2
        return self.width, self.height

    def draw(self):
        c = self.canv
        c.saveState()
        c.translate(self.pt * 0.9, 1)
        c.rotate(90)
        c.setFont(B, self.pt)
        c.drawString(0, 0, self.text)
        c.restoreState()


def link_head(data: dict, link: dict) -> str:
    """The station a link column is for: the far station's address seen from control, else both addresses."""
    a, b = cd.station_by_id(data, link["from"]), cd.station_by_id(data, link["to"])
    ctl = cd.control_station(data)
    if ctl and link["from"] == ctl["id"]:
        return b["address"]
    if ctl and link["to"] == ctl["id"]:
        return a["address"]
    return f"{a['address']}–{b['address']}"


def columns_needed(data: dict) -> list[dict]:
    """Links that need their own column: their first channel differs from the net's, or they have gaps or weak hours."""
    net_first = {h["utc_hour"]: h["first"] for h in data["net_schedule"]["hours"]}
    out = []
    for link in data["links"]:
        differs = any(h["first"] != net_first.get(h["utc_hour"]) for h in link["hours"])
        if differs or cd.link_gap_hours(link) or any(h["weak"] for h in link["hours"]):
            out.append(link)
    return out


def _cell(hour: dict, net_first: str | None, gaps: set[int]) -> str:
    """The link's channel where it is not the net's, a cross in its gap hours, the mark where it is weak."""
    if hour["utc_hour"] in gaps:
        return gap_mark()
    text = "" if hour["first"] == net_first else (hour["first"] or "none")
    if hour["weak"]:
        text = (text + " " + weak_mark()).strip()
    return text


def net_tables(data: dict, look: Look) -> list[Flowable]:
    chans = cd.channel_map(data)
    periods = cd.periods(data)
    n = len(periods)
    hours = rows_in_local_order(data, data["net_schedule"]["hours"])
    pt = look.pt("table")
    cell = look.style("cell")
    locals_ = [cd.local_times(h, n) for h in hours]
    firsts = [h.get("first") for h in hours]
    runs = _runs(firsts)

    w_local = [text_width([(lt[i], B, pt) for lt in locals_]
                          + [(w, B, pt) for w in local_head_lines(periods[i], n, i == 0)])
               for i in range(n)]
    w_utc = text_width([("23", R, pt), ("UTC", B, pt)])
    chan_lines = [(c or "no channel") for c in firsts] + [fmt_khz(chans[c]["freq_khz"]) + " " + chans[c]["mode"]
                                                          for c in firsts if c in chans]
    w_chan = min(text_width([(t, B, pt) for t in chan_lines] + [("Net", B, pt)]), look.width * 0.3)
    w_meter = max(Meter.need(look, False) + 2 * CELL_PAD, text_width([("Works", B, pt)]) + 1.0)
    fixed = w_local + [w_utc, w_chan, w_meter]

    links = columns_needed(data)
    by_link = []
    for link in links:
        gaps = cd.link_gap_hours(link)
        lh = {h["utc_hour"]: h for h in link["hours"]}
        cells = [_cell(lh[h["utc_hour"]], h.get("first"), gaps) if h["utc_hour"] in lh else ""
                 for h in hours]
        w = max(text_width([(c, B, pt) for c in cells]), pt * 1.15 + 2 * CELL_PAD)
        by_link.append((link, cells, w))
    groups: list[list] = []
    cur: list = []
    used = sum(fixed)
    for item in by_link:
        if cur and used + item[2] > look.width:
            groups.append(cur)
            cur, used = [], sum(fixed)
        cur.append(item)
        used += item[2]
    groups.append(cur)

    out: list[Flowable] = []
    for gi, g in enumerate(groups):
        heads = local_heads(periods) + ["UTC", "Net", "Works"]
        heads += [Upright(link_head(data, link), pt) for link, _, _ in g]
        widths = fixed + [w for _, _, w in g]
        one_line = text_width([(f"{c} {fmt_khz(chans[c]['freq_khz'])} {chans[c]['mode']}", B, pt)
                               for c in firsts if c in chans] + [("no channel", B, pt)])
        spare = look.width - sum(widths)
        two_lines = one_line - w_chan > spare  # the net's channel on one line when the width allows
        if not two_lines:
            widths[n + 1] = one_line
            spare -= one_line - w_chan
        widths = [w + max(spare, 0) / len(widths) for w in widths]
        wrap_cells = False
        over = sum(widths) - look.width
        if over > 0:  # one station column wider than the card allows (long ids): the blocks and cells wrap
            cut = min(over, max(widths[n + 1] - 24.0, 0.0))
            widths[n + 1] -= cut
            over -= cut
            link_cols = range(n + 3, len(widths))
            total = sum(widths[i] for i in link_cols)
            if over > 0 and total > 0:
                scale = max((total - over) / total, pt * 1.15 / min(widths[i] for i in link_cols))
                for i in link_cols:
                    widths[i] *= scale
                wrap_cells = True
            two_lines = True
        body = []
        for i, h in enumerate(hours):
            body.append(list(locals_[i])
                        + [f"{h['utc_hour']:02d}", "", Meter(h["good_days_pct"], bool(h["weak"]), look, bar=False)]
                        + [Paragraph(f"<b>{escape(cells[i])}</b>", cell) if wrap_cells else cells[i]
                           for _, cells, _ in g])
        cc = n + 1
        runs = _runs(firsts, longest=6) if wrap_cells else _runs(firsts)
        for r0, r1 in runs:
            body[r0][cc] = Paragraph(_channel_markup(chans.get(firsts[r0]), firsts[r0], two_lines and r1 > r0,
                                                     mode=not wrap_cells), cell)  # squeezed: modes are on station cards
        lead = round(pt * 1.06, 2)
        cmds = [("FONT", (0, 0), (-1, -1), B, pt, lead), ("FONT", (n, 1), (n, -1), R, pt, lead),
                ("TOPPADDING", (0, 0), (-1, -1), 0.25), ("BOTTOMPADDING", (0, 0), (-1, -1), 0.45),
                ("LINEBELOW", (0, 0), (-1, 0), 1.0, colors.black),
                ("LINEBEFORE", (cc, 0), (cc, -1), 1.0, colors.black),
                ("LINEAFTER", (cc + 1, 0), (cc + 1, -1), 1.0, colors.black),
                ("ALIGN", (n, 0), (n, -1), "CENTER"), ("ALIGN", (cc + 2, 0), (-1, -1), "CENTER"),
                ("VALIGN", (0, 0), (-1, 0), "BOTTOM"), ("BOX", (0, 0), (-1, -1), 0.6, colors.black)]
        if g:
            cmds.append(("INNERGRID", (cc + 2, 0), (-1, -1), 0.3, colors.black))
        for i in range(len(body)):
            if i % 2 == 1:
                cmds.append(("BACKGROUND", (0, i + 1), (n, i + 1), SHADE))
                cmds.append(("BACKGROUND", (cc + 1, i + 1), (-1, i + 1), SHADE))
        for r0, r1 in runs:
            if r1 > r0:
                cmds.append(("SPAN", (cc, r0 + 1), (cc, r1 + 1)))
            if r0:
                cmds.append(("LINEABOVE", (0, r0 + 1), (-1, r0 + 1), 1.0, colors.black))
        if len(groups) > 1:
            out.append(look.T(f"Stations, part {gi + 1} of {len(groups)}", "bold"))
        out.append(Keep([table([heads] + body, widths, cmds, look, repeat=1), Spacer(1, 1.5), net_legend(data, look, bool(g))]))
    return out


def net_legend(data: dict, look: Look, has_columns: bool) -> Flowable:
    target = f" (target {cd.target_pct(data)} %)"
    w, x = weak_mark(), gap_mark()
    text = f"<b>Works</b>: % of days on the weakest link{target}; white on black: below."
    if has_columns:
        text += (" <b>Station columns</b>: its channel if not the net's; "
                 f"<b>{w}</b> below target; <b>{x}</b> gap, none reaches it. A station without a column is on the "
                 "net channel at every hour.")
    else:
        text += " Every station is on the net channel at every hour."
    return look.P(text)


def net_front(data: dict, look: Look) -> list[Flowable]:
    """The timetable with its legend first (they must share a side), then the dates and the UTC offset."""
    return net_tables(data, look) + [Spacer(1, 2)] + period_block(data, look)


def stations_from_control(data: dict, look: Look) -> list[Flowable]:
    """The net's address, then every station: address, full name, bearing and distance from control."""
    net = data["net"]
    ctl = cd.control_station(data)
    out: list[Flowable] = [look.T("Stations", "head"),
                           look.P(f"<b>NET {escape(net.get('net_address') or 'none')}</b> (net address)")]
    from_ctl = {link["to"]: link for link in data["links"] if ctl and link["from"] == ctl["id"]}
    for s in data["stations"]:
        text = f"<b>{escape(s['address'])}</b> {escape(s['name'])}"
        if ctl and s["id"] == ctl["id"]:
            text += " (control)"
        elif s["id"] in from_ctl:
            link = from_ctl[s["id"]]
            text += f" · from control {link['azimuth_deg']:.0f}°, {link['distance_km']:.0f} km"
        out.append(look.P(text))
    return out


def gaps_block(data: dict, look: Look) -> list[Flowable]:
    out: list[Flowable] = [look.T("Gaps: hours no channel serves a station", "head")]
    if not data.get("gaps"):
        return out + [look.P("None: at every hour some channel serves every station.")]
    for g in data["gaps"]:
        out.append(look.P(escape(cd.gap_text(g)), "item", bullet=gap_mark()))
    return out


def net_back(data: dict, look: Look) -> list[Flowable]:
    ns = data["net_schedule"]
    out: list[Flowable] = [Keep(stations_from_control(data, look))]
    weak = weak_hours_block(cd.net_weak_runs(data), look)
    if weak:
        out.append(Keep(weak))
    out += [Keep(gaps_block(data, look)),
            look.T(f"The net changes channel {ns['changes_per_day']} times a day.")]
    out += instructions_block(data, look)  # in full: control's file may run to more cards; a station's annex may not
    out += [Spacer(1, 3), QRBox(qr.payload(data, None), qr_caption(data), look)]
    return out
