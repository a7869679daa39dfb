"""Fixtures for the workflow tests: a shared compile cache, plan files, and the command line."""

from __future__ import annotations

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


def run_cli(argv: list[str], cwd: Path) -> tuple[int, str, str]:
    """Run the real ``python -m planpack ARGV`` in ``cwd``."""
    r = subprocess.run([sys.executable, "-m", "planpack", *argv], cwd=cwd, capture_output=True, text=True,
                       timeout=300, env={**os.environ, "PYTHONPATH": str(REPO), "NO_COLOR": "1"})
    return r.returncode, r.stdout, r.stderr
