"""Shared helpers for the hardening tests: running the real CLI, manifests of a site, one hostile build."""

from __future__ import annotations

import hashlib
import os
import shutil
import subprocess
import sys
import tempfile
import textwrap
from pathlib import Path

import pytest

from tests.hardening import hostile
from tests.plan.conftest import write_plan  # noqa: F401 - plan files in a fresh folder

REPO = Path(__file__).resolve().parents[2]
PYTHON = sys.executable

# Runs the CLI after installing audit and network guards; used as `python -c WRAPPER args...`.
# PLANPACK_TEST_OPEN_LOG: append every path the process opens (Python's audit "open" event).
# PLANPACK_TEST_NO_NET: make every internet socket connection fail, and log each attempt.
# PLANPACK_TEST_SLOW_WRITES: sleep this many seconds before each file the output module writes,
#   and print "planpack-test: publishing" to stderr when the publishing step starts.
WRAPPER = textwrap.dedent("""
    import os, socket, sys, time
    log = os.environ.get("PLANPACK_TEST_OPEN_LOG")
    if log:
        fh = open(log, "a", encoding="utf-8", errors="backslashreplace")
        def hook(event, args):
            if event == "open" and isinstance(args[0], (str, bytes)):
                fh.write(os.fsdecode(args[0]) + "\\n")
                fh.flush()
        sys.addaudithook(hook)
    if os.environ.get("PLANPACK_TEST_NO_NET"):
        def refuse(what):
            def fail(*a, **k):
                print(f"planpack-test: network attempt: {what} {a[1:2] or a[:1]}", file=sys.stderr, flush=True)
                raise OSError(101, "network is blocked in this test")
            return fail
        real_connect = socket.socket.connect
        def connect(self, address):
            if self.family in (socket.AF_INET, socket.AF_INET6):
                return refuse("connect")(self, address)
            return real_connect(self, address)
        socket.socket.connect = connect
        socket.socket.connect_ex = lambda self, address: connect(self, address)
        socket.create_connection = refuse("create_connection")
        socket.getaddrinfo = refuse("getaddrinfo")
        socket.gethostbyname = refuse("gethostbyname")
        real_sendto = socket.socket.sendto
        def sendto(self, *a):
            if self.family in (socket.AF_INET, socket.AF_INET6):
                return refuse("sendto")(self, *a)
            return real_sendto(self, *a)
        socket.socket.sendto = sendto
    slow = float(os.environ.get("PLANPACK_TEST_SLOW_WRITES") or 0)
    if slow:
        from planpack.publish import output
        real_write, real_publish = output._write_file, output.publish
        def write(path, data):
            time.sleep(slow)
            real_write(path, data)
        def publish(*a, **k):
            print("planpack-test: publishing", file=sys.stderr, flush=True)
            return real_publish(*a, **k)
        output._write_file, output.publish = write, publish
    from planpack import cli
    sys.exit(cli.main(sys.argv[1:]))
""")


# The cache (planpack/workflow/cachedir.py) lives in the user's cache folder unless told otherwise;
# the hardening tests give it one folder of their own, away from the folders they watch.
CACHE_DIR = tempfile.mkdtemp(prefix="planpack-hardening-cache-")
CACHE_NAMES = (".planpack-cache",)  # the folder name older versions wrote beside a plan; never read now


def env(**extra: str) -> dict:
    e = {k: v for k, v in os.environ.items() if not k.startswith("PLANPACK_")}
    e.update({"PYTHONPATH": str(REPO), "NO_COLOR": "1", "PYTHONDONTWRITEBYTECODE": "1",
              "PLANPACK_CACHE_DIR": CACHE_DIR, "MPLCONFIGDIR": os.path.join(CACHE_DIR, "matplotlib")})
    e.update(extra)
    return e


@pytest.fixture(scope="session", autouse=True)
def _cache_elsewhere():
    """In-process builds use the same cache folder as the subprocesses; removed at the end."""
    saved = {k: os.environ.get(k) for k in ("PLANPACK_CACHE_DIR", "MPLCONFIGDIR")}
    os.environ["PLANPACK_CACHE_DIR"] = CACHE_DIR
    os.environ.setdefault("MPLCONFIGDIR", os.path.join(CACHE_DIR, "matplotlib"))
    yield
    for k, v in saved.items():
        if v is None:
            os.environ.pop(k, None)
        else:
            os.environ[k] = v
    shutil.rmtree(CACHE_DIR, ignore_errors=True)


def run_cli(args: list[str], *, cwd: Path | str = REPO, timeout: float = 120, guarded: bool = False,
            **extra_env: str) -> subprocess.CompletedProcess:
    """The real command line in a fresh process: `python -m planpack ARGS` (or through WRAPPER)."""
    cmd = [PYTHON, "-c", WRAPPER, *args] if guarded else [PYTHON, "-m", "planpack", *args]
    return subprocess.run(cmd, cwd=cwd, env=env(**extra_env), capture_output=True, text=True,
                          errors="backslashreplace", timeout=timeout)


def popen_cli(args: list[str], *, cwd: Path | str = REPO, **extra_env: str) -> subprocess.Popen:
    return subprocess.Popen([PYTHON, "-c", WRAPPER, *args], cwd=cwd, env=env(**extra_env),
                            stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True, errors="backslashreplace")


def manifest(folder: Path) -> dict[str, str]:
    """{relative path: sha256} of every file below folder (symlinks listed as 'symlink')."""
    out = {}
    for p in sorted(folder.rglob("*")):
        rel = str(p.relative_to(folder))
        if p.is_symlink():
            out[rel] = "symlink"
        elif p.is_file():
            out[rel] = hashlib.sha256(p.read_bytes()).hexdigest()
    return out


def beside(out: Path) -> list[str]:
    """What planpack left next to DIR besides its lock file (temporary and set-aside folders)."""
    return sorted(n for n in os.listdir(out.parent) if n.startswith(f".{out.name}.planpack-") and not n.endswith("-lock"))


def snapshot(root: Path) -> dict[str, str]:
    """Every path under root (files hashed, folders and links marked), to prove nothing else changed."""
    out = {}
    for dirpath, dirnames, filenames in os.walk(root):
        dirnames[:] = [d for d in dirnames if d not in CACHE_NAMES]
        for name in dirnames + filenames:
            p = Path(dirpath) / name
            rel = str(p.relative_to(root))
            if p.is_symlink():
                out[rel] = "link->" + os.readlink(p)
            elif p.is_dir():
                out[rel] = "dir"
            else:
                out[rel] = hashlib.sha256(p.read_bytes()).hexdigest()
    return out


def small_plan(title: str = "Test net", net_id: str = "test-net") -> str:
    from tests.plan.conftest import BASE

    return BASE.replace("id: test-net", f"id: {net_id}").replace("title: Test net", f"title: {title}")


@pytest.fixture(scope="session")
def hostile_build(tmp_path_factory):
    """One site built by the real CLI from the hostile plan, with every file the build opened.

    Returns a dict: root (the work folder), out (the site), plan (the plan path), canary (a file no
    plan may make planpack read), fields ({field path: hostile value}), opened (paths opened),
    strings (every hostile string), result (the CompletedProcess).
    """
    root = tmp_path_factory.mktemp("hostile")
    canary = root / "canary-secret.txt"
    canary.write_text("CANARY-4f1c9e-SECRET\n")
    text, fields = hostile.hostile_plan(str(canary))
    plan = root / hostile.FILE_NAME
    plan.write_text(text, encoding="utf-8")
    out = root / "site"
    log = root / "opened.log"
    result = run_cli(["build", hostile.FILE_NAME, "--out", "site"], cwd=root, guarded=True,
                     PLANPACK_TEST_OPEN_LOG=str(log), PLANPACK_TEST_NO_NET="1", timeout=300)
    assert result.returncode == 0, result.stderr[-3000:]
    opened = log.read_text(encoding="utf-8").splitlines()
    return {"root": root, "out": out, "plan": plan, "canary": canary, "fields": fields, "opened": opened,
            "strings": hostile.strings(str(canary)), "result": result}


@pytest.fixture
def cached_compile(monkeypatch):
    """compile_plan memoised by the plan's bytes, so in-process builds that test refusals stay quick."""
    from planpack import compile as compile_mod

    real = compile_mod.compile_plan
    cache: dict = {}

    def compile_plan(plan):
        key = plan.sha256
        if key not in cache:
            cache[key] = real(plan)
        return cache[key]

    monkeypatch.setattr(compile_mod, "compile_plan", compile_plan)
    return cache

