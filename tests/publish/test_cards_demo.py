"""The field cards of the demo plans, compiled for real (read_plan + compile_plan).

Same read-back checks as test_cards.py, on the figures the compiler produced.
"""

from __future__ import annotations

import glob
import io
import os
import re
import sys

import pdfplumber
import pytest

sys.path.insert(0, os.path.dirname(__file__))
from test_cards import assert_fonts_embedded, decode_qrs, expected_cells, table_rows  # noqa: E402

from planpack.publish import qr  # noqa: E402
from planpack.publish.cards import card_deck, render_cards  # noqa: E402
from planpack.publish.cardstory import fmt_m  # noqa: E402

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
    for name, pdf_bytes in files.items():
        assert_fonts_embedded(pdf_bytes)
        if name.startswith("cards-"):
            continue
        with pdfplumber.open(io.BytesIO(pdf_bytes)) as pdf:
            for page in pdf.pages:
                assert abs(float(page.width) - deck.width) <= 0.5 and abs(float(page.height) - deck.height) <= 0.5
                assert min(c["size"] for c in page.chars) >= 6.0
                if mark:
                    assert mark in page.crop((0, 0, page.width, 25)).extract_text()
                    assert mark in page.crop((0, page.height - 25, page.width, page.height)).extract_text()


def test_demo_hourly_tables_equal_the_compiled_schedule(compiled):
    data, files = compiled
    for s in data["stations"]:
        rows = table_rows(files[f"{s['id']}.pdf"])
        assert sorted(rows) == list(range(24)), s["id"]
        for h in data["net_schedule"]["hours"]:
            got = tuple(x for x in rows[h["utc_hour"]] if x is not None)
            assert got == tuple(x for x in expected_cells(data, h) if x is not None), (s["id"], h["utc_hour"])


def test_demo_cut_sheets_equal_the_antenna_output(compiled):
    data, files = compiled
    by_id = {a["id"]: a for a in data["antennas"]}
    for s in data["stations"]:
        with pdfplumber.open(io.BytesIO(files[f"{s['id']}.pdf"])) as pdf:
            text = "\n".join(p.extract_text() for p in pdf.pages)
        for aid in s["antennas"]:
            cut = by_id[aid]["cut"] or {}
            for key, v in cut.items():
                if key.endswith("_m") and isinstance(v, (int, float)) and not isinstance(v, bool) \
                        and key != "rule_of_thumb_leg_m":
                    ft = cut.get(key[:-2] + "_ft_in")
                    pattern = re.escape(fmt_m(v)) + " m" + (" " + re.escape(ft) if ft else "")
                    assert re.search(pattern, text), (s["id"], aid, key, v, ft)
            for ch in by_id[aid]["channels"]:
                assert re.search(rf"^{ch['channel']} \S+ .*\b{ch['swr_class']}\b", text, re.M), (aid, ch["channel"])


def test_demo_qr_codes(compiled):
    data, files = compiled
    for s in data["stations"][:2]:
        assert decode_qrs(files[f"{s['id']}.pdf"]) == [qr.payload(data, s)]


def test_demo_cards_are_deterministic(compiled):
    data, files = compiled
    assert render_cards(data, impose="letter") == files
