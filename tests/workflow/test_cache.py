"""The compile cache: a hit equals a fresh compile, a change misses, a bad entry is never trusted."""

from __future__ import annotations

import json
import os

import pytest
from tests.workflow.conftest import write
from tests.workflow.plans import TINY as CLEAN, variant

import planpack.compile
from planpack.plan import read_plan
from planpack.workflow import cache


# The tiny plan with its wire on the set's own tuner: the wire loses much of the power on T1 and T3, so
# the compiled plan carries warnings, and the cache must keep them and their positions.
TINY = variant(("    matching: feedpoint-coupler\n", ""))
assert TINY != CLEAN


@pytest.fixture(scope="module")
def fresh(tmp_path_factory):
    """One real compile of the tiny plan, and its cache folder holding the entry."""
    folder = tmp_path_factory.mktemp("cache")
    plan = read_plan(str(write(folder, "net.yaml", TINY))).plan
    compiled = cache.cached_compile(plan, cache_dir=folder / "entries")
    return folder, plan, compiled


@pytest.fixture
def counted(monkeypatch, fresh):
    """compile_plan replaced by one that counts its calls and answers the real compile of TINY."""
    calls = []

    def compile_plan(plan):
        calls.append(plan.source)
        return fresh[2]

    monkeypatch.setattr(planpack.compile, "compile_plan", compile_plan)
    return calls


def test_hit_equals_fresh_compile_and_skips_compiling(fresh, counted):
    folder, plan, compiled = fresh
    again = cache.cached_compile(plan, cache_dir=folder / "entries")
    assert counted == []
    assert again.data == json.loads(json.dumps(compiled.data))
    assert again.diagnostics == compiled.diagnostics
    assert [d.message for d in again.diagnostics] == [d.message for d in compiled.diagnostics]
    assert again.data["revision"] == compiled.data["revision"]


def test_entry_is_written_beside_the_plan_by_default(tmp_path, fresh, counted, monkeypatch):
    monkeypatch.delenv(cache.CACHE_ENV, raising=False)
    plan = read_plan(str(write(tmp_path, "net.yaml", TINY))).plan
    cache.cached_compile(plan)
    entries = list((tmp_path / ".planpack-cache").glob("*.json"))
    assert len(entries) == 1 and counted == [plan.source]
    assert "*" in (tmp_path / ".planpack-cache" / ".gitignore").read_text().splitlines()
    monkeypatch.setenv(cache.CACHE_ENV, str(tmp_path / "elsewhere"))
    assert cache.cache_folder(plan) == tmp_path / "elsewhere"


def test_any_change_to_the_file_misses(tmp_path, fresh, counted):
    folder = tmp_path / "entries"
    for i, text in enumerate([TINY, TINY + "# a comment\n", variant(("power_w: 50", "power_w: 60"))]):
        plan = read_plan(str(write(tmp_path, f"p{i}.yaml", text))).plan
        cache.cached_compile(plan, cache_dir=folder)
        cache.cached_compile(plan, cache_dir=folder)
    assert len(counted) == 3  # each content compiled once, answered once from the cache


def test_copy_elsewhere_hits_and_is_renamed(tmp_path, fresh, counted):
    folder, _, compiled = fresh
    (tmp_path / "sub").mkdir()
    plan = read_plan(str(write(tmp_path / "sub", "copy.yaml", TINY))).plan
    hit = cache.cached_compile(plan, cache_dir=folder / "entries")
    assert counted == []
    assert {d.file for d in hit.diagnostics} == {plan.source}
    assert {d["file"] for d in hit.data["diagnostics"]} <= {plan.source}


def test_environment_is_in_the_key(fresh, monkeypatch):
    _, plan, _ = fresh
    key = cache.entry_key(plan)
    cache.environment_key.cache_clear()
    monkeypatch.setattr(cache, "__version__", "99.0")
    try:
        assert cache.entry_key(plan) != key
    finally:
        cache.environment_key.cache_clear()


@pytest.mark.parametrize("damage", [
    lambda e: b"",
    lambda e: e[: len(e) // 2],  # cut short
    lambda e: b"\xff\xfe" + e,  # not UTF-8
    lambda e: b"[]",
    lambda e: e.replace(b'"entry":1', b'"entry":7'),
    lambda e: e.replace(b'"planpack":"0.', b'"planpack":"9.'),
    lambda e: e.replace(b'"net_schedule"', b'"net_sched"'),
    lambda e: e.replace(b'"severity":"warning","code"', b'"severity":"grave","code"'),
    lambda e: e.replace(b'"line":', b'"line":"x","l":', 1),
])
def test_damaged_entry_is_ignored_and_rebuilt(tmp_path, fresh, counted, damage):
    _, plan, compiled = fresh
    folder = tmp_path / "entries"
    cache.cached_compile(plan, cache_dir=folder)
    assert len(counted) == 1
    path = cache.entry_path(plan, folder)
    raw = path.read_bytes()
    bad = damage(raw)
    assert bad != raw
    path.write_bytes(bad)
    result = cache.cached_compile(plan, cache_dir=folder)
    assert len(counted) == 2  # compiled again, not trusted
    assert result.data == compiled.data
    assert path.read_bytes() != bad  # and the entry was rewritten whole
    assert cache.cached_compile(plan, cache_dir=folder).data == json.loads(json.dumps(compiled.data))
    assert len(counted) == 2
    assert [p.name for p in folder.iterdir() if p.name.startswith(".tmp-")] == []


def test_disabled_neither_reads_nor_writes(tmp_path, fresh, counted):
    _, plan, _ = fresh
    cache.cached_compile(plan, cache_dir=tmp_path / "entries", enabled=False)
    assert counted == [plan.source] and not (tmp_path / "entries").exists()


def test_unwritable_cache_only_costs_time(tmp_path, fresh, counted):
    _, plan, compiled = fresh
    blocker = tmp_path / "file"
    blocker.write_text("not a folder")
    assert cache.cached_compile(plan, cache_dir=blocker / "entries").data == compiled.data
    assert cache.cached_compile(plan, cache_dir=blocker / "entries").data == compiled.data
    assert len(counted) == 2


def test_old_entries_are_pruned(tmp_path, fresh, counted, monkeypatch):
    monkeypatch.setattr(cache, "MAX_ENTRIES", 2)
    folder = tmp_path / "entries"
    paths = []
    for i in range(4):
        plan = read_plan(str(write(tmp_path, f"p{i}.yaml", TINY + f"# {i}\n"))).plan
        cache.cached_compile(plan, cache_dir=folder)
        paths.append(cache.entry_path(plan, folder))
        os.utime(paths[-1], (1000 + i, 1000 + i))
    assert sorted(folder.glob("*.json")) == sorted(paths[2:])  # the two used last are kept
