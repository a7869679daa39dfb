"""The load-test plan (500 stations, 200 channels) reads clean and sits well inside the reader's bounds.

Its time and memory are figures, printed by bench/robustness.py, not asserted here.
"""

from __future__ import annotations

from planpack.plan import read_plan
from planpack.plan import yamlread
from tests.hardening.bigplan import big_plan
from tests.hardening.conftest import run_cli


def test_the_big_plan_reads_clean_within_the_bounds(tmp_path):
    text = big_plan(500, 200)
    assert len(text.encode()) < yamlread.MAX_BYTES / 4
    path = tmp_path / "big.yaml"
    path.write_text(text, encoding="utf-8")
    result = read_plan(str(path))
    assert result.ok, [d.format() for d in result.diagnostics[:5]]
    assert len(result.plan.stations) == 500 and len(result.plan.channels) == 200
    assert len(result.plan.links) == 499
    # a bound of 100 000 nodes must leave room for plans of this size
    from planpack.plan.diagnostics import Collector

    root = yamlread.read_file(str(path), Collector(str(path)))
    assert yamlread._size(root) < yamlread.MAX_NODES / 3


def test_the_big_plan_through_check_no_analysis(tmp_path):
    path = tmp_path / "big.yaml"
    path.write_text(big_plan(500, 200), encoding="utf-8")
    r = run_cli(["check", "--no-analysis", str(path)], cwd=tmp_path)
    assert r.returncode == 0 and "0 errors" in r.stderr, r.stderr[-2000:]
