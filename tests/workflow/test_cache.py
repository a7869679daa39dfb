"""The compile cache: a hit equals a fresh compile, a change misses, and no entry is trusted more than the plan.

Finding 1 of the hardening round: a crafted entry committed as
``.planpack-cache/<key>.json`` made ``diff`` report "no change" for a changed
frequency and address; entries with wrong types crashed. Finding 2: a cache
folder that was a symbolic link was written through and its target pruned.
"""

from __future__ import annotations

import copy
import dataclasses
import json
import os
import subprocess
import sys

import pytest
from tests.workflow.conftest import REPO, write
from tests.workflow.plans import TINY as CLEAN, variant

import planpack.compile
from planpack.plan import read_plan
from planpack.workflow import cache, cachedir

NEW_FREQ_AND_ADDRESS = variant(("khz: 4545, mode: usb", "khz: 4570, mode: usb"), ("address: TNYCMP", "address: TNYCAMP"))


# The tiny plan with its wire on the set's own tuner: the wire loses much of the power on T1 and T3, so
# the compiled plan carries warnings, and the cache must keep them and their positions.
TINY = variant(("    matching: feedpoint-coupler\n", ""))
assert TINY != CLEAN


@pytest.fixture(scope="module")
def fresh(tmp_path_factory):
    """One real compile of the tiny plan, and the cache folder holding its entry."""
    folder = tmp_path_factory.mktemp("cache")
    plan = read_plan(str(write(folder, "net.yaml", TINY))).plan
    compiled = cache.cached_compile(plan, cache_dir=folder / "root")
    return folder, plan, compiled


@pytest.fixture
def counted(monkeypatch, fresh):
    """compile_plan replaced by one that counts its calls and answers the real compile of TINY (from its file)."""
    calls = []
    real = fresh[2]

    def compile_plan(plan):
        calls.append(plan.source)
        moved = [dataclasses.replace(d, file=plan.source) for d in real.diagnostics]
        data = copy.deepcopy(real.data)
        data["diagnostics"] = [d.to_dict() for d in moved]
        return cache.CachedPlan(data, moved)

    monkeypatch.setattr(planpack.compile, "compile_plan", compile_plan)
    return calls


def entry(root, plan):
    return root / "compiled" / cache.entry_name(plan)


def test_hit_equals_fresh_compile_and_skips_compiling(fresh, counted):
    folder, plan, compiled = fresh
    again = cache.cached_compile(plan, cache_dir=folder / "root")
    assert counted == []
    assert again.data == json.loads(json.dumps(compiled.data))
    assert again.diagnostics == compiled.diagnostics
    assert [d.message for d in again.diagnostics] == [d.message for d in compiled.diagnostics]
    assert again.data["revision"] == compiled.data["revision"]


def test_default_folder_is_the_users_cache_not_the_plans_folder(tmp_path, monkeypatch):
    monkeypatch.delenv(cachedir.CACHE_ENV, raising=False)
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "xdg"))
    assert cachedir.cache_root() == tmp_path / "xdg" / "planpack"
    monkeypatch.setenv("XDG_CACHE_HOME", "relative/ignored")  # the XDG spec: relative paths are invalid
    monkeypatch.setenv("HOME", str(tmp_path / "home"))
    assert cachedir.cache_root() == tmp_path / "home" / ".cache" / "planpack"
    monkeypatch.setenv(cachedir.CACHE_ENV, str(tmp_path / "ci-cache"))
    assert cachedir.cache_root() == tmp_path / "ci-cache"


def test_entry_goes_to_the_cache_folder_and_nothing_beside_the_plan(tmp_path, fresh, counted, monkeypatch):
    monkeypatch.delenv(cachedir.CACHE_ENV, raising=False)
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "xdg"))
    plans = tmp_path / "plans"
    plans.mkdir()
    plan = read_plan(str(write(plans, "net.yaml", TINY))).plan
    cache.cached_compile(plan)
    assert sorted(os.listdir(plans)) == ["net.yaml"]
    root = tmp_path / "xdg" / "planpack"
    assert entry(root, plan).is_file() and counted == [plan.source]
    assert (root / "CACHEDIR.TAG").read_bytes().startswith(b"Signature: 8a477f597d28d172789f06886806bc55")
    assert (root / "compiled").stat().st_mode & 0o777 == 0o700


def test_any_change_to_the_file_misses(tmp_path, fresh, counted):
    root = tmp_path / "root"
    for i, text in enumerate([TINY, TINY + "# a comment\n", "# another comment\n" + TINY]):
        plan = read_plan(str(write(tmp_path, f"p{i}.yaml", text))).plan
        cache.cached_compile(plan, cache_dir=root)
        cache.cached_compile(plan, cache_dir=root)
    assert len(counted) == 3  # each content compiled once, answered once from the cache


def test_copy_elsewhere_hits_and_is_renamed(tmp_path, fresh, counted):
    folder, _, compiled = fresh
    (tmp_path / "sub").mkdir()
    plan = read_plan(str(write(tmp_path / "sub", "copy.yaml", TINY))).plan
    hit = cache.cached_compile(plan, cache_dir=folder / "root")
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


def _edit(path_in_data: str, value):
    """A damage that sets one value of the entry's data (a dotted path, [i] for list items)."""
    def damage(e: bytes) -> bytes:
        doc = json.loads(e)
        node = doc["data"]
        parts = path_in_data.replace("[", ".[").split(".")
        for part in parts[:-1]:
            node = node[int(part[1:-1])] if part.startswith("[") else node[part]
        last = parts[-1]
        if last.startswith("["):
            node[int(last[1:-1])] = value
        else:
            node[last] = value
        return json.dumps(doc).encode()
    return damage


@pytest.mark.parametrize("damage", [
    lambda e: b"",
    lambda e: e[: len(e) // 2],  # cut short
    lambda e: b"\xff\xfe" + e,  # not UTF-8
    lambda e: b"[]",
    lambda e: b"[" * 100_000,  # nesting deep enough to exhaust the parser's recursion
    lambda e: e.replace(b'"entry":2', b'"entry":7'),
    lambda e: e.replace(b'"planpack":"0.', b'"planpack":"9.'),
    lambda e: e.replace(b'"net_schedule"', b'"net_sched"'),
    lambda e: e.replace(b'"severity":"warning","code"', b'"severity":"grave","code"'),
    lambda e: e.replace(b'"line":', b'"line":"x","l":', 1),
    lambda e: e.replace(b'"snr_db":', b'"snr_db":NaN,"x":', 1),
    # valid JSON, wrong types: the cases that crashed with exit 3
    _edit("channels[1].freq_khz", "4545"),
    _edit("net.valid", None),
    _edit("links[0].hours[3].first", "no-such-channel"),
    _edit("net_schedule.hours[5].first", "T9"),
    _edit("links[0].from", "nobody"),
    _edit("links[0].hours", []),
    _edit("stations[0].sun", "up"),
    _edit("scan_lists[0].groups[0].channels", ["T1", "T7"]),
    _edit("antennas[0].stations", ["elsewhere"]),
    _edit("gaps", [{"links": ["x--y"], "utc_hours": [1], "local_hours": ["02:00"], "window_mhz": None}]),
    # well-typed, but not what the plan says: the entry was made for other bytes
    _edit("channels[1].freq_khz", 4570),
    _edit("stations[1].address", "TNYCAMP"),
    _edit("stations[0].power_w", 400),
    _edit("net.id", "other-net"),
])
def test_damaged_or_foreign_entry_is_ignored_and_rebuilt(tmp_path, fresh, counted, damage):
    _, plan, compiled = fresh
    root = tmp_path / "root"
    cache.cached_compile(plan, cache_dir=root)
    assert len(counted) == 1
    path = entry(root, plan)
    raw = path.read_bytes()
    bad = damage(raw)
    assert bad != raw
    path.write_bytes(bad)
    result = cache.cached_compile(plan, cache_dir=root)
    assert len(counted) == 2  # compiled again, not trusted
    assert result.data == compiled.data
    assert path.read_bytes() != bad  # and the entry was rewritten whole
    assert cache.cached_compile(plan, cache_dir=root).data == json.loads(json.dumps(compiled.data))
    assert len(counted) == 2
    assert [p.name for p in (root / "compiled").iterdir() if p.name.startswith(".tmp-")] == []


def test_an_entry_for_other_bytes_is_a_miss(tmp_path, fresh, counted):
    """The attack of finding 1: the entry of the old plan planted under the new plan's name."""
    _, old_plan, _ = fresh
    root = tmp_path / "root"
    cache.cached_compile(old_plan, cache_dir=root)
    new_plan = read_plan(str(write(tmp_path, "new.yaml", NEW_FREQ_AND_ADDRESS))).plan
    doc = json.loads(entry(root, old_plan).read_bytes())
    doc["key"] = cache.entry_key(new_plan)  # every name and key is computable from public bytes
    doc["plan_sha256"] = new_plan.sha256
    entry(root, new_plan).write_text(json.dumps(doc))
    assert cache.load_entry(entry(root, new_plan).read_bytes(), new_plan, cache.entry_key(new_plan)) is None
    cache.cached_compile(new_plan, cache_dir=root)
    assert counted == [old_plan.source, new_plan.source]


def test_planted_entry_in_the_repository_cannot_change_diff(tmp_path):
    """Finding 1 end to end: a crafted .planpack-cache/ committed beside the plan is never read."""
    repo = tmp_path / "repo"
    repo.mkdir()
    env = {**os.environ, "PYTHONPATH": str(REPO), "NO_COLOR": "1", "XDG_CACHE_HOME": str(tmp_path / "xdg"),
           "GIT_CONFIG_GLOBAL": os.devnull, "GIT_CONFIG_SYSTEM": os.devnull, "GIT_AUTHOR_NAME": "t",
           "GIT_AUTHOR_EMAIL": "t@example.invalid", "GIT_COMMITTER_NAME": "t", "GIT_COMMITTER_EMAIL": "t@example.invalid"}
    env.pop(cachedir.CACHE_ENV, None)

    def git(*args):
        subprocess.run(["git", *args], cwd=repo, env=env, check=True, capture_output=True)

    def planpack(*args):
        return subprocess.run([sys.executable, "-m", "planpack", *args], cwd=repo, env=env, capture_output=True,
                              text=True, timeout=300)

    write(repo, "plan.yaml", TINY)
    git("init", "-q")
    git("add", ".")
    git("commit", "-q", "-m", "net")
    # the attacker: the old plan's compiled data, planted under the name the new plan's entry would have
    old = cache.cached_compile(read_plan(str(repo / "plan.yaml")).plan, cache_dir=tmp_path / "scratch")
    write(repo, "plan.yaml", NEW_FREQ_AND_ADDRESS)
    new_plan = read_plan(str(repo / "plan.yaml")).plan
    planted = {"entry": cache.ENTRY_FORMAT, "key": cache.entry_key(new_plan), "planpack": cache.__version__,
               "plan_sha256": new_plan.sha256, "source": new_plan.source, "data": old.data,
               "diagnostics": [d.to_dict() for d in old.diagnostics]}
    for folder in (repo / ".planpack-cache", repo / ".planpack-cache" / "compiled"):
        folder.mkdir(exist_ok=True)
        (folder / cache.entry_name(new_plan)).write_text(json.dumps(planted))
    git("add", "-f", ".")
    git("commit", "-q", "-m", "change a frequency and an address, and plant a cache entry")
    r = planpack("diff", "HEAD~1:plan.yaml", "plan.yaml")
    assert r.returncode == 1, r.stdout + r.stderr
    assert "TNYCMP → TNYCAMP" in r.stdout and "4545" in r.stdout and "4570" in r.stdout
    unplanted = planpack("diff", "HEAD~1:plan.yaml", "plan.yaml", "--no-cache")
    assert unplanted.stdout == r.stdout


def test_disabled_neither_reads_nor_writes(tmp_path, fresh, counted):
    _, plan, _ = fresh
    cache.cached_compile(plan, cache_dir=tmp_path / "root", enabled=False)
    assert counted == [plan.source] and not (tmp_path / "root").exists()


def test_unwritable_cache_only_costs_time(tmp_path, fresh, counted):
    _, plan, compiled = fresh
    blocker = tmp_path / "file"
    blocker.write_text("not a folder")
    assert cache.cached_compile(plan, cache_dir=blocker / "root").data == compiled.data
    assert cache.cached_compile(plan, cache_dir=blocker / "root").data == compiled.data
    assert len(counted) == 2


def test_old_entries_are_pruned_and_nothing_else(tmp_path, fresh, counted, monkeypatch):
    monkeypatch.setattr(cache, "MAX_ENTRIES", 2)
    root = tmp_path / "root"
    paths = []
    for i in range(4):
        plan = read_plan(str(write(tmp_path, f"p{i}.yaml", TINY + f"# {i}\n"))).plan
        cache.cached_compile(plan, cache_dir=root)
        paths.append(entry(root, plan))
        os.utime(paths[-1], (1000 + i, 1000 + i))
        if i == 0:
            (root / "compiled" / "notes.json").write_text("{}")  # not a name the cache writes: never pruned
    assert sorted((root / "compiled").glob("*.json")) == sorted(paths[2:] + [root / "compiled" / "notes.json"])


# ---------------------------------------------------------------- links (finding 2)

def _owner_files(folder, n=250):
    folder.mkdir()
    for i in range(n):
        (folder / f"{i:040x}{i:08x}.json").write_text(f'{{"mine": {i}}}')  # names like cache entries
    (folder / "compiled").mkdir()
    return {p.name: p.read_bytes() for p in folder.rglob("*") if p.is_file()}


def test_a_cache_folder_that_is_a_link_is_not_followed(tmp_path, fresh, counted, monkeypatch):
    _, plan, compiled = fresh
    monkeypatch.setattr(cache, "MAX_ENTRIES", 2)
    victim = tmp_path / "owners-files"
    before = _owner_files(victim)
    link = tmp_path / "cache-link"
    link.symlink_to(victim)
    for _ in range(2):
        assert cache.cached_compile(plan, cache_dir=link).data == compiled.data
    assert len(counted) == 2  # no cache used: compiled each time
    assert {p.name: p.read_bytes() for p in victim.rglob("*") if p.is_file()} == before


def test_a_sub_folder_or_entry_that_is_a_link_is_not_followed(tmp_path, fresh, counted):
    _, plan, compiled = fresh
    victim = tmp_path / "owners-files"
    before = _owner_files(victim)
    root = tmp_path / "root"
    root.mkdir()
    (root / "compiled").symlink_to(victim)
    assert cache.cached_compile(plan, cache_dir=root).data == compiled.data
    (root / "compiled").unlink()
    (root / "compiled").mkdir(mode=0o700)
    target = victim / "target.json"
    target.write_text("keep")
    before["target.json"] = b"keep"
    entry(root, plan).symlink_to(target)
    assert cache.cached_compile(plan, cache_dir=root).data == compiled.data
    assert target.read_text() == "keep"  # replaced the link, did not write through it
    assert not entry(root, plan).is_symlink()
    assert {p.name: p.read_bytes() for p in victim.rglob("*") if p.is_file()} == before


def test_a_sub_folder_others_can_write_is_not_used(tmp_path, fresh, counted):
    _, plan, _ = fresh
    root = tmp_path / "root"
    (root / "compiled").mkdir(parents=True)
    os.chmod(root / "compiled", 0o777)
    cache.cached_compile(plan, cache_dir=root)
    cache.cached_compile(plan, cache_dir=root)
    assert len(counted) == 2 and list((root / "compiled").iterdir()) == []
