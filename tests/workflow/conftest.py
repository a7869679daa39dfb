"""Fixtures for the workflow tests: a shared compile cache, plan files, and the command line."""

from __future__ import annotations

import argparse
import contextlib
import io
import os
import subprocess
import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).parent))

REPO = Path(__file__).resolve().parents[2]


@pytest.fixture(scope="session")
def shared_cache(tmp_path_factory):
    """One cache folder for the whole session: each tiny plan is compiled once."""
    folder = tmp_path_factory.mktemp("planpack-cache")
    old = os.environ.get("PLANPACK_CACHE_DIR")
    os.environ["PLANPACK_CACHE_DIR"] = str(folder)
    yield folder
    if old is None:
        os.environ.pop("PLANPACK_CACHE_DIR", None)
    else:
        os.environ["PLANPACK_CACHE_DIR"] = old


def write(folder: Path, name: str, text: str) -> Path:
    path = folder / name
    path.write_text(text, encoding="utf-8")
    return path


def hooked() -> bool:
    """Whether ``planpack.cli`` registers the workflow commands yet."""
    from planpack import cli

    for action in cli.build_parser()._actions:
        if isinstance(action, argparse._SubParsersAction):
            return "diff" in action.choices
    return False


def run_cli(argv: list[str], cwd: Path) -> tuple[int, str, str]:
    """Run ``planpack ARGV`` in ``cwd``: the real ``python -m planpack`` once the commands are hooked
    into planpack.cli, until then the workflow commands' own parser in this process."""
    if hooked():
        r = subprocess.run([sys.executable, "-m", "planpack", *argv], cwd=cwd, capture_output=True, text=True,
                           timeout=300, env={**os.environ, "PYTHONPATH": str(REPO), "NO_COLOR": "1"})
        return r.returncode, r.stdout, r.stderr
    from planpack import cli
    from planpack.workflow import commands

    parser = argparse.ArgumentParser(prog="planpack")
    commands.register(parser.add_subparsers(dest="command", required=True))
    out, err = io.StringIO(), io.StringIO()
    here = os.getcwd()
    os.chdir(cwd)
    try:
        with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
            try:
                args = parser.parse_args(argv)
                code = args.func(args)
            except SystemExit as exc:
                code = int(exc.code or 0)
            except cli.UsageError as exc:
                print(f"planpack: {exc}", file=sys.stderr)
                code = cli.EXIT_USAGE
    finally:
        os.chdir(here)
    return code, out.getvalue(), err.getvalue()
