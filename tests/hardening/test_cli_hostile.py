"""The real command line (`python -m planpack check`) fed hostile files: exit 1 or 2, never 3,
never a traceback, never a hang, within a memory cap.

Each run is a fresh process under RLIMIT_AS (1 GiB: a memory blow-up gets killed and fails the
exit-code check) and a timeout (a hang fails it too).
"""

from __future__ import annotations

import json
import os
import random
import resource
import subprocess
import sys
from pathlib import Path

import pytest

from tests.hardening.conftest import REPO, env, small_plan

MEMORY_CAP = 1024**3
TIMEOUT_S = 60


def _limits():
    resource.setrlimit(resource.RLIMIT_AS, (MEMORY_CAP, MEMORY_CAP))


def check(paths: list[str], *extra: str, cwd: Path) -> subprocess.CompletedProcess:
    return subprocess.run([sys.executable, "-m", "planpack", "check", *extra, *paths], cwd=cwd, env=env(),
                          capture_output=True, text=True, errors="backslashreplace", timeout=TIMEOUT_S,
                          preexec_fn=_limits)


def _billion_laughs() -> str:
    lines = ['planpack: 1', 'lol0: &l0 "lol"']
    for i in range(1, 10):
        lines.append(f"lol{i}: &l{i} [" + ", ".join([f"*l{i - 1}"] * 10) + "]")
    return "\n".join(lines) + "\n"


def _block_nesting(depth: int) -> str:
    return "planpack: 1\nnet:\n" + "".join("  " * (i + 1) + f"k{i}:\n" for i in range(depth)) + "  " * (depth + 1) + "x\n"


def hostile_files(folder: Path) -> dict[str, Path]:
    """name -> path of every hostile file (written on demand into folder)."""
    rng = random.Random(8)
    base = small_plan()
    files: dict[str, bytes] = {
        "alias-bomb": _billion_laughs().encode(),
        "deep-flow": ("planpack: 1\nnet: " + "[" * 20_000 + "]" * 20_000 + "\n").encode(),
        "deep-block": _block_nesting(400).encode(),
        "huge-scalar": base.replace("title: Test net", "title: " + "x" * 4_000_000).encode(),
        "huge-line": ("planpack: 1\nnet: [" + ",".join(["1"] * 1_500_000) + "]\n").encode(),
        "many-duplicates": ("planpack: 1\n" + "k: 1\n" * 60_000).encode(),
        "utf16-bom": base.encode("utf-16"),
        "utf32-bom": base.encode("utf-32"),
        "invalid-utf8": base.replace("Ridge team", "Ridge \udcff team").encode("utf-8", "surrogateescape"),
        "nul-bytes": base.replace("Ridge team", "Ridge\0team").encode(),
        "control-char": base.replace("Ridge team", "Ridge\x1b]0;owned\x07team").encode(),
        "random-binary": bytes(rng.randrange(256) for _ in range(8192)),
        "a-list": b"- planpack: 1\n- net: {}\n",
        "a-scalar": b"planpack\n",
        "empty": b"",
        "only-comments": b"# nothing here\n# at all\n",
        "python-tag": b'planpack: 1\nnet: !!python/object/apply:os.system ["touch PWNED"]\n',
        "custom-tag": b"planpack: 1\nnet: !include /etc/passwd\n",
        "multi-document": (base + "---\n" + base).encode(),
        "merge-bomb": ("planpack: 1\nbase: &b {" + ", ".join(f"k{i}: {i}" for i in range(2000)) + "}\n"
                       + "".join(f"m{i}: {{<<: *b}}\n" for i in range(60))).encode(),
        "crlf-and-bare-cr": base.replace("\n", "\r\n").replace("Ridge team", "Ridge\rteam").encode(),
    }
    out = {}
    for name, data in files.items():
        p = folder / f"{name}.yaml"
        p.write_bytes(data)
        out[name] = p
    sparse = folder / "sparse-50MB.yaml"
    with open(sparse, "wb") as fh:
        fh.write(base.encode())
        fh.truncate(50_000_000)  # a 50 MB file that costs no disk
    out["sparse-50MB"] = sparse
    fifo = folder / "fifo-nobody-writes.yaml"
    os.mkfifo(fifo)
    out["fifo"] = fifo
    loop = folder / "loop-a.yaml"
    loop.symlink_to(folder / "loop-b.yaml")
    (folder / "loop-b.yaml").symlink_to(loop)
    out["symlink-loop"] = loop
    (folder / "folder.yaml").mkdir()
    out["folder-named-yaml"] = folder / "folder.yaml"
    out["char-device"] = Path("/dev/zero")
    return out


@pytest.fixture(scope="module")
def files(tmp_path_factory):
    return hostile_files(tmp_path_factory.mktemp("hostile-files"))


NAMES = ["alias-bomb", "deep-flow", "deep-block", "huge-scalar", "huge-line", "many-duplicates", "utf16-bom",
         "utf32-bom", "invalid-utf8", "nul-bytes", "control-char", "random-binary", "a-list", "a-scalar", "empty",
         "only-comments", "python-tag", "custom-tag", "multi-document", "merge-bomb", "crlf-and-bare-cr",
         "sparse-50MB", "fifo", "symlink-loop", "folder-named-yaml", "char-device"]


@pytest.mark.parametrize("name", NAMES)
def test_check_refuses_cleanly(files, name, tmp_path):
    r = check([str(files[name])], cwd=tmp_path)
    assert r.returncode in (1, 2), (r.returncode, r.stderr[-2000:])
    assert "Traceback" not in r.stderr and "internal error" not in r.stderr, r.stderr[-2000:]
    assert "\x1b" not in r.stderr and "\x07" not in r.stderr  # nothing from the file rewrites the terminal
    first = r.stderr.splitlines()[0]
    assert first.startswith(("planpack: ", str(files[name]) + ":")), first  # names the file (or the usage problem)
    assert not (tmp_path / "PWNED").exists()


def test_json_diagnostics_for_every_hostile_file_at_once(files, tmp_path):
    """One run over every file (a plan repository's CI would do this): machine-readable, nothing lost."""
    paths = [str(files[n]) for n in NAMES if n not in ("symlink-loop", "folder-named-yaml")]
    r = check(paths, "--format", "json", cwd=tmp_path)
    assert r.returncode in (1, 2) and "Traceback" not in r.stderr, r.stderr[-2000:]
    diags = json.loads(r.stdout)
    assert {d["file"] for d in diags} == set(paths)
    assert all(d["severity"] == "error" for d in diags if d["file"] != str(files["crlf-and-bare-cr"]))


def test_a_tag_never_runs(files, tmp_path):
    r = check([str(files["python-tag"])], cwd=tmp_path)
    assert "yaml-tag" in r.stderr and r.returncode == 1
    assert not (tmp_path / "PWNED").exists() and not (REPO / "PWNED").exists()


def test_a_pipe_that_carries_a_plan_still_reads(tmp_path):
    """Refusing devices must not refuse `check <(git show HEAD:plan.yaml)`; its content hash is of the bytes read."""
    script = f'{sys.executable} -m planpack check --no-analysis <(cat {REPO / "plans" / "danube-relief.yaml"})'
    r = subprocess.run(["bash", "-c", script], cwd=tmp_path, env=env(), capture_output=True, text=True, timeout=TIMEOUT_S)
    assert r.returncode == 0, r.stderr
    from planpack.plan import read_plan

    direct = read_plan(str(REPO / "plans" / "danube-relief.yaml")).plan.sha256
    r2, w = os.pipe()
    os.write(w, (REPO / "plans" / "danube-relief.yaml").read_bytes())
    os.close(w)
    try:
        piped = read_plan(f"/proc/self/fd/{r2}").plan.sha256
    finally:
        os.close(r2)
    assert piped == direct
