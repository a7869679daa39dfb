"""planpack new: a commented starter plan that checks clean."""

from __future__ import annotations

import re

import pytest
from tests.workflow.conftest import run_cli

from planpack.plan import read_plan
from planpack.plan.schema import PLAN
from planpack.workflow.starter import starter_plan


def test_starter_checks_clean_and_compiles_without_errors(tmp_path, shared_cache):
    from planpack.workflow.cache import cached_compile

    code, out, err = run_cli(["new", "cairngorm-spring", "--out", "net.yaml"], tmp_path)
    assert code == 0, err
    from planpack import cli

    assert cli.main(["check", "-q", str(tmp_path / "net.yaml")]) == cli.EXIT_OK  # the real check: warnings allowed
    r = read_plan(str(tmp_path / "net.yaml"))
    assert r.ok and [d for d in r.diagnostics if d.severity == "error"] == []
    compiled = cached_compile(r.plan)
    assert [d for d in compiled.diagnostics if d.severity == "error"] == []
    assert compiled.data["net"]["id"] == "cairngorm-spring"
    assert compiled.data["links"] and any(h["first"] for h in compiled.data["net_schedule"]["hours"])


def test_starter_to_stdout_is_deterministic(tmp_path):
    code, out, err = run_cli(["new", "north-ridge"], tmp_path)
    assert code == 0, err
    assert out == starter_plan("north-ridge")
    assert "id: north-ridge" in out and list(tmp_path.iterdir()) == []


def test_every_key_is_explained():
    text = starter_plan("north-ridge")
    lines = text.splitlines()
    keys = set(PLAN.fields) | {"id", "title", "handling", "timezone", "valid", "solar", "net_address", "links",
                               "card_size", "target_good_days", "instructions", "name", "address", "role", "at",
                               "power_w", "noise", "noise_margin_db", "antenna", "ground", "scan_rate", "kind",
                               "design_khz", "height_m", "apex_deg", "wire_mm", "matching", "feedline"}
    for key in sorted(keys):
        if key in ("planpack",):
            continue
        # the first line that sets this key has a comment line above it, or the key is named in a comment
        at = next((i for i, ln in enumerate(lines) if re.match(rf"\s*(- \{{)?{key}:", ln)), None)
        named_in_comment = any(ln.lstrip().startswith("#") and key in ln for ln in lines)
        assert at is not None or named_in_comment, key
        if at is not None and not named_in_comment:
            assert lines[at - 1].lstrip().startswith("#"), f"{key} has no comment above it"
    assert "invented" in text.lower()  # the scenario says so
    assert "power lines" in text  # the antenna section carries the usual caution


def test_refuses_to_overwrite(tmp_path):
    (tmp_path / "net.yaml").write_text("mine\n")
    code, out, err = run_cli(["new", "north-ridge", "--out", "net.yaml"], tmp_path)
    assert code == 2 and "already exists" in err
    assert (tmp_path / "net.yaml").read_text() == "mine\n"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["net.yaml"]  # no temporary file left


@pytest.mark.parametrize("bad", ["North-Ridge", "north_ridge", "x-", "a--b", "nét", "x" * 41, ""])
def test_net_id_must_be_a_slug(tmp_path, bad):
    code, out, err = run_cli(["new", bad], tmp_path)
    assert code == 2 and "slug" in err and out == ""


def test_out_needs_a_yaml_name_and_an_existing_folder(tmp_path):
    code, _, err = run_cli(["new", "north-ridge", "--out", "net.txt"], tmp_path)
    assert code == 2 and ".yaml" in err
    code, _, err = run_cli(["new", "north-ridge", "--out", "nowhere/net.yaml"], tmp_path)
    assert code == 2 and "does not exist" in err
