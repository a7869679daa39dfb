"""The field cards of the demo plans, compiled for real (read_plan + compile_plan).

Same read-back checks as test_cards.py, on the figures the compiler produced:
every card renders, a member's file is at most two cards, nothing under 7 pt,
the front's timetable is the station's brief hour by hour, A6 type is larger
than 3.5 x 5 in type, and the bytes are the same every time.
"""

from __future__ import annotations

import glob
import os
import re
import sys

import pytest

sys.path.insert(0, os.path.dirname(__file__))
from cardread import assert_fonts_embedded, char_sizes, open_pdf, page_count, page_texts, timetable  # noqa: E402
from test_cards import _check_timetable, decode_qrs  # noqa: E402

from planpack.publish import qr  # noqa: E402
from planpack.publish.cards import card_deck, render_cards  # noqa: E402
from planpack.publish.cardstyle import MIN_PT, fmt_m  # noqa: E402
from planpack.publish.cardstory import ESSENTIAL_CUT, KIND_WORDS  # noqa: E402

REPO = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
PLANS = sorted(glob.glob(os.path.join(REPO, "plans", "*.yaml")))


@pytest.fixture(scope="module", params=PLANS, ids=[os.path.basename(p) for p in PLANS])
def compiled(request):
    from planpack.compile import compile_plan
    from planpack.plan import read_plan

    r = read_plan(request.param)
    assert r.ok, [d.format() for d in r.diagnostics]
    data = compile_plan(r.plan).data
    return data, render_cards(data, impose="letter")


def test_demo_plans_exist():
    assert len(PLANS) >= 2


def test_demo_cards_read_back(compiled):
    data, files = compiled
    deck = card_deck(data)
    mark = data["net"]["handling"]
    members = [s["id"] for s in data["stations"] if s["role"] == "member"]
    for name, pdf_bytes in files.items():
        assert_fonts_embedded(pdf_bytes)
        if name.startswith("cards-"):
            continue
        assert min(char_sizes(pdf_bytes)) >= MIN_PT - 1e-6, name
        with open_pdf(pdf_bytes) as pdf:
            for page in pdf.pages:
                assert abs(float(page.width) - deck.width) <= 0.5 and abs(float(page.height) - deck.height) <= 0.5
        texts = page_texts(pdf_bytes)
        for t in texts:
            assert data["revision"]["label"] in t
            if mark:
                assert t.count(mark) >= 2  # top and bottom
    for sid in members:
        assert page_count(files[f"{sid}.pdf"]) <= 4, sid


def test_demo_fronts_equal_the_station_brief(compiled):
    data, files = compiled
    for s in data["stations"]:
        _check_timetable(data, s["id"], files[f"{s['id']}.pdf"])
        front = page_texts(files[f"{s['id']}.pdf"])[0]
        assert data["net"]["utc_offset_label"] in front


def test_demo_backs_carry_the_antenna_ground_and_orientation(compiled):
    data, files = compiled
    ants = {a["id"]: a for a in data["antennas"]}
    for s in data["stations"]:
        back = page_texts(files[f"{s['id']}.pdf"])[1]
        rig = {e["antenna"] for e in s["brief"]["antenna_by_channel"]}
        for aid in s["antennas"]:
            a = ants[aid]
            if len(s["antennas"]) > 1 and aid not in rig:
                assert f"{aid} ({KIND_WORDS[a['kind']]}): not the better antenna on any channel" in back
                continue
            for key in ESSENTIAL_CUT[a["kind"]]:
                v = (a["cut"] or {}).get(key)
                if isinstance(v, (int, float)) and not isinstance(v, bool):
                    assert f"{fmt_m(v)} m" in back, (s["id"], aid, key)
                    ft = a["cut"].get(key[:-2] + "_ft_in")
                    if ft:
                        assert f"{fmt_m(v)} m {ft}" in back, (s["id"], aid, key)
        g = s["brief"]["ground"]
        assert g["text"] in back
        to = s["brief"]["to_control"]
        if to:
            assert f"bearing {to['bearing_deg']:.0f}° ({to['compass']}), {to['distance_km']:.0f} km" in back
        for run in s["brief"]["wire_runs"]:
            if run["antenna"] in rig or len(s["antennas"]) == 1:
                assert run["text"] in back, (s["id"], run["antenna"])


def test_demo_swr_never_formatted_by_the_cards(compiled):
    data, files = compiled
    for name, pdf in files.items():
        text = " ".join(page_texts(pdf))
        assert "999" not in text and not re.search(r"\b\d{3,}\.\d:1", text), name


def test_demo_a6_type_is_larger(compiled):
    data, _ = compiled
    small, large = render_cards(data, size="3.5x5in"), render_cards(data, size="a6")
    sid = data["stations"][1]["id"]
    with open_pdf(small[f"{sid}.pdf"]) as a, open_pdf(large[f"{sid}.pdf"]) as b:
        assert timetable(b.pages[0]).rows[0].pct_size > timetable(a.pages[0]).rows[0].pct_size
    assert min(char_sizes(large[f"{sid}.pdf"])) >= MIN_PT - 1e-6


def test_demo_qr_codes(compiled):
    data, files = compiled
    for s in data["stations"][:2]:
        assert decode_qrs(files[f"{s['id']}.pdf"]) == [qr.payload(data, s)]


def test_demo_cards_are_deterministic(compiled):
    data, files = compiled
    assert render_cards(data, impose="letter") == files
