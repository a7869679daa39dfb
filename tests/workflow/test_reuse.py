"""A rebuild reuses what the previous publish rendered, and never trusts a file that does not match.

The cards of each net and the site are rendered again only when their data,
the renderer or the options change; the previous files are read back from the
site folder (no link followed) and checked against hashes kept in the cache.
"""

from __future__ import annotations

import os
import sys

import pytest
from tests.workflow.conftest import write
from tests.workflow.plans import TINY, variant

from planpack import cli

OTHER = variant(("id: tiny-net", "id: other-net"), ("title: Invented hill group test net", "title: Other test net"))


def _plan_folder(tmp_path, name: str, files: dict[str, str]):
    folder = tmp_path / name
    folder.mkdir()
    for file, text in files.items():
        write(folder, file, text)
    return folder


@pytest.fixture
def plans(tmp_path, shared_cache):
    return _plan_folder(tmp_path, "plans", {"a.yaml": TINY, "b.yaml": OTHER})


@pytest.fixture
def counted(monkeypatch):
    """Count the renderers' calls (per net for the cards) while they do their real work."""
    from planpack.publish import cards, site

    calls = {"cards": [], "site": 0}
    real_cards, real_site = cards.render_cards, site.render_site

    def render_cards(data, *a, **k):
        calls["cards"].append(data["net"]["id"])
        return real_cards(data, *a, **k)

    def render_site(*a, **k):
        calls["site"] += 1
        return real_site(*a, **k)

    monkeypatch.setattr(cards, "render_cards", render_cards)
    monkeypatch.setattr(site, "render_site", render_site)
    monkeypatch.setitem(sys.modules, "planpack.publish.cards", cards)
    return calls


def tree(folder):
    out = {}
    for p in sorted(folder.rglob("*")):
        if p.is_file():
            out[str(p.relative_to(folder))] = p.read_bytes()
    return out


def build(plans, out, *extra) -> int:
    return cli.main(["build", str(plans), "--out", str(out), "-q", *extra])


def test_nothing_changed_renders_nothing_and_writes_nothing(plans, tmp_path, counted):
    out = tmp_path / "site"
    assert build(plans, out) == 0
    assert sorted(counted["cards"]) == ["other-net", "tiny-net"] and counted["site"] == 1
    first = tree(out)
    inode = out.stat().st_ino
    assert build(plans, out) == 0
    assert sorted(counted["cards"]) == ["other-net", "tiny-net"] and counted["site"] == 1  # nothing rendered
    assert tree(out) == first
    assert out.stat().st_ino == inode  # the folder was not even swapped


def test_a_changed_plan_renders_its_cards_and_the_site_only(plans, tmp_path, counted):
    out = tmp_path / "site"
    assert build(plans, out) == 0
    write(plans, "b.yaml", OTHER.replace("title: Other test net", "title: Renamed test net"))
    counted["cards"].clear()
    assert build(plans, out) == 0
    assert counted["cards"] == ["other-net"] and counted["site"] == 2
    assert b"Renamed test net" in (out / "other-net" / "index.html").read_bytes()
    fresh = tmp_path / "fresh"
    assert build(plans, fresh, "--no-cache") == 0
    assert tree(fresh) == tree(out)  # reuse gives the same bytes as rendering everything afresh


@pytest.mark.parametrize("tamper", ["edit", "remove", "link", "extra"])
def test_a_file_changed_on_the_share_is_rendered_again_not_carried_on(plans, tmp_path, counted, tamper):
    out = tmp_path / "site"
    assert build(plans, out) == 0
    good = tree(out)
    card = out / "tiny-net" / "cards" / "all-cards.pdf"
    page = out / "other-net" / "index.html"
    outside = tmp_path / "outside.pdf"
    outside.write_bytes(card.read_bytes())
    if tamper == "edit":
        card.write_bytes(card.read_bytes().replace(b"%PDF", b"%PDX", 1))
        page.write_bytes(page.read_bytes() + b"<!-- planted -->")
    elif tamper == "remove":
        card.unlink()
    elif tamper == "link":  # the same bytes, but through a link: never read
        card.unlink()
        card.symlink_to(outside)
    else:
        (out / "tiny-net" / "cards" / "extra.pdf").write_bytes(b"%PDF-planted")
    counted["cards"].clear()
    assert build(plans, out) == 0
    if tamper != "extra":
        assert "tiny-net" in counted["cards"]  # that net's cards were rendered again
    assert tree(out) == good and not card.is_symlink()
    assert outside.read_bytes() == good["tiny-net/cards/all-cards.pdf"]


def test_a_damaged_or_missing_record_renders_everything(plans, tmp_path, counted):
    from planpack.workflow import cachedir, reuse

    out = tmp_path / "site"
    assert build(plans, out) == 0
    record = cachedir.cache_root() / reuse.KIND / reuse.Reuse(out).name
    assert record.is_file()
    for damage in (b"", b"{", b'{"format": 1, "units": {"site": {"key": 1}}}', b"[]"):
        record.write_bytes(damage)
        counted["cards"].clear()
        assert build(plans, out) == 0
        assert sorted(counted["cards"]) == ["other-net", "tiny-net"]
    assert record.is_file()


def test_a_planted_record_cannot_bring_in_other_bytes(plans, tmp_path, counted):
    """A record that claims the planted file's hash: the key still has to match the data and renderer."""
    import hashlib
    import json

    from planpack.workflow import cachedir, reuse

    out = tmp_path / "site"
    assert build(plans, out) == 0
    good = tree(out)
    record = cachedir.cache_root() / reuse.KIND / reuse.Reuse(out).name
    doc = json.loads(record.read_bytes())
    page = out / "tiny-net" / "index.html"
    planted = page.read_bytes() + b"<!-- planted -->"
    page.write_bytes(planted)
    doc["units"]["site"]["files"]["tiny-net/index.html"] = hashlib.sha256(planted).hexdigest()
    doc["units"]["site"]["key"] = "0" * 64
    record.write_text(json.dumps(doc))
    assert build(plans, out) == 0
    assert tree(out) == good


def test_renderer_inputs_outside_the_data_are_in_the_key(plans, tmp_path, counted, monkeypatch):
    out = tmp_path / "site"
    assert build(plans, out) == 0
    monkeypatch.setenv("SOURCE_DATE_EPOCH", "1800000000")
    counted["cards"].clear()
    assert build(plans, out) == 0
    assert sorted(counted["cards"]) == ["other-net", "tiny-net"] and counted["site"] == 2
    assert build(plans, out, "--no-cards") == 0  # other options: the site again, no cards
    assert counted["site"] == 3 and not (out / "tiny-net" / "cards").exists()


def test_no_cache_renders_everything_and_keeps_no_record(plans, tmp_path, counted):
    from planpack.workflow import cachedir, reuse

    out = tmp_path / "site"
    assert build(plans, out, "--no-cache") == 0
    assert build(plans, out, "--no-cache") == 0
    assert len(counted["cards"]) == 4 and counted["site"] == 2
    assert not (cachedir.cache_root() / reuse.KIND / reuse.Reuse(out).name).exists()


def test_cards_command_reuses_by_size(plans, tmp_path, counted):
    out = tmp_path / "cards"
    plan = str(plans / "a.yaml")
    assert cli.main(["cards", plan, "--out", str(out), "-q"]) == 0
    assert cli.main(["cards", plan, "--out", str(out), "-q"]) == 0
    assert counted["cards"] == ["tiny-net"]
    assert cli.main(["cards", plan, "--out", str(out), "-q", "--size", "a6"]) == 0
    assert counted["cards"] == ["tiny-net", "tiny-net"]
    assert os.path.isfile(out / "all-cards.pdf")


# TINY with only channels too high for its 30 km link: gaps, so plan.json carries a frequency request
GAPPY = variant(("  - {id: T1, khz: 3260, mode: usb}\n  - {id: T2, khz: 4545, mode: usb}\n"
                 "  - {id: T3, khz: 5410, mode: usb}\n",
                 "  - {id: T1, khz: 6950, mode: usb}\n  - {id: T2, khz: 7850, mode: usb}\n"
                 "  - {id: T3, khz: 9050, mode: usb}\n"),
                ("id: tiny-net", "id: gappy-net"), ("  target_good_days: 0.7\n",
                                                     "  target_good_days: 0.7\n  handling: EXERCISE ONLY\n"))


@pytest.fixture
def gappy_plans(tmp_path, shared_cache):
    return _plan_folder(tmp_path, "gappy-plans", {"a.yaml": TINY, "g.yaml": GAPPY})


@pytest.fixture
def sheets(monkeypatch):
    """Count the request sheets rendered (per net) while they are rendered for real."""
    from planpack.publish import requestsheet

    calls = []
    real = requestsheet.render_request_sheet

    def render(d, *a, **k):
        calls.append(d["net"]["id"])
        return real(d, *a, **k)

    monkeypatch.setattr(requestsheet, "render_request_sheet", render)
    return calls


def test_the_request_sheet_is_one_more_unit_reused_when_nothing_changed(gappy_plans, tmp_path, counted, sheets):
    import io

    import pdfplumber

    out = tmp_path / "site"
    assert build(gappy_plans, out) == 0
    assert sheets == ["gappy-net"] and sorted(counted["cards"]) == ["gappy-net", "tiny-net"] and counted["site"] == 1
    first = tree(out)
    assert {"gappy-net/request.pdf", "gappy-net/requests.html"} <= set(first)
    assert "tiny-net/request.pdf" not in first and "tiny-net/requests.html" not in first
    with pdfplumber.open(io.BytesIO(first["gappy-net/request.pdf"])) as pdf:
        assert len(pdf.pages) == 1
        text = pdf.pages[0].extract_text()
    assert text.count("EXERCISE ONLY") == 2 and "Frequency request" in text
    inode = out.stat().st_ino
    # nothing changed: nothing rendered, nothing written
    assert build(gappy_plans, out) == 0
    assert sheets == ["gappy-net"] and len(counted["cards"]) == 2 and counted["site"] == 1
    assert tree(out) == first and out.stat().st_ino == inode
    # a tampered sheet is rendered again, not carried on
    (out / "gappy-net" / "request.pdf").write_bytes(b"%PDF-planted")
    assert build(gappy_plans, out) == 0
    assert sheets == ["gappy-net", "gappy-net"] and len(counted["cards"]) == 2
    assert tree(out) == first
    # the other net changed: its cards and the site again, the sheet kept
    write(gappy_plans, "a.yaml", TINY.replace("title: Invented hill group test net", "title: Renamed test net"))
    assert build(gappy_plans, out) == 0
    assert sheets == ["gappy-net", "gappy-net"] and counted["cards"][2:] == ["tiny-net"] and counted["site"] == 2
    # reuse gives the bytes a fresh build gives
    fresh = tmp_path / "fresh"
    assert build(gappy_plans, fresh, "--no-cache") == 0
    assert tree(fresh) == tree(out)
