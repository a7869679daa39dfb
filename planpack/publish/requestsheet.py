"""The one-page frequency request sheet, in the field cards' style, from the request's plain data alone.

The handling marking runs in a black bar at the top and the bottom, as on
the cards; the plan revision is in the footer. Everything printed comes
from :func:`planpack.requests.engine.plan_requests`'s data; nothing is
recomputed. A long request is shortened line by line until it fits one
page, and the sheet says what it left out and where to find it.
"""

from __future__ import annotations

import io
from xml.sax.saxutils import escape

from reportlab.lib import colors
from reportlab.lib.enums import TA_LEFT
from reportlab.lib.pagesizes import A4, LETTER
from reportlab.lib.styles import ParagraphStyle
from reportlab.platypus import Paragraph, Spacer, Table, TableStyle

from planpack.publish import cardfonts
from planpack.requests import report
from planpack.scheduling.hours import format_hours

SHEETS = {"a4": A4, "letter": LETTER}
MARGIN = 36.0  # [pt]
BAR_H = 16.0
BAR_PT = 10.0
FOOT_PT = 7.5
R, B = cardfonts.REGULAR, cardfonts.BOLD
SHADE = colors.Color(0.86, 0.86, 0.86)


def _style(name: str, size: float, font: str = R, **kw) -> ParagraphStyle:
    return ParagraphStyle(name, fontName=font, fontSize=size, leading=size * 1.25, alignment=TA_LEFT,
                          textColor=colors.black, **kw)


ST = {
    "title": _style("title", 15.0, B, spaceAfter=2),
    "sub": _style("sub", 9.5, B, spaceAfter=4),
    "body": _style("body", 8.5, spaceAfter=2),
    "head": _style("head", 10.0, B, spaceBefore=6, spaceAfter=2),
    "cell": _style("cell", 8.0),
    "cellb": _style("cellb", 8.0, B),
    "small": _style("small", 7.0),
}


def _p(text: str, style: str = "body") -> Paragraph:
    return Paragraph(escape(text), ST[style])


def _story(d: dict, detail: int, fw: float) -> list:
    """The flowables at a detail level: 0 everything, higher levels fewer lines per item."""
    labels = d["local_time_labels"]
    t = d["target_good_days"]
    head = report.header_lines(d)
    keep_serves = (None, 6, 3, 2, 1, 1, 1)[min(detail, 6)]
    keep_items = (None, None, 12, 8, 6, 4, 2)[min(detail, 6)]
    story = [_p("Frequency request", "title"), _p(d["net"]["title"], "sub"), _p(head[2]), _p(head[3]),
             _p("Before: " + report.before_after(d, "before"))]
    dropped = 0
    if not d["before"]["gap_hours"]:
        return story + [_p(d["summary"], "sub")]
    props = d["proposals"]
    if props:
        story.append(_p(f"Ask for {len(props)} new {d['mode']['id']} channel{'s' * (len(props) != 1)}", "head"))
        rows = [[_p("", "cellb"), _p("frequency", "cellb"), _p("window", "cellb"), _p("worst hour", "cellb"),
                 _p("serves (UTC, local)", "cellb"), _p("assigned (kHz)", "cellb")]]
        shown = props if keep_items is None else props[:keep_items]
        for p in shown:
            lines = report.grouped(p["serves"], labels)
            if p["net_channel_utc_hours"]:
                h = p["net_channel_utc_hours"]
                lines.append(f"whole net {format_hours(h)} UTC ({format_hours(h, labels)} local)")
            if keep_serves is not None and len(lines) > keep_serves:
                dropped += len(lines) - keep_serves
                lines = lines[:keep_serves - 1] + [f"... and {len(lines) - keep_serves + 1} more lines"]
            rows.append([_p(p["id"], "cellb"), _p(report.khz(p["khz"]), "cellb"), _p(report.window(p["window_khz"]), "cell"),
                         _p(report.pct(p["worst_good_days"], t), "cell"),
                         Paragraph("<br/>".join(escape(x) for x in lines), ST["cell"]), ""])
        if len(shown) < len(props):
            dropped += len(props) - len(shown)
            rows.append([_p("", "cell"), _p(f"... and {len(props) - len(shown)} more proposals", "cell"), "", "", "", ""])
        table = Table(rows, colWidths=[0.05 * fw, 0.12 * fw, 0.15 * fw, 0.08 * fw, 0.47 * fw, 0.13 * fw], repeatRows=1)
        table.setStyle(TableStyle([
            ("VALIGN", (0, 0), (-1, -1), "TOP"), ("LINEBELOW", (0, 0), (-1, 0), 0.8, colors.black),
            ("ROWBACKGROUNDS", (0, 1), (-1, -1), [colors.white, SHADE]),
            ("BOX", (-1, 1), (-1, -1), 0.5, colors.black), ("INNERGRID", (-1, 1), (-1, -1), 0.5, colors.black),
            ("TOPPADDING", (0, 0), (-1, -1), 1.5), ("BOTTOMPADDING", (0, 0), (-1, -1), 1.5),
            ("LEFTPADDING", (0, 0), (-1, -1), 2), ("RIGHTPADDING", (0, 0), (-1, -1), 2)]))
        story.append(table)
    else:
        story.append(_p("No new frequency would serve any of these pairs.", "head"))
    story.append(Spacer(1, 4))
    story.append(_p("After: " + report.before_after(d, "after")))
    for title, items in (("Merging", [m["message"] for m in d["merges"]]),
                         ("No frequency can serve", [f"{u['link'].replace('--', '–')} {format_hours(u['utc_hours'])} UTC "
                                                     f"({format_hours(u['utc_hours'], labels)} local): {u['message']}"
                                                     for u in d["unservable"]])):
        if not items:
            continue
        story.append(_p(title, "head"))
        cut = items if keep_items is None else items[:keep_items]
        story += [_p("- " + x, "small") for x in cut]
        if len(cut) < len(items):
            dropped += len(items) - len(cut)
            story.append(_p(f"... and {len(items) - len(cut)} more", "small"))
    story += [Spacer(1, 4), _p(report.solver_line(d), "small"), Spacer(1, 10),
              _p("Requested by ______________________   date ____________        "
                 "Assigned by ______________________   date ____________", "body")]
    if dropped:
        story.append(_p(f"This sheet leaves out {dropped} line{'s' * (dropped != 1)} to fit one page: run "
                        "planpack request PLAN --format markdown for the whole request.", "small"))
    return story


def _fit(text: str, font: str, pt: float, width: float) -> str:
    """The marking cut with an ellipsis only if it cannot fit the bar (it is limited to 60 characters)."""
    from reportlab.pdfbase.pdfmetrics import stringWidth

    while text and stringWidth(text, font, pt) > width:
        text = text[:-2] + "…"
    return text


def _fits(story: list, fw: float, fh: float) -> bool:
    used = 0.0
    for f in story:
        _, h = f.wrap(fw, fh)
        used += h + f.getSpaceBefore() + f.getSpaceAfter()
        if used > fh:
            return False
    return True


def render_request_sheet(d: dict, sheet: str = "a4") -> bytes:
    """The request (``plan_requests`` data) as a one-page PDF.

    Parameters
    ----------
    d : dict
        The request's data.
    sheet : str
        "a4" or "letter".

    Returns
    -------
    bytes
        A PDF of exactly one page.
    """
    cardfonts.register()
    w, h = SHEETS[sheet]
    fw = w - 2 * MARGIN
    top = h - MARGIN - BAR_H - 8
    bottom = MARGIN + BAR_H + FOOT_PT + 8
    fh = top - bottom
    for detail in range(7):
        story = _story(d, detail, fw)
        if _fits(story, fw, fh):
            break
    else:  # still too long: the summary alone
        story = [_p("Frequency request", "title"), _p(d["net"]["title"], "sub"), _p(d["summary"]),
                 _p("The request is too long for one page: run planpack request PLAN --format markdown.", "small")]
    buf = io.BytesIO()
    from reportlab.pdfgen.canvas import Canvas

    c = Canvas(buf, pagesize=(w, h), invariant=1, pageCompression=1, initialFontName=R, initialFontSize=8)
    rev = d["revision"]["id"]
    c.setTitle(f"{d['net']['title']}: frequency request")
    c.setAuthor("planpack")
    c.setSubject(f"net {d['net']['id']}, plan revision {rev}")
    c.setKeywords(f"revision {rev}")
    handling = d["net"].get("handling")
    for y in (h - MARGIN - BAR_H, MARGIN):
        if handling:
            c.setFillColor(colors.black)
            c.rect(MARGIN, y, fw, BAR_H, stroke=0, fill=1)
            c.setFillColor(colors.white)
            c.setFont(B, BAR_PT)
            c.drawCentredString(w / 2, y + 4.5, _fit(handling, B, BAR_PT, fw - 8))
            c.setFillColor(colors.black)
        else:
            c.setLineWidth(1.2)
            c.line(MARGIN, y + BAR_H / 2, w - MARGIN, y + BAR_H / 2)
    y = top
    for f in story:
        y -= f.getSpaceBefore()
        _, fh_ = f.wrap(fw, fh)
        y -= fh_
        f.drawOn(c, MARGIN, y)
        y -= f.getSpaceAfter()
    foot = MARGIN + BAR_H + 4
    c.setLineWidth(0.6)
    c.line(MARGIN, foot + FOOT_PT + 1.5, w - MARGIN, foot + FOOT_PT + 1.5)
    c.setFont(R, FOOT_PT)
    c.drawString(MARGIN, foot, d["revision"].get("label") or f"rev {rev}")  # as the cards and the site print it
    c.drawCentredString(w / 2, foot, f"net {d['net']['id']}")
    c.setFont(B, FOOT_PT)
    c.drawRightString(w - MARGIN, foot, "frequency request, page 1 / 1")
    c.showPage()
    c.save()
    return buf.getvalue()
