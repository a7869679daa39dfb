"""`planpack build` end to end: exit codes, diagnostics, nothing written on errors, cards linked."""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest

from planpack import cli
from planpack.plan.diagnostics import Diagnostic
from planpack.publish.output import MARKER

REPO = Path(__file__).resolve().parents[2]
sys_plan = REPO / "tests" / "plan" / "conftest.py"


def small_plan(tmp_path: Path, name: str = "net.yaml", net_id: str = "test-net") -> Path:
    from importlib import util

    spec = util.spec_from_file_location("plan_conftest", sys_plan)
    mod = util.module_from_spec(spec)
    spec.loader.exec_module(mod)
    path = tmp_path / name
    path.write_text(mod.BASE.replace("id: test-net", f"id: {net_id}"))
    return path


def test_build_writes_the_site(tmp_path, fake_compile, no_cards, capsys):
    plan = small_plan(tmp_path)
    out = tmp_path / "site"
    assert cli.main(["build", str(plan), "--out", str(out)]) == 0
    assert (out / MARKER).is_file() and (out / "test-net" / "schedule.html").is_file()
    err = capsys.readouterr().err
    assert "built 1 net" in err and "0 card files" in err


def test_build_twice_gives_identical_bytes(tmp_path, fake_compile, no_cards):
    plan = small_plan(tmp_path)
    a, b = tmp_path / "a", tmp_path / "b"
    assert cli.main(["build", str(plan), "--out", str(a), "-q"]) == 0
    assert cli.main(["build", str(plan), "--out", str(b), "-q"]) == 0
    fa = {p.relative_to(a): p.read_bytes() for p in a.rglob("*") if p.is_file()}
    fb = {p.relative_to(b): p.read_bytes() for p in b.rglob("*") if p.is_file()}
    assert fa == fb and len(fa) > 10


def test_plan_errors_stop_the_build_like_check(tmp_path, fake_compile, capsys):
    plan = small_plan(tmp_path)
    plan.write_text(plan.read_text().replace("power_w: 100", "power_w: lots"))
    out = tmp_path / "site"
    assert cli.main(["build", str(plan), "--out", str(out)]) == 1
    err = capsys.readouterr().err
    assert f"{plan}:" in err and "power_w" in err and "nothing was built" in err
    assert not out.exists()
    assert cli.main(["build", str(tmp_path / "missing.yaml"), "--out", str(out)]) == 2


def test_strict_warnings_build_nothing(tmp_path, fake_compile, no_cards, capsys):
    fake_compile.append(Diagnostic(str(tmp_path / "net.yaml"), 3, 1, "warning", "channel-gap", "channels", "a gap"))
    plan = small_plan(tmp_path)
    out = tmp_path / "site"
    assert cli.main(["build", str(plan), "--out", str(out), "--strict"]) == 1
    assert not out.exists()
    assert "channel-gap" in capsys.readouterr().err
    assert cli.main(["build", str(plan), "--out", str(out), "-q"]) == 0  # warnings alone do not fail
    assert "a gap" in (out / "test-net" / "index.html").read_text()


def test_refuses_a_folder_it_did_not_make(tmp_path, fake_compile, no_cards, capsys):
    plan = small_plan(tmp_path)
    out = tmp_path / "docs"
    out.mkdir()
    (out / "keep.txt").write_text("mine")
    assert cli.main(["build", str(plan), "--out", str(out), "-q"]) == 2
    assert "--force" in capsys.readouterr().err and (out / "keep.txt").exists()
    assert cli.main(["build", str(plan), "--out", str(out), "-q", "--force"]) == 0
    assert not (out / "keep.txt").exists()


def test_never_writes_over_the_plans_folder(tmp_path, fake_compile, no_cards, capsys):
    plan = small_plan(tmp_path)
    assert cli.main(["build", str(plan), "--out", str(tmp_path), "--force"]) == 2
    assert plan.exists() and "holds the plan" in capsys.readouterr().err


def test_duplicate_net_ids_are_a_usage_error(tmp_path, fake_compile, no_cards, capsys):
    small_plan(tmp_path, "a.yaml")
    small_plan(tmp_path, "b.yaml")
    assert cli.main(["build", str(tmp_path), "--out", str(tmp_path.parent / (tmp_path.name + "-site"))]) == 2
    assert "both define net 'test-net'" in capsys.readouterr().err


def test_cards_written_and_linked(tmp_path, fake_compile, fake_cards):
    plan = small_plan(tmp_path)
    out = tmp_path / "site"
    assert cli.main(["build", str(plan), "--out", str(out), "-q"]) == 0
    assert (out / "test-net" / "cards" / "net-card.pdf").read_bytes().startswith(b"%PDF")
    page = (out / "test-net" / "index.html").read_text()
    assert 'href="cards/net-card.pdf"' in page and 'href="cards/test-net-cards.pdf"' in page
    shutil.rmtree(out)
    assert cli.main(["build", str(plan), "--out", str(out), "-q", "--no-cards"]) == 0
    assert not (out / "test-net" / "cards").exists()


def test_build_help_lists_the_options(capsys):
    assert cli.main(["build", "--help"]) == 0
    text = capsys.readouterr().out
    for opt in ("--out", "--force", "--strict", "--no-cards", "-q"):
        assert opt in text


def test_demo_plans_build(tmp_path):
    pytest.importorskip("planpack.compile")
    out = tmp_path / "site"
    assert cli.main(["build", str(REPO / "plans"), "--out", str(out), "-q"]) == 0
    assert (out / "danube-relief" / "index.html").is_file() and (out / "southern-alps-sar" / "plan.json").is_file()
