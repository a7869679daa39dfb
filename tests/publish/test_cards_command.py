"""``planpack cards``: compile a demo plan and write its cards through the atomic writer."""

from __future__ import annotations

import os

import pytest

from planpack import cli

REPO = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
PLAN = os.path.join(REPO, "plans", "danube-relief.yaml")


def run(argv: list[str]) -> int:
    return cli.main(argv)


@pytest.fixture(scope="module")
def written(tmp_path_factory):
    out = tmp_path_factory.mktemp("cards") / "out"
    code = run(["cards", PLAN, "--out", str(out), "--impose", "a4", "-q"])
    return code, out


def test_writes_every_card_file(written):
    code, out = written
    assert code == 0
    names = sorted(os.listdir(out))
    for sid in ("linz-ops", "passau", "krems", "budweis", "salzburg", "vienna", "graz", "innsbruck"):
        assert f"{sid}.pdf" in names
    assert {"net-control.pdf", "all-cards.pdf", "cards-a4.pdf"} <= set(names)
    assert all(open(out / n, "rb").read(5) == b"%PDF-" for n in names if n.endswith(".pdf"))


def test_refuses_a_foreign_folder_and_leaves_it_whole(tmp_path, capsys):
    out = tmp_path / "mine"
    out.mkdir()
    (out / "notes.txt").write_text("keep me")
    code = run(["cards", PLAN, "--out", str(out), "-q"])
    assert code == cli.EXIT_USAGE
    assert sorted(os.listdir(out)) == ["notes.txt"]


def test_plan_errors_write_nothing(tmp_path):
    bad = tmp_path / "bad.yaml"
    bad.write_text("planpack: 1\nnet: {id: x}\n")
    out = tmp_path / "out"
    code = run(["cards", str(bad), "--out", str(out), "-q"])
    assert code == cli.EXIT_PLAN_ERRORS
    assert not out.exists()
