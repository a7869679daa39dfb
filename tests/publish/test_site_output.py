"""The output folder: whole swaps, refusals, clear errors, nothing lost on failure or SIGKILL."""

from __future__ import annotations

import errno
import os
import random
import signal
import subprocess
import sys
import textwrap
import threading
import time
from pathlib import Path

import pytest

from planpack.publish import output
from planpack.publish.output import MARKER, OutputError, publish

REPO = Path(__file__).resolve().parents[2]


def tree(root: Path) -> dict[str, bytes]:
    return {str(p.relative_to(root)): p.read_bytes() for p in sorted(root.rglob("*")) if p.is_file()}


def site(version: str, n: int = 5) -> dict[str, bytes]:
    return {f"net/page{i}.html": f"{version} {i}".encode() for i in range(n)} | {"index.html": version.encode()}


def beside(out: Path) -> list[str]:
    return sorted(n for n in os.listdir(out.parent) if n.startswith(f".{out.name}.planpack-") and not n.endswith("-lock"))


def test_first_build_then_replace_whole(tmp_path):
    out = tmp_path / "site"
    publish(site("one"), out)
    assert tree(out) == site("one") | {MARKER: output.MARKER_TEXT}
    publish({"index.html": b"two"}, out)
    assert tree(out) == {"index.html": b"two", MARKER: output.MARKER_TEXT}  # old pages gone
    assert beside(out) == []
    assert oct(out.stat().st_mode & 0o777) != oct(0o700)  # not left private like a temp folder


def test_fallback_two_rename_swap(tmp_path, monkeypatch):
    monkeypatch.setattr(output, "_exchange", lambda a, b: False)
    out = tmp_path / "site"
    publish(site("one"), out)
    publish(site("two"), out)
    assert tree(out) == site("two") | {MARKER: output.MARKER_TEXT}
    assert beside(out) == []


def test_empty_folder_is_fine_non_empty_needs_force(tmp_path):
    out = tmp_path / "site"
    out.mkdir()
    publish(site("one"), out)
    other = tmp_path / "mine"
    other.mkdir()
    (other / "notes.txt").write_text("keep me")
    with pytest.raises(OutputError, match="not empty and was not made by planpack.*--force"):
        publish(site("one"), other)
    assert (other / "notes.txt").read_text() == "keep me"
    publish(site("one"), other, force=True)
    assert not (other / "notes.txt").exists() and (other / MARKER).is_file()


def test_never_replaces_the_plans_home_cwd_git_or_symlink(tmp_path, monkeypatch):
    plans = tmp_path / "plans"
    plans.mkdir()
    (plans / "a.yaml").write_text("planpack: 1\n")
    for target in (plans, tmp_path):
        with pytest.raises(OutputError, match="holds the plan"):
            publish(site("x"), target, force=True, protect=[str(plans / "a.yaml")])
    assert (plans / "a.yaml").read_text() == "planpack: 1\n"
    work = tmp_path / "work"
    work.mkdir()
    monkeypatch.chdir(work)
    with pytest.raises(OutputError, match="holds the current folder"):
        publish(site("x"), ".", force=True)
    monkeypatch.setenv("HOME", str(tmp_path / "home"))
    (tmp_path / "home").mkdir()
    with pytest.raises(OutputError, match="home folder"):
        publish(site("x"), tmp_path / "home", force=True)
    repo = tmp_path / "repo"
    (repo / ".git").mkdir(parents=True)
    with pytest.raises(OutputError, match="git work tree"):
        publish(site("x"), repo, force=True)
    real = tmp_path / "real"
    publish(site("x"), real)
    (tmp_path / "link").symlink_to(real)
    with pytest.raises(OutputError, match="symbolic link"):
        publish(site("y"), tmp_path / "link", force=True)
    with pytest.raises(OutputError, match="root of the file system"):
        publish(site("x"), "/", force=True)


@pytest.mark.parametrize("bad", ["../evil", "/etc/passwd", "a//b", "a/./b", "a\\b", MARKER, "x\0y"])
def test_paths_cannot_leave_the_folder(tmp_path, bad):
    with pytest.raises(ValueError):
        publish({bad: b"x"}, tmp_path / "site")
    assert not (tmp_path / "site").exists()


@pytest.mark.parametrize("code, words", [(errno.ENOSPC, "disk is full"), (errno.EROFS, "read-only"),
                                         (errno.EACCES, "permission denied")])
def test_write_failure_leaves_previous_site_and_a_clear_error(tmp_path, monkeypatch, code, words):
    out = tmp_path / "site"
    publish(site("one"), out)
    real = output._write_file
    count = {"n": 0}

    def failing(path, data):
        count["n"] += 1
        if count["n"] == 3:
            raise OSError(code, os.strerror(code), str(path))
        real(path, data)

    monkeypatch.setattr(output, "_write_file", failing)
    with pytest.raises(OutputError, match=words) as info:
        publish(site("two"), out)
    assert "left as they were" in str(info.value)
    assert tree(out) == site("one") | {MARKER: output.MARKER_TEXT}
    assert beside(out) == []


def test_interrupt_leaves_previous_site(tmp_path, monkeypatch):
    out = tmp_path / "site"
    publish(site("one"), out)

    def interrupted(path, data):
        raise KeyboardInterrupt

    monkeypatch.setattr(output, "_write_file", interrupted)
    with pytest.raises(KeyboardInterrupt):
        publish(site("two"), out)
    assert tree(out) == site("one") | {MARKER: output.MARKER_TEXT}
    assert beside(out) == []


def test_leftovers_of_an_earlier_run_are_cleaned_and_a_half_swap_repaired(tmp_path):
    out = tmp_path / "site"
    publish(site("one"), out)
    stale = tmp_path / ".site.planpack-tmp-abc"
    stale.mkdir()
    (stale / "half.html").write_text("half")
    # a fallback swap killed between its renames: DIR missing, the previous site set aside
    os.rename(out, tmp_path / ".site.planpack-old-xyz")
    output_recovered = tmp_path / "site"
    with output._Lock(tmp_path / ".site.planpack-lock", output_recovered, 1):
        output.recover(output_recovered)
    assert tree(out) == site("one") | {MARKER: output.MARKER_TEXT}
    assert beside(out) == []


def test_concurrent_builds_end_with_one_whole_site(tmp_path):
    out = tmp_path / "site"
    errors = []

    def run(v):
        try:
            publish(site(v, 40), out)
        except Exception as exc:  # pragma: no cover - shown in the assertion
            errors.append(exc)

    threads = [threading.Thread(target=run, args=(v,)) for v in ("aaa", "bbb", "ccc")]
    for t in threads:
        t.start()
    for t in threads:
        t.join(30)
    assert errors == []
    got = tree(out)
    assert got in [site(v, 40) | {MARKER: output.MARKER_TEXT} for v in ("aaa", "bbb", "ccc")]
    assert beside(out) == []


def test_lock_held_elsewhere_gives_a_clear_message(tmp_path):
    out = tmp_path / "site"
    with output._Lock(tmp_path / ".site.planpack-lock", out, 1):
        with pytest.raises(OutputError, match="another planpack build is writing"):
            publish(site("x"), out, lock_wait_s=0.2)


KILLER = textwrap.dedent("""
    import sys, time
    from planpack.publish import output
    real = output._write_file
    def slow(path, data):
        time.sleep(0.002)
        real(path, data)
    output._write_file = slow
    version = sys.argv[2]
    files = {f"net/p{i:03d}.html": (version * 50).encode() for i in range(150)}
    print("go", flush=True)
    output.publish(files, sys.argv[1])
""")


def test_sigkill_at_random_points_never_leaves_a_mix(tmp_path):
    """Kill builds at random moments: DIR always holds one complete version, never a mix."""
    out = tmp_path / "site"
    rng = random.Random(5)  # fixed seed: the same kill points on every run
    whole = 0
    last = None
    for k in range(8):
        version = f"v{k}"
        proc = subprocess.Popen([sys.executable, "-c", KILLER, str(out), version], cwd=REPO,
                                stdout=subprocess.PIPE, text=True)
        assert proc.stdout.readline().strip() == "go"
        time.sleep(rng.uniform(0.0, 0.6))
        proc.send_signal(signal.SIGKILL)
        proc.wait(10)
        proc.stdout.close()
        if out.exists():
            got = tree(out)
            assert got[MARKER] == output.MARKER_TEXT
            bodies = {v for p, v in got.items() if p != MARKER}
            assert len(bodies) == 1 and len(got) == 151, "a mix of two builds"
            current = bodies.pop()
            assert last is None or current in (last, (version * 50).encode())
            last = current
            whole += 1
    publish({"index.html": b"final"}, out)
    assert beside(out) == []
    print(f"kill points survived with a whole site: {whole} of 8")
