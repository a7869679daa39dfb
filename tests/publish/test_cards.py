"""Field cards: read the PDFs back and check them against the compiled data.

Outside references for the checks:
- page sizes: ISO 216 A6 = 105 x 148 mm, A4 = 210 x 297 mm; US Letter 8.5 x 11 in;
  index cards 3 x 5 in and 3.5 x 5 in; 1 in = 72 PDF points (ISO 32000-1, 8.3.2.3).
- font embedding: ISO 32000-1 9.9 (FontFile2 = TrueType program, FontFile3 = CFF/OpenType);
  the base-14 names are the standard 14 Type 1 fonts of 9.6.2.2.
- QR: decoded with zxing-cpp, an independent reader of ISO/IEC 18004.
"""

from __future__ import annotations

import io
import math
import pathlib
import re
import subprocess
import sys
import textwrap

import jsonschema
import pdfplumber
import pypdf
import pypdfium2 as pdfium
import pytest
import zxingcpp

sys.path.insert(0, str(pathlib.Path(__file__).parent))
from cardfixture import build_data  # noqa: E402

from planpack.output_schema import output_schema
from planpack.publish import cardlayout, qr
from planpack.publish.cards import card_deck, render_cards
from planpack.publish.cardstory import fmt_khz, fmt_m

BASE14 = {"Courier", "Courier-Bold", "Courier-Oblique", "Courier-BoldOblique", "Helvetica", "Helvetica-Bold",
          "Helvetica-Oblique", "Helvetica-BoldOblique", "Times-Roman", "Times-Bold", "Times-Italic",
          "Times-BoldItalic", "Symbol", "ZapfDingbats"}
MM = 72 / 25.4
SIZES_PT = {"3.5x5in": (252.0, 360.0), "a6": (105 * MM, 148 * MM), "3x5in": (216.0, 360.0)}  # ISO 216, index cards


FIXTURE = str(pathlib.Path(__file__).with_name("cardfixture.py"))


@pytest.fixture(scope="module")
def data():
    return build_data()


@pytest.fixture
def card_data_factory():
    return build_data


@pytest.fixture(scope="module")
def files(data):
    return render_cards(data, impose="a4")


def _fonts_of(obj, seen) -> list:
    """Every font dictionary reachable from a resources dictionary (pages and form XObjects)."""
    out = []
    if obj is None:
        return out
    obj = obj.get_object()
    fonts = obj.get("/Font")
    if fonts is not None:
        for _, ref in fonts.get_object().items():
            f = ref.get_object()
            if id(f) not in seen:
                seen.add(id(f))
                out.append(f)
    xobjs = obj.get("/XObject")
    if xobjs is not None:
        for _, ref in xobjs.get_object().items():
            x = ref.get_object()
            if x.get("/Subtype") == "/Form":
                out += _fonts_of(x.get("/Resources"), seen)
    return out


def assert_fonts_embedded(pdf_bytes: bytes) -> None:
    reader = pypdf.PdfReader(io.BytesIO(pdf_bytes))
    seen: set = set()
    fonts = []
    for page in reader.pages:
        fonts += _fonts_of(page.get("/Resources"), seen)
    assert fonts, "no fonts found at all"
    for f in fonts:
        base = str(f.get("/BaseFont"))
        assert base.split("+")[-1].lstrip("/") not in BASE14, f"base-14 font {base}"
        desc = f
        if f.get("/Subtype") == "/Type0":
            desc = f["/DescendantFonts"][0].get_object()
        fd = desc.get("/FontDescriptor")
        assert fd is not None, f"font {base} has no descriptor (not embedded)"
        fd = fd.get_object()
        assert "/FontFile2" in fd or "/FontFile3" in fd, f"font {base} is not embedded"


def page_lines(page) -> list[str]:
    return (page.extract_text() or "").splitlines()


ROW = re.compile(r"^(\d\d:\d\d) (\d\d) (\S+)(?: (\S+) (\S+))? (\S+)(?: (\S+) (\S+))?$")


def table_rows(pdf_bytes: bytes) -> dict[int, tuple]:
    """Hourly-table rows from a station's card PDF: utc hour -> cells (each hour exactly once)."""
    rows = {}
    with pdfplumber.open(io.BytesIO(pdf_bytes)) as pdf:
        for page in pdf.pages:
            for line in page_lines(page):
                m = ROW.match(line.strip())
                if m and m.group(3) != "ch":
                    utc = int(m.group(2))
                    assert utc not in rows, f"hour {utc} printed twice"
                    rows[utc] = m.groups()
    return rows


def expected_cells(data, h):
    chans = {c["id"]: c for c in data["channels"]}

    def block(cid):
        c = chans[cid]
        return (cid, fmt_khz(c["freq_khz"]), c["mode"])

    first = block(h["first"]) if h["first"] else ("none", None, None)
    second = block(h["second"]) if h["second"] else ("—", None, None)
    return (h["local_time"], f"{h['utc_hour']:02d}") + first + second


# ------------------------------------------------------------------ the data itself

def test_fixture_validates_against_the_output_schema(data):
    jsonschema.validate(data, output_schema())


def test_files_named_per_station_net_and_sheet(data, files):
    names = {f"{s['id']}.pdf" for s in data["stations"]} | {"net-control.pdf", "all-cards.pdf", "cards-a4.pdf"}
    assert set(files) == names
    assert all(v.startswith(b"%PDF-") for v in files.values())


# ------------------------------------------------------------------ sizes, fonts, type size

@pytest.mark.parametrize("size", sorted(SIZES_PT))
def test_page_size_fonts_and_smallest_type(data, size):
    out = render_cards(data, size=size)
    w, h = SIZES_PT[size]
    for name, pdf_bytes in out.items():
        assert_fonts_embedded(pdf_bytes)
        with pdfplumber.open(io.BytesIO(pdf_bytes)) as pdf:
            for page in pdf.pages:
                assert abs(float(page.width) - w) <= 0.5 and abs(float(page.height) - h) <= 0.5, name
                sizes = [c["size"] for c in page.chars]
                assert sizes and min(sizes) >= 6.0 - 1e-6, (name, min(sizes))
                # nothing printed outside the card
                for c in page.chars:
                    assert -0.5 <= c["x0"] and c["x1"] <= w + 0.5 and -0.5 <= c["top"] and c["bottom"] <= h + 0.5


def test_card_size_from_the_plan(data):
    d = dict(data, net=dict(data["net"], card_size="3x5in"))
    assert card_deck(d).width == pytest.approx(216.0)


def test_imposed_sheet_has_only_embedded_fonts(files):
    assert_fonts_embedded(files["cards-a4.pdf"])


# ------------------------------------------------------------------ the figures equal plan.json

@pytest.mark.parametrize("size", sorted(SIZES_PT))
def test_hourly_table_equals_net_schedule(data, size):
    out = render_cards(data, size=size)
    for s in data["stations"]:
        rows = table_rows(out[f"{s['id']}.pdf"])
        assert sorted(rows) == list(range(24)), (s["id"], sorted(rows))
        for h in data["net_schedule"]["hours"]:
            got = rows[h["utc_hour"]]
            assert tuple(x for x in got if x is not None) == tuple(x for x in expected_cells(data, h) if x is not None)


def test_cut_lengths_equal_antenna_data(data, files):
    from planpack.antennas.cut import feet_inches

    for s in data["stations"]:
        with pdfplumber.open(io.BytesIO(files[f"{s['id']}.pdf"])) as pdf:
            back = "\n".join(p.extract_text() or "" for p in pdf.pages)  # continuations may fall on any side
        for aid in s["antennas"]:
            ant = next(a for a in data["antennas"] if a["id"] == aid)
            assert f"Antenna {aid}" in back
            for key, v in (ant["cut"] or {}).items():
                if key.endswith("_m") and isinstance(v, (int, float)):
                    ft = ant["cut"].get(key[:-2] + "_ft_in") or feet_inches(v)
                    assert re.search(rf"{re.escape(fmt_m(v))} m {re.escape(ft)}\b", back), (aid, key, v, ft)
            for ch in ant["channels"]:  # SWR class in words on every channel
                assert re.search(rf"^{ch['channel']} {fmt_khz(ch['freq_khz'])} .*{ch['swr_class']}", back, re.M), ch
            for e in ant["exposure"]:
                if e["station"] == s["id"]:
                    assert f"{e['general_public_m']:.1f} m" in back and f"{e['occupational_m']:.1f} m" in back


def test_feet_inches_prefer_the_compiled_string(data, files):
    with pdfplumber.open(io.BytesIO(files["ops.pdf"])) as pdf:
        back = pdf.pages[1].extract_text()
    assert "31.62 m 103 ft 8 3/4 in" in back  # the fixture's own string, not a conversion


def test_station_header_addresses_and_sun(data, files):
    ctl = next(s for s in data["stations"] if s["role"] == "control")
    for s in data["stations"]:
        with pdfplumber.open(io.BytesIO(files[f"{s['id']}.pdf"])) as pdf:
            fronts = " ".join("\n".join(p.extract_text() for p in pdf.pages).replace("\xa0", " ").split())
        assert s["name"] in fronts
        assert re.search(rf"{s['address']}\s+{data['net']['net_address']}\s+{ctl['address']}", fronts)
        assert f"rise {s['sun']['sunrise_local']} ({s['sun']['sunrise_utc']} UTC)" in fronts
        assert f"set {s['sun']['sunset_local']} ({s['sun']['sunset_utc']} UTC)" in fronts
        assert "Check in at the top of each hour." in fronts  # Markdown bold rendered as text
        assert "**" not in fronts


def test_handling_marking_top_and_bottom_of_every_page(data, files):
    mark = data["net"]["handling"]
    for name, pdf_bytes in files.items():
        if name.startswith("cards-"):
            continue
        with pdfplumber.open(io.BytesIO(pdf_bytes)) as pdf:
            for i, page in enumerate(pdf.pages):
                top = page.crop((0, 0, page.width, 25)).extract_text()
                bottom = page.crop((0, page.height - 25, page.width, page.height)).extract_text()
                assert mark in top and mark in bottom, (name, i)


def test_every_page_has_revision_and_card_number(data, files):
    deck = card_deck(data)
    rev = data["revision"]["id"]
    with pdfplumber.open(io.BytesIO(files["all-cards.pdf"])) as pdf:
        assert len(pdf.pages) == 2 * deck.total
        for i, page in enumerate(pdf.pages):
            text = page.extract_text()
            assert f"rev {rev}" in text
            assert f"card {i // 2 + 1} / {deck.total}" in text


def test_net_card_shows_links_only_where_they_differ(data, files):
    with pdfplumber.open(io.BytesIO(files["net-control.pdf"])) as pdf:
        lines = [ln for p in pdf.pages for ln in page_lines(p)]
        back = " ".join("\n".join(p.extract_text() for p in pdf.pages).replace("\xa0", " ").split())
    net = {h["utc_hour"]: h for h in data["net_schedule"]["hours"]}
    ridge = {h["utc_hour"]: h["first"] for h in data["links"][0]["hours"]}
    seen = 0
    for ln in lines:
        m = re.match(r"^(\d\d:\d\d) (\d\d) (\S+)(?: (\S+))?$", ln.strip())
        if not m:
            continue
        u = int(m.group(2))
        seen += 1
        assert m.group(3) == net[u]["first"]
        differs = ridge[u] != net[u]["first"]
        assert m.group(4) == (ridge[u] if differs else None), (u, m.groups())
    assert seen == 24
    assert "L1 RIDGE1 Ridge relay team" in back
    assert "Always on the net channel: RIVPST River crossing post" in back
    assert "No assigned channel serves ops--ridge at 03:00 local." in back  # the gap, in the compiler's words


# ------------------------------------------------------------------ QR codes

def decode_qrs(pdf_bytes: bytes) -> list[str]:
    """Every QR code zxing-cpp finds on any page, rendered at 288 dpi."""
    pdf = pdfium.PdfDocument(pdf_bytes)
    found = []
    for page in pdf:
        image = page.render(scale=4).to_pil()
        found += [r.text for r in zxingcpp.read_barcodes(image)]
    return found


def test_qr_opens_the_net_page(data, files):
    url = "https://intranet.example/nets/alpine-test/"
    assert qr.payload(data, data["stations"][0]) == url
    for name in ("ops.pdf", "ridge.pdf", "net-control.pdf"):
        assert decode_qrs(files[name]) == [url], name  # one code per card set


def test_qr_without_base_url_carries_revision_and_figures(card_data_factory):
    d = card_data_factory(base_url=None)
    out = render_cards(d)
    station = d["stations"][1]
    expected = qr.payload(d, station)
    assert f"rev {d['revision']['id']}" in expected and "station ridge self RIDGE1" in expected
    assert "UTC first: 00-04 C1 2216, 05-07 C3 4522, 08-15 C5 6958, 16-18 C3 4522, 19-23 C1 2216" in expected
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
    with pdfplumber.open(io.BytesIO(files["cards-a4.pdf"])) as pdf:
        assert len(pdf.pages) == 2 * math.ceil(deck.total / per)
        for page in pdf.pages:
            assert abs(float(page.width) - sw) < 0.5 and abs(float(page.height) - sh) < 0.5
            drawn = {(round(ln["x0"], 1), round(ln["x1"], 1), round(float(page.height) - ln["top"], 1),
                      round(float(page.height) - ln["bottom"], 1)) for ln in page.lines}
            for x0, y0, x1, y1 in marks:
                key = (round(min(x0, x1), 1), round(max(x0, x1), 1), round(max(y0, y1), 1), round(min(y0, y1), 1))
                assert key in drawn, f"crop mark {key} missing"

        def box_of(page, number):
            """The slot footprint holding the text 'card N / total' on this sheet page."""
            words = page.extract_words()
            for i, wd in enumerate(words[:-2]):
                after_link = i and words[i - 1]["text"] in ("on", "from")  # "continued on card 4 / 7"
                if wd["text"] == "card" and not after_link and words[i + 1]["text"] == str(number) \
                        and words[i + 2]["text"] == "/":
                    x = (wd["x0"] + wd["x1"]) / 2
                    y = float(page.height) - (wd["top"] + wd["bottom"]) / 2
                    return x, y
            raise AssertionError(f"card {number} not found")

        for sheet_i in range(0, len(pdf.pages), 2):
            front_page, back_page = pdf.pages[sheet_i], pdf.pages[sheet_i + 1]
            for k in range(per):
                number = sheet_i // 2 * per + k + 1
                if number > deck.total:
                    break
                fx, fy = box_of(front_page, number)
                bx, by = box_of(back_page, number)
                fb = next(i for i, s in enumerate(fronts) if _inside(s.box(), fx, fy))
                back_boxes = [cardlayout.back_slot(s, sheet).box() for s in fronts]
                bb = next(i for i, b in enumerate(back_boxes) if _inside(b, bx, by))
                assert fb == bb == k
                # after the long-edge flip, the back's footprint is exactly the front's
                x0, y0, x1, y1 = back_boxes[k]
                fx0, fy0, fx1, fy1 = fronts[k].box()
                assert math.isclose(sw - x1, fx0, abs_tol=1e-6) and math.isclose(y0, fy0, abs_tol=1e-6)


def _inside(box, x, y) -> bool:
    return box[0] <= x <= box[2] and box[1] <= y <= box[3]


# ------------------------------------------------------------------ determinism, odd input, overflow

def test_same_data_same_bytes(data, files):
    again = render_cards(data, impose="a4")
    assert again == files


def test_same_bytes_in_a_fresh_process(data, files):
    code = textwrap.dedent("""
        import hashlib, importlib.util, sys
        spec = importlib.util.spec_from_file_location("cardfixture", sys.argv[1])
        mod = importlib.util.module_from_spec(spec)
        spec.loader.exec_module(mod)
        build_data = mod.build_data
        from planpack.publish.cards import render_cards
        out = render_cards(build_data(), impose="a4")
        for k in sorted(out):
            print(k, hashlib.sha256(out[k]).hexdigest())
    """)
    res = subprocess.run([sys.executable, "-c", code, FIXTURE], capture_output=True, text=True, check=True)
    import hashlib

    assert res.stdout.split("\n")[:-1] == [f"{k} {hashlib.sha256(files[k]).hexdigest()}" for k in sorted(files)]


def test_script_tag_and_odd_unicode_print_as_text(card_data_factory):
    d = card_data_factory()
    d["stations"][1]["name"] = "<script>alert(1)</script>"
    d["stations"][2]["name"] = "Žďár & Łódź — Ωμέγα Пост"
    d["net"]["instructions_md"] = "Use <b>raw</b> & <script>x()</script> *never*."
    out = render_cards(d)
    with pdfplumber.open(io.BytesIO(out["ridge.pdf"])) as pdf:
        text = pdf.pages[0].extract_text()
        later = "\n".join(p.extract_text() for p in pdf.pages)
    assert "<script>alert(1)</script>" in text
    assert "Use <b>raw</b> & <script>x()</script> never." in later
    with pdfplumber.open(io.BytesIO(out["river.pdf"])) as pdf:
        assert "Žďár & Łódź — Ωμέγα Пост" in pdf.pages[0].extract_text()


def test_gap_without_message_is_composed(card_data_factory):
    d = card_data_factory()
    del d["gaps"][0]["message"]
    with pdfplumber.open(io.BytesIO(render_cards(d)["net-control.pdf"])) as pdf:
        text = " ".join("\n".join(p.extract_text() for p in pdf.pages).replace("\xa0", " ").split())
    assert "03:00 local: ops--ridge · a channel in 1.8–2.1 MHz would serve" in text


def test_long_channel_list_continues_on_a_second_card(card_data_factory):
    d = card_data_factory()
    extra = [{"id": f"X{i}", "freq_khz": 2000.0 + 137 * i, "mode": "usb", "note": "spare", "hours_local": None,
              "allowed_utc_hours": list(range(24)), "required_snr_db": 10.0, "bandwidth_hz": 2700.0} for i in range(40)]
    d["channels"] += extra
    for a in d["antennas"]:
        a["channels"] += [dict(a["channels"][0], channel=c["id"], freq_khz=c["freq_khz"]) for c in extra]
    jsonschema.validate(d, output_schema())
    out = render_cards(d)
    deck = card_deck(d)
    ridge = deck.of("ridge")
    assert len(ridge) >= 3
    with pdfplumber.open(io.BytesIO(out["ridge.pdf"])) as pdf:
        texts = [p.extract_text() for p in pdf.pages]
        sizes = [c["size"] for p in pdf.pages for c in p.chars]
    assert min(sizes) >= 6.0
    first = ridge[0].number
    assert f"continued on card {first + 1} / {deck.total}" in texts[0]
    assert f"cont'd from card {first} / {deck.total}" in texts[2]
    fronts = "\n".join(texts)
    for c in extra:  # every channel printed: nothing clipped
        assert re.search(rf"^{c['id']} {fmt_khz(c['freq_khz'])} usb", fronts, re.M), c["id"]


def test_text_the_font_cannot_print_is_reported(card_data_factory):
    from planpack.publish.cards import text_warnings

    d = card_data_factory()
    assert text_warnings(d) == []
    d["stations"][0]["name"] = "Ops \U0001F4E1 東"  # satellite-antenna emoji and a CJK letter: not in DejaVu Sans
    warns = text_warnings(d)
    assert len(warns) == 1 and "stations.ops.name" in warns[0] and "U+6771" in warns[0]
    render_cards(d)  # still renders, with the warning to say so
