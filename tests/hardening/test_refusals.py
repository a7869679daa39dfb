"""`planpack build` refuses to replace what it did not make: a home folder, the plan's own folder, a
repository root, any non-empty folder without planpack's marker (unless --force), and even with
--force it never deletes the plans it reads. Each case runs the whole command (compile cached)."""

from __future__ import annotations

import os

import pytest

from planpack import cli
from planpack.publish.output import MARKER
from tests.hardening.conftest import small_plan, snapshot


@pytest.fixture
def world(tmp_path, cached_compile, monkeypatch):
    """A home folder with a plan repository in it: home/repo/{.git, README, plans/net.yaml}."""
    home = tmp_path / "home"
    repo = home / "repo"
    (repo / ".git").mkdir(parents=True)
    (repo / ".git" / "HEAD").write_text("ref: refs/heads/main\n")
    (repo / "README.md").write_text("our plans\n")
    plan = repo / "plans" / "net.yaml"
    plan.parent.mkdir()
    plan.write_text(small_plan(), encoding="utf-8")
    (home / "letters.txt").write_text("personal\n")
    elsewhere = tmp_path / "elsewhere"
    elsewhere.mkdir()
    monkeypatch.setenv("HOME", str(home))
    monkeypatch.chdir(elsewhere)
    return {"tmp": tmp_path, "home": home, "repo": repo, "plan": plan, "elsewhere": elsewhere}


def build(plan, out, *extra) -> int:
    return cli.main(["build", str(plan), "--out", str(out), "-q", "--no-cards", *extra])


def refused(capsys, out, *words) -> None:
    err = capsys.readouterr().err
    assert f"--out {out}" in err, err  # the message names the folder
    for w in words:
        assert w in err, err
    assert "Traceback" not in err


@pytest.mark.parametrize("force", [False, True])
@pytest.mark.parametrize("target, words", [
    ("home", ["home folder", "even with --force"]),
    ("repo", ["holds the plan", "even with --force"]),
    ("plans", ["holds the plan", "even with --force"]),
    ("tmp", ["even with --force"]),  # holds the plans and the current folder: either reason
])
def test_never_replaces_a_folder_that_holds_what_it_reads(world, capsys, target, words, force):
    out = world[target] if target != "plans" else world["plan"].parent
    before = snapshot(world["tmp"])
    assert build(world["plan"], out, *(["--force"] if force else [])) == 2
    refused(capsys, out, *words)
    assert snapshot(world["tmp"]) == before


def test_a_repository_root_is_refused_even_when_the_plans_are_elsewhere(world, capsys, tmp_path):
    other = tmp_path / "other-plan.yaml"
    other.write_text(small_plan(), encoding="utf-8")
    before = snapshot(world["tmp"])
    assert build(other, world["repo"], "--force") == 2
    refused(capsys, world["repo"], "git work tree")
    assert snapshot(world["tmp"]) == before


def test_the_current_folder_and_its_parents_are_refused(world, capsys):
    before = snapshot(world["tmp"])
    for out in (".", "..", world["elsewhere"]):
        assert build(world["plan"], out, "--force") == 2
        assert "holds the current folder" in capsys.readouterr().err
    assert snapshot(world["tmp"]) == before


def test_a_plan_reached_through_a_symlink_is_still_protected(world, capsys):
    link = world["elsewhere"] / "linked.yaml"
    link.symlink_to(world["plan"])
    before = snapshot(world["repo"])
    assert build(link, world["plan"].parent, "--force") == 2
    refused(capsys, world["plan"].parent, "holds the plan")
    assert snapshot(world["repo"]) == before


def test_a_non_empty_folder_without_the_marker_needs_force(world, capsys):
    mine = world["tmp"] / "mine"
    mine.mkdir()
    (mine / "notes.txt").write_text("keep me")
    before = snapshot(mine)
    assert build(world["plan"], mine) == 2
    refused(capsys, mine, "not empty and was not made by planpack", "--force")
    assert snapshot(mine) == before
    plan_before = world["plan"].read_bytes()
    assert build(world["plan"], mine, "--force") == 0  # told to: the folder becomes the site
    assert (mine / MARKER).is_file() and not (mine / "notes.txt").exists()
    assert world["plan"].read_bytes() == plan_before


def test_with_the_marker_no_force_is_needed_but_plans_inside_are_still_safe(world, capsys):
    site = world["tmp"] / "site"
    assert build(world["plan"], site) == 0
    assert build(world["plan"], site) == 0  # planpack's own folder: replaced without asking
    stray = site / "someone-put-a-plan-here.yaml"
    stray.write_text(small_plan(net_id="stray-net"), encoding="utf-8")
    assert build(stray, site, "--force") == 2
    refused(capsys, site, "holds the plan")
    assert stray.is_file()


def test_out_that_is_a_file_is_refused(world, capsys):
    f = world["tmp"] / "site.txt"
    f.write_text("a file")
    assert build(world["plan"], f, "--force") == 2
    refused(capsys, f, "not a folder")
    assert f.read_text() == "a file"


def test_the_root_of_the_file_system(world, capsys):
    assert build(world["plan"], "/", "--force") == 2
    assert "root of the file system" in capsys.readouterr().err
    assert os.path.isdir("/etc")
