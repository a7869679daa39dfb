"""Field cards: read the PDFs back and check them against the compiled data they were made from.

The plan is tests/publish/cardfixture.py: a 6-station hub net with 9 channels
(invented figures in the shape of plan.json). Outside references for the checks:

- page sizes: ISO 216 A6 = 105 x 148 mm, A4 = 210 x 297 mm; US Letter 8.5 x 11 in;
  index cards 3 x 5 in and 3.5 x 5 in; 1 in = 72 PDF points (ISO 32000-1, 8.3.2.3).
- font embedding: ISO 32000-1 9.9 (FontFile2 = TrueType program, FontFile3 = CFF);
  the base-14 names are the standard 14 Type 1 fonts of 9.6.2.2.
- QR: decoded with zxing-cpp, an independent reader of ISO/IEC 18004.
- the smallest type, 7 pt, and "at most two cards a member" are the issue's requirements.
"""

from __future__ import annotations

import hashlib
import math
import pathlib
import re
import subprocess
import sys
import textwrap

import jsonschema
import pypdfium2 as pdfium
import pytest
import zxingcpp

sys.path.insert(0, str(pathlib.Path(__file__).parent))
from cardfixture import build_data  # noqa: E402
from cardread import (assert_fonts_embedded, char_sizes, open_pdf, page_count, page_texts, timetable,  # noqa: E402
                      type_size, upright_false_words)

from planpack.output_schema import output_schema  # noqa: E402
from planpack.publish import carddata as cd  # noqa: E402
from planpack.publish import cardlayout, qr  # noqa: E402
from planpack.publish.cards import card_deck, render_cards  # noqa: E402
from planpack.publish.cardstyle import MIN_PT, fmt_khz, fmt_m  # noqa: E402

MM = 72 / 25.4
SIZES_PT = {"3.5x5in": (252.0, 360.0), "a6": (105 * MM, 148 * MM), "3x5in": (216.0, 360.0)}  # ISO 216, index cards
FIXTURE = str(pathlib.Path(__file__).with_name("cardfixture.py"))
MEMBERS = ["ridge", "river", "pass", "lake", "mill"]


@pytest.fixture(scope="module")
def data():
    return build_data()


@pytest.fixture(scope="module")
def files(data):
    return render_cards(data, impose="a4")


@pytest.fixture(scope="module")
def clock():
    d = build_data(clock_change=True)
    return d, render_cards(d)


@pytest.fixture(scope="module")
def long_names():
    d = build_data(long_names=True, handling="EXERCISE ONLY — NOT FOR OPERATIONS — TRAINING MATERIAL")  # 55 of 60
    return d, render_cards(d)


def station(d, sid):
    return next(s for s in d["stations"] if s["id"] == sid)


# ------------------------------------------------------------------ the data itself

@pytest.mark.parametrize("kw", [{}, {"clock_change": True}, {"long_names": True}, {"base_url": None}])
def test_fixture_validates_against_the_output_schema(kw):
    jsonschema.validate(build_data(**kw), output_schema())


def test_files_named_per_station_net_and_sheet(data, files):
    names = {f"{s['id']}.pdf" for s in data["stations"]} | {"net-control.pdf", "all-cards.pdf", "cards-a4.pdf"}
    assert set(files) == names
    assert all(v.startswith(b"%PDF-") for v in files.values())


# ------------------------------------------------------------------ one card per team, type size

def test_member_file_is_one_card_of_essentials_and_one_annex(data, files):
    """The issue: a member of a 6-station hub net with 9 channels gets at most 4 sides, none under 7 pt."""
    assert len(data["stations"]) == 6 and len(data["channels"]) == 9 and data["net"]["links_rule"] == "hub"
    for sid in MEMBERS:
        pdf = files[f"{sid}.pdf"]
        assert page_count(pdf) <= 4, sid
        assert min(char_sizes(pdf)) >= MIN_PT - 1e-6, sid
        texts = page_texts(pdf)
        assert "annex front" in texts[2] and "annex back" in texts[3]
        assert "card 1/2" in texts[0] and "card 2/2" in texts[3]
        assert "more on" not in " ".join(texts), "a member's essentials continued onto another card"


@pytest.mark.parametrize("size", sorted(SIZES_PT))
def test_page_size_fonts_and_smallest_type(data, size):
    out = render_cards(data, size=size)
    w, h = SIZES_PT[size]
    for name, pdf_bytes in out.items():
        assert_fonts_embedded(pdf_bytes)
        with open_pdf(pdf_bytes) as pdf:
            for page in pdf.pages:
                assert abs(float(page.width) - w) <= 0.5 and abs(float(page.height) - h) <= 0.5, name
                sizes = [type_size(c) for c in page.chars]
                assert sizes and min(sizes) >= MIN_PT - 1e-6, (name, min(sizes))
                for c in page.chars:  # nothing printed outside the card
                    assert -0.5 <= c["x0"] and c["x1"] <= w + 0.5 and -0.5 <= c["top"] and c["bottom"] <= h + 0.5


def test_a6_uses_its_area_for_larger_type(data):
    small, large = render_cards(data, size="3.5x5in"), render_cards(data, size="a6")
    for sid in ("ridge", "ops"):
        with open_pdf(small[f"{sid}.pdf"]) as a, open_pdf(large[f"{sid}.pdf"]) as b:
            ta, tb = timetable(a.pages[0]), timetable(b.pages[0])
            assert tb.rows[0].pct_size > ta.rows[0].pct_size + 1.0
            body_a = sorted(c["size"] for c in a.pages[1].chars)
            body_b = sorted(c["size"] for c in b.pages[1].chars)
            assert body_b[len(body_b) // 2] > body_a[len(body_a) // 2] * 1.1  # the median type of the back
        assert page_count(large[f"{sid}.pdf"]) <= 4


def test_card_size_from_the_plan(data):
    d = dict(data, net=dict(data["net"], card_size="3x5in"))
    assert card_deck(d).width == pytest.approx(216.0)


# ------------------------------------------------------------------ the front: the timetable

def _check_timetable(d, sid, pdf_bytes):
    s = station(d, sid)
    hours = {h["utc_hour"]: h for h in s["brief"]["hours"]}
    n = len(d["net"]["periods"])
    with open_pdf(pdf_bytes) as pdf:
        t = timetable(pdf.pages[0])
    assert t is not None and len(t.rows) == 24, sid
    mark = "⚠"
    seen = []
    for r in t.rows:
        h = hours[int(r.utc)]
        seen.append(int(r.utc))
        assert r.locals == h["local_times"] and len(r.locals) == n, (sid, r)
        assert r.pct == f"{h['good_days_pct']}%", (sid, r)  # a whole percent on every hour
        assert r.pct_white == h["weak"], (sid, r)  # white on black exactly on the weak hours
        if h["weak"]:
            fb = h["fallback"]
            want = f"{mark} {fb['channel']} {fb['good_days_pct']}%" if fb["channel"] else f"{mark} none"
            assert r.if_not == want, (sid, r)
        else:
            assert mark not in r.if_not
            useful = h["second"] and (h["second_good_days_pct"] or 0) > 0
            assert r.if_not == (f"{h['second']} {h['second_good_days_pct']}%" if useful else "–")
    assert sorted(seen) == list(range(24))
    # one channel block per run of hours, in local order, each with its frequency and mode
    firsts = [hours[int(r.utc)]["first"] for r in t.rows]
    runs = [c for i, c in enumerate(firsts) if i == 0 or firsts[i - 1] != c]
    labels = [c for c, _ in t.channels]
    chans = {c["id"]: c for c in d["channels"]}
    assert [x.split()[0] for x in labels] == runs, (sid, labels)
    for text, cid in zip(labels, runs):
        assert text == f"{cid} {fmt_khz(chans[cid]['freq_khz'])} {chans[cid]['mode']}"
    return t


@pytest.mark.parametrize("sid", ["ops"] + MEMBERS)
def test_front_timetable_equals_the_station_brief(data, files, sid):
    _check_timetable(data, sid, files[f"{sid}.pdf"])


def test_weak_hours_carry_the_mark_and_the_fallback(data, files):
    """Hours at 0 % (both channels) and an hour with no second channel: marked, with the fallback said."""
    ridge = station(data, "ridge")["brief"]["hours"]
    assert any(h["weak"] and h["fallback"]["good_days_pct"] == 0 for h in ridge)
    none = [h for h in ridge if h["weak"] and h["fallback"]["channel"] is None]
    assert none
    front = page_texts(files["ridge.pdf"])[0]
    for h in none:  # the instruction itself, once, for the rows marked "none"
        assert front.count(f"⚠ none: {h['fallback']['text']}.") == 1
    assert "Works: % of days it carries your links (the worst); target 75 %." in front


def test_utc_offset_and_readable_revision_on_every_card(data, files):
    label = data["revision"]["label"]
    for name, pdf in files.items():
        if name.startswith("cards-"):
            continue
        texts = page_texts(pdf)
        for i in range(0, len(texts), 2):
            card = texts[i] + " " + texts[i + 1]
            assert "UTC+1" in card, (name, i)
        for t in texts:
            assert label in t, name
    assert "local time UTC+1 (Etc/GMT-1)" in page_texts(files["river.pdf"])[0]


def test_addresses_on_the_front(data, files):
    for sid in MEMBERS:
        s = station(data, sid)
        front = page_texts(files[f"{sid}.pdf"])[0]
        assert f"SELF {s['address']} CONTROL VALOPS NET ALPNET" in front
        others = [o["address"] for o in s["brief"]["other_members"]]
        assert len(others) == 4 and "Others: " + " · ".join(others) in front


# ------------------------------------------------------------------ the clock change

def test_clock_change_two_local_columns_headed_with_their_dates(clock):
    d, out = clock
    for sid in ["ops"] + MEMBERS:
        t = _check_timetable(d, sid, out[f"{sid}.pdf"])
        assert "UTC UTC+1 to from 27 Mar 28 Mar" in t.head_text
        front = page_texts(out[f"{sid}.pdf"])[0]
        assert "15 Mar–10 Apr 2027 · clocks change 28 Mar (Europe/London)" in front
        assert page_count(out[f"{sid}.pdf"]) <= 4
    rows = timetable(open_pdf(out["river.pdf"]).pages[0]).rows
    assert any(r.locals == ["23:00", "00:00"] for r in rows)  # both sides of the change right, at midnight too
    with open_pdf(out["net-control.pdf"]) as pdf:
        t = timetable(pdf.pages[0])
        assert len(t.rows) == 24 and all(len(r.locals) == 2 for r in t.rows)


# ------------------------------------------------------------------ the back: antenna, ground, orientation, safety

def test_back_antenna_to_rig_with_cut_lengths_in_metres_and_feet(data, files):
    ants = {a["id"]: a for a in data["antennas"]}
    back = page_texts(files["ridge.pdf"])[1]
    assert "team-iv on C2–C9: inverted-V dipole" in back and "team-whip on C1: vertical whip" in back
    for aid, keys in (("team-iv", ("leg_m", "leg_cut_with_extra_m", "end_height_m")), ("team-whip", ("total_m",))):
        cut = ants[aid]["cut"]
        for k in keys:
            assert f"{fmt_m(cut[k])} m {cut[k[:-2] + '_ft_in']}" in back, (aid, k)
    ops = page_texts(files["ops.pdf"])[1]
    cut = ants["ops-dr"]["cut"]
    for k in ("leg_m", "leg_cut_with_extra_m", "reflector_cut_with_extra_m", "reflector_below_m"):
        assert f"{fmt_m(cut[k])} m {cut[k[:-2] + '_ft_in']}" in ops, k
    assert "Rig" not in ops  # one antenna: no per-channel line


def test_back_ground_orientation_and_wire(data, files):
    for sid in MEMBERS:
        s = station(data, sid)
        back = page_texts(files[f"{sid}.pdf"])[1]
        g, to = s["brief"]["ground"], s["brief"]["to_control"]
        assert f"Ground: {g['system']} on medium-dry soil: {g['text']}" in back
        if g["counterpoise_m"] or g["radial_m"]:
            assert f"{g['counterpoise_m'] or g['radial_m']:.2f} m ({g['counterpoise_ft_in'] or g['radial_ft_in']})" in back
        assert f"To control VALOPS: bearing {to['bearing_deg']:.0f}° ({to['compass']}), {to['distance_km']:.0f} km" in back
        for run in s["brief"]["wire_runs"]:
            assert run["text"] in back


def test_back_short_cautions_exposure_pointer_qr_and_notes(data, files):
    for sid in MEMBERS:
        back = page_texts(files[f"{sid}.pdf"])[1]
        for line in data["safety"]["short"]:
            assert line in back
        exp = station(data, sid)["brief"]["exposure"]["text"]
        assert exp[0].upper() + exp[1:] in back
        assert "Full cautions: on the annex card and the net's site. Local codes" in back
        assert "Notes / log (UTC)" in back


def test_annex_holds_the_detail_and_names_what_it_left_out(data, files):
    deck = card_deck(data)
    for sid in MEMBERS:
        texts = page_texts(files[f"{sid}.pdf"])
        annex = texts[2] + " " + texts[3]
        left = deck.left_out[sid]
        assert "full cautions" not in left
        for c in data["safety"]["cautions"]:
            assert c["text"] in annex
        if left:
            assert "On the site, not on this card: " + "; ".join(left) + "." in annex
        assert "Standing instructions" in annex and "Check in at the top of each hour." in annex


def test_swr_is_printed_as_written_never_formatted(data, files):
    """SWR from swr_text ("> 50:1"); never the raw 999 nor a decimal such as "235.0:1"."""
    ants = {a["id"]: a for a in data["antennas"]}
    deck = card_deck(data)
    for name, pdf in files.items():
        text = " ".join(page_texts(pdf))
        assert "999" not in text, name
        for m in re.finditer(r"(\d+(?:\.\d+)?):1\b", text):
            assert float(m.group(1)) <= 50, (name, m.group(0))
    for sid in MEMBERS:
        if "SWR table" in deck.left_out[sid]:
            continue
        annex = page_texts(files[f"{sid}.pdf"])[3]
        for aid in station(data, sid)["antennas"]:
            for c in ants[aid]["channels"]:
                assert c["swr_text"] in annex
        assert "> 50:1 poor" in annex


# ------------------------------------------------------------------ names, hostile text

def _strip_name(page) -> str:
    """The owner's name as printed in the title strip (bold, 8 pt or more, under the top bar)."""
    words = sorted((w for w in page.extract_words(extra_attrs=["size", "fontname", "non_stroking_color"])
                    if "Bold" in w["fontname"] and tuple(w["non_stroking_color"] or ()) != (1.0, 1.0, 1.0)),
                   key=lambda w: (round(w["top"]), w["x0"]))  # bold and not white: the handling bar is white text
    first = words[0]
    lines, last = [], first["top"]
    for w in words[words.index(first):]:
        if abs(w["size"] - first["size"]) > 0.01 or w["top"] - last > first["size"] * 1.3:
            break
        lines.append(w["text"])
        last = w["top"]
    return " ".join(lines)


def test_names_are_never_cut_short(long_names):
    d, out = long_names
    s = station(d, "ridge")
    with open_pdf(out["ridge.pdf"]) as pdf:
        for i, page in enumerate(pdf.pages):
            assert _strip_name(page) == s["name"], i  # the whole name on every side, wrapped, never cut
            t = " ".join(page.extract_text().split())
            assert "…" not in t and t.count("EXERCISE ONLY — NOT FOR OPERATIONS — TRAINING MATERIAL") == 2  # top, bottom
    front = page_texts(out["river.pdf"])[0]
    assert "SELF RIVERPOSTALPHA9" in front
    for sid in ["ops"] + MEMBERS:
        assert min(char_sizes(out[f"{sid}.pdf"])) >= MIN_PT - 1e-6


def test_long_names_still_fit_two_cards():
    d = build_data(long_names=True)
    out = render_cards(d)
    for sid in ["ops"] + MEMBERS:
        assert page_count(out[f"{sid}.pdf"]) <= 4, sid
    with open_pdf(out["ridge.pdf"]) as pdf:
        assert all(_strip_name(p) == station(d, "ridge")["name"] for p in pdf.pages)


def test_script_tag_and_odd_unicode_print_as_text():
    d = build_data()
    station(d, "ridge")["name"] = "<script>alert(1)</script>"
    station(d, "river")["name"] = "Žďár & Łódź — Ωμέγα Пост"
    d["net"]["instructions_md"] = "Use <b>raw</b> & <script>x()</script> *never*."
    out = render_cards(d)
    assert "<script>alert(1)</script>" in page_texts(out["ridge.pdf"])[0]
    assert "Use <b>raw</b> & <script>x()</script> never." in page_texts(out["ridge.pdf"])[2]
    assert "Žďár & Łódź — Ωμέγα Пост" in page_texts(out["river.pdf"])[0]


def test_text_the_font_cannot_print_is_reported():
    from planpack.publish.cards import text_warnings

    d = build_data()
    assert text_warnings(d) == []
    station(d, "ops")["name"] = "Ops \U0001F4E1 東"  # satellite-antenna emoji and a CJK letter: not in DejaVu Sans
    warns = text_warnings(d)
    assert len(warns) == 1 and "stations.ops.name" in warns[0] and "U+6771" in warns[0]
    render_cards(d)  # still renders, with the warning to say so


# ------------------------------------------------------------------ the net card

def test_net_card_columns_explained_on_the_same_side(data, files):
    with open_pdf(files["net-control.pdf"]) as pdf:
        front = pdf.pages[0]
        heads = upright_false_words(front)
        text = " ".join(front.extract_text().split())
        t = timetable(front)
    assert heads == ["RIDGE1", "RIVPST", "HPASS", "LAKCMP", "MILDEP"]  # ALE addresses, not codes
    assert "Station columns: its channel if not the net's;" in text and "✕ gap, none reaches it." in text
    assert not re.search(r"\bL\d\b", " ".join(page_texts(files["net-control.pdf"])))
    net = {h["utc_hour"]: h for h in data["net_schedule"]["hours"]}
    for r in t.rows:
        h = net[int(r.utc)]
        assert r.pct == f"{h['good_days_pct']}%" and r.pct_white == h["weak"]


def test_net_card_cells_say_where_a_station_differs(data, files):
    with open_pdf(files["net-control.pdf"]) as pdf:
        words = pdf.pages[0].extract_words()
    ridge = next(ln for ln in data["links"] if ln["to"] == "ridge")
    differs = [h for h in ridge["hours"] if h["first"] != _net_first(data, h["utc_hour"])]
    assert differs and sum(w["text"] == "C7" for w in words) == len(differs)
    legend = next(w["top"] for w in words if w["text"] == "Works:")
    lake = next(ln for ln in data["links"] if ln["to"] == "lake")
    assert sum(w["text"] == "✕" and w["top"] < legend for w in words) == len(lake["gap_utc_hours"])


def _net_first(data, u):
    return next(h["first"] for h in data["net_schedule"]["hours"] if h["utc_hour"] == u)


def test_net_card_back_weak_hours_and_gaps_in_words(data, files):
    text = " ".join(page_texts(files["net-control.pdf"]))
    for run in data["net_schedule"]["weak_runs"]:
        assert run["text"] in text
    for g in data["gaps"]:
        assert cd.gap_text(g) in text
    for s in data["stations"]:
        assert f"{s['address']} {s['name']}" in text
    assert page_count(files["net-control.pdf"]) == 2


# ------------------------------------------------------------------ QR codes

def decode_qrs(pdf_bytes: bytes) -> list[str]:
    """Every QR code zxing-cpp finds on any page, rendered at 288 dpi."""
    pdf = pdfium.PdfDocument(pdf_bytes)
    found = []
    for page in pdf:
        found += [r.text for r in zxingcpp.read_barcodes(page.render(scale=4).to_pil())]
    return found


def test_qr_opens_the_net_page(data, files):
    url = "https://intranet.example/nets/alpine-test/"
    assert qr.payload(data, data["stations"][0]) == url
    for name in ("ops.pdf", "ridge.pdf", "net-control.pdf"):
        assert decode_qrs(files[name]) == [url], name  # one code per card file


def test_qr_without_base_url_carries_revision_and_figures():
    d = build_data(base_url=None)
    out = render_cards(d)
    s = station(d, "ridge")
    expected = qr.payload(d, s)
    assert f"rev {d['revision']['id']}" in expected and "station ridge self RIDGE1" in expected
    assert decode_qrs(out["ridge.pdf"]) == [expected]


# ------------------------------------------------------------------ imposition

@pytest.mark.parametrize("sheet", sorted(cardlayout.SHEETS))
@pytest.mark.parametrize("size", sorted(cardlayout.CARD_SIZES))
def test_imposition_backs_land_behind_fronts(sheet, size):
    sw, sh = cardlayout.sheet_size(sheet)
    w, h = cardlayout.card_size(size)
    fronts = cardlayout.front_slots(sheet, size)
    assert len(fronts) >= 1
    boxes = [f.box() for f in fronts]
    for k, f in enumerate(fronts):
        b = cardlayout.back_slot(f, sheet)
        for u, v in ((0, 0), (w, 0), (0, h), (w, h), (w / 3, h / 5)):
            # card point (u, v) on the front lies behind card point (w - u, v) on the back
            fx, fy = cardlayout.sheet_flip(*f.place(u, v), sheet)
            bx, by = b.place(w - u, v)
            assert math.isclose(fx, bx, abs_tol=1e-6) and math.isclose(fy, by, abs_tol=1e-6), (k, u, v)
        x0, y0, x1, y1 = boxes[k]
        assert x0 >= cardlayout.SHEET_MARGIN - 1e-6 and y0 >= cardlayout.SHEET_MARGIN - 1e-6
        assert x1 <= sw - cardlayout.SHEET_MARGIN + 1e-6 and y1 <= sh - cardlayout.SHEET_MARGIN + 1e-6
        for j in range(k):  # no two cards overlap
            a = boxes[j]
            assert x1 <= a[0] + 1e-6 or a[2] <= x0 + 1e-6 or y1 <= a[1] + 1e-6 or a[3] <= y0 + 1e-6
    for x0, y0, x1, y1 in cardlayout.crop_marks(fronts):  # marks never print on a card
        for bx0, by0, bx1, by1 in boxes:
            inside_x = min(x0, x1) < bx1 - 1e-6 and max(x0, x1) > bx0 + 1e-6
            inside_y = min(y0, y1) < by1 - 1e-6 and max(y0, y1) > by0 + 1e-6
            assert not (inside_x and inside_y)


def test_imposed_pdf_crop_marks_and_back_behind_front(data, files):
    deck = card_deck(data)
    sheet = "a4"
    sw, sh = cardlayout.sheet_size(sheet)
    fronts = cardlayout.front_slots(sheet, deck.size)
    per = len(fronts)
    marks = cardlayout.crop_marks(fronts)
    with open_pdf(files["cards-a4.pdf"]) as pdf:
        assert len(pdf.pages) == 2 * math.ceil(deck.total / per)
        for page in pdf.pages:
            assert abs(float(page.width) - sw) < 0.5 and abs(float(page.height) - sh) < 0.5
            drawn = {(round(ln["x0"], 1), round(ln["x1"], 1), round(float(page.height) - ln["top"], 1),
                      round(float(page.height) - ln["bottom"], 1)) for ln in page.lines}
            for x0, y0, x1, y1 in marks:
                key = (round(min(x0, x1), 1), round(max(x0, x1), 1), round(max(y0, y1), 1), round(min(y0, y1), 1))
                assert key in drawn, f"crop mark {key} missing"

        def centre_of(page, card):
            """Where the footer 'card n/N' of this card (its owner's name above it) sits on the sheet."""
            label = f"card {card.number}/{card.of}"
            for wd in page.extract_words():
                if wd["text"] == f"{card.number}/{card.of}":
                    x, y = (wd["x0"] + wd["x1"]) / 2, float(page.height) - (wd["top"] + wd["bottom"]) / 2
                    slot = [s for s in range(per) if _inside(fronts[s].box(), x, y)
                            or _inside(cardlayout.back_slot(fronts[s], sheet).box(), x, y)]
                    yield slot[0] if slot else None, label

        for sheet_i in range(0, len(pdf.pages), 2):
            group = deck.cards[sheet_i // 2 * per:(sheet_i // 2 + 1) * per]
            front_page, back_page = pdf.pages[sheet_i], pdf.pages[sheet_i + 1]
            for k, card in enumerate(group):
                x0, y0, x1, y1 = fronts[k].box()
                title = card.title.split()[0]
                crop_f = front_page.within_bbox((x0, sh - y1, x1, sh - y0))
                assert title in crop_f.extract_text()
                bx0, by0, bx1, by1 = cardlayout.back_slot(fronts[k], sheet).box()
                crop_b = back_page.within_bbox((bx0, sh - by1, bx1, sh - by0))
                assert title in crop_b.extract_text() and f"card {card.number}/{card.of}" in crop_b.extract_text()
                # after the long-edge flip, the back's footprint is exactly the front's
                assert math.isclose(sw - bx1, x0, abs_tol=1e-6) and math.isclose(by0, y0, abs_tol=1e-6)


def _inside(box, x, y) -> bool:
    return box[0] <= x <= box[2] and box[1] <= y <= box[3]


# ------------------------------------------------------------------ determinism

def test_same_data_same_bytes(data, files):
    assert render_cards(data, impose="a4") == files


def test_same_bytes_in_a_fresh_process(files):
    code = textwrap.dedent("""
        import hashlib, importlib.util, sys
        spec = importlib.util.spec_from_file_location("cardfixture", sys.argv[1])
        mod = importlib.util.module_from_spec(spec)
        spec.loader.exec_module(mod)
        from planpack.publish.cards import render_cards
        out = render_cards(mod.build_data(), impose="a4")
        for k in sorted(out):
            print(k, hashlib.sha256(out[k]).hexdigest())
    """)
    res = subprocess.run([sys.executable, "-c", code, FIXTURE], capture_output=True, text=True, check=True)
    assert res.stdout.split("\n")[:-1] == [f"{k} {hashlib.sha256(files[k]).hexdigest()}" for k in sorted(files)]


# ------------------------------------------------------------------ every schema-valid plan renders

def _hostile(clock_change: bool) -> dict:
    """The fixture at the schema's limits: 12-character channel ids, 40-character modes and antenna ids,
    80-character names, 15-character addresses, a 120-character title, 200-character notes, long standing
    instructions, a weak hour everywhere with a long instruction and no second channel."""
    d = build_data(clock_change=clock_change, long_names=True, handling="H" * 20 + " MARKING" * 5)
    ren = {c["id"]: f"CH{i:02d}-ABCDEFG"[:12] for i, c in enumerate(d["channels"])}
    ants = {a["id"]: (a["id"] + "-" + "x" * 40)[:40] for a in d["antennas"]}

    def walk(o):
        if isinstance(o, dict):
            for k, v in o.items():
                if k in ("first", "second", "channel") and isinstance(v, str):
                    o[k] = ren.get(v, v)
                elif k == "antenna" and isinstance(v, str):
                    o[k] = ants.get(v, v)
                elif k == "channels" and isinstance(v, list) and v and isinstance(v[0], str):
                    o[k] = [ren.get(x, x) for x in v]
                else:
                    walk(v)
        elif isinstance(o, list):
            for x in o:
                walk(x)
    for c in d["channels"]:
        c["id"], c["mode"], c["note"] = ren[c["id"]], "m" * 40, ("note " * 40)[:200]
    for key in ("stations", "links", "net_schedule", "antennas", "scan_lists", "gaps"):
        walk(d[key])
    for a in d["antennas"]:
        a["id"] = ants[a["id"]]
    for s in d["stations"]:
        s["name"] = ("Very long station name " * 4)[:80]
        s["address"] = (s["address"] * 3)[:15]
        s["antennas"] = [ants[x] for x in s["antennas"]]
    d["net"]["instructions_md"] = "- a standing instruction that goes on and on\n" * 400
    d["net"]["title"] = "T" * 120
    for h in d["net_schedule"]["hours"] + [h for s in d["stations"] for h in s["brief"]["hours"]]:
        h["weak"], h["second"], h["second_good_days_pct"] = True, None, None
        h["fallback"] = {"channel": None, "good_days_pct": None,
                         "text": "no second channel: " + "relay via control " * 8}
    return d


@pytest.mark.parametrize("clock_change", [False, True])
@pytest.mark.parametrize("size", ["3.5x5in", "3x5in"])
def test_a_plan_at_the_schemas_limits_still_renders_whole(clock_change, size):
    """No layout failure, nothing under 7 pt, nothing off the card, every hour and channel printed."""
    d = _hostile(clock_change)
    jsonschema.validate(d, output_schema())
    out = render_cards(d, size=size)
    w, h = SIZES_PT[size]
    for name, pdf in out.items():
        with open_pdf(pdf) as doc:
            for page in doc.pages:
                for c in page.chars:
                    assert type_size(c) >= MIN_PT - 1e-6, name
                    assert -0.5 <= c["x0"] and c["x1"] <= w + 0.5 and -0.5 <= c["top"] and c["bottom"] <= h + 0.5
    text = " ".join(page_texts(out["ridge.pdf"]))
    for u in range(24):
        assert re.search(rf"\b{u:02d}\b", text)
    assert all(c["id"] in text for c in d["channels"])
    assert "relay via control" in text  # the weak hours' instruction
