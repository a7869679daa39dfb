"""Benchmark: robustness figures for the README's reliability section.

Prints, in a form to paste:

- how many fuzzed inputs the reader was fed (the properties of tests/hardening/test_fuzz_reader.py,
  with many more examples than the test runs) and how many hostile files the CLI was given;
- how many SIGKILLed builds (tests/hardening/test_build_interrupt.py's loop) left a whole site;
- the largest plan read (500 stations, 200 channels): time and peak memory of
  ``planpack check --no-analysis`` (target: under 10 s and 1 GB on the 2-core development machine),
  and of a full ``check`` with the analysis when it finishes within the time allowed;
- the size bounds: a 700-station ``links: all`` plan (refused up front), 10 000 link pairs naming
  unknown stations (and 2000 within the bound, with every hint), and the largest all-pairs net
  within the bounds (60 stations, 1770 links, 40 channels): time and peak memory of ``check``
  (goal: every answer within 60 s and 1 GB; 15 s for the unknown references);
- how many hostile strings the browser test loads (tests/hardening/test_browser_inert.py).

Run (about two minutes):

    .venv/bin/python bench/robustness.py [--fuzz N] [--kills N] [--analysis-timeout S]
"""

from __future__ import annotations

import argparse
import os
import platform
import shutil
import subprocess
import sys
import tempfile
import time
import tracemalloc
import warnings
from pathlib import Path

REPO = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(REPO))

from tests.hardening import conftest as hc  # noqa: E402


def fuzz(n: int) -> tuple[int, float]:
    """Run every fuzz property n times (random bytes n/2); returns (inputs read, seconds)."""
    from hypothesis import HealthCheck, given, settings
    from hypothesis import strategies as st

    from tests.hardening import test_fuzz_reader as f

    warnings.filterwarnings("ignore")
    opts = settings(max_examples=n, deadline=f.HANG_S, database=None, derandomize=True,
                    suppress_health_check=list(HealthCheck))
    tracemalloc.start()
    started = time.monotonic()
    for strategy in (f.mutated_demo(), f.random_plan_shaped(), f.yaml_soup()):
        opts(given(strategy)(f.check_text))()

    @settings(opts, max_examples=max(n // 2, 1))
    @given(st.sampled_from(f.DEMOS), st.integers(0, 10**6), st.binary(min_size=1, max_size=8))
    def spliced(text, where, junk):
        data = text.encode("utf-8")
        at = where % (len(data) + 1)
        f.check_text(data[:at] + junk + data[at:])

    spliced()
    tracemalloc.stop()
    return f.checked["inputs"], time.monotonic() - started


# Runs the CLI and reports the process's own peak resident memory (VmHWM, counted for this
# program's image only: a fork's ru_maxrss would also count the parent's pages before exec).
MEASURED = """
import atexit, sys
def peak():
    for line in open('/proc/self/status'):
        if line.startswith('VmHWM:'):
            sys.stderr.write('planpack-bench: peak ' + line.split()[1] + '\\n')
atexit.register(peak)
from planpack import cli
sys.exit(cli.main(sys.argv[1:]))
"""


def run_measured(args: list[str], cwd: Path, timeout: float) -> tuple[int | None, float, float]:
    """(exit code or None on timeout, wall seconds, peak RSS [MB]) of one planpack run in a fresh process."""
    started = time.monotonic()
    try:
        r = subprocess.run([sys.executable, "-c", MEASURED, *args], cwd=cwd, env=hc.env(), stdout=subprocess.DEVNULL,
                           stderr=subprocess.PIPE, text=True, timeout=timeout)
    except subprocess.TimeoutExpired:
        return None, time.monotonic() - started, float("nan")
    wall = time.monotonic() - started
    peaks = [int(line.split()[-1]) for line in r.stderr.splitlines() if line.startswith("planpack-bench: peak")]
    return r.returncode, wall, (peaks[-1] / 1024 if peaks else float("nan"))


def big_plan_figures(work: Path, analysis_timeout: float) -> dict:
    from planpack.plan import read_plan
    from tests.hardening.bigplan import big_plan

    path = work / "big.yaml"
    path.write_text(big_plan(500, 200), encoding="utf-8")
    size = path.stat().st_size
    tracemalloc.start()
    started = time.perf_counter()
    result = read_plan(str(path))
    read_s = time.perf_counter() - started
    read_peak = tracemalloc.get_traced_memory()[1] / 1e6
    tracemalloc.stop()
    assert result.ok, "the load-test plan must read clean"
    code, quick_s, quick_mb = run_measured(["check", "--no-analysis", "-q", str(path)], work, 120)
    assert code == 0
    code_full, full_s, full_mb = run_measured(["check", "-q", str(path)], work, analysis_timeout)
    return {"bytes": size, "read_s": read_s, "read_peak_mb": read_peak, "quick_s": quick_s, "quick_mb": quick_mb,
            "full_code": code_full, "full_s": full_s, "full_mb": full_mb, "timeout": analysis_timeout}


def size_figures(work: Path, timeout: float) -> dict:
    """check on the plans at and beyond the size bounds: {name: (exit code, seconds, peak MB)}."""
    from tests.hardening.bigplan import big_plan, mesh_plan

    plans = {
        "mesh700": mesh_plan(700, 10),
        "unknown10k": big_plan(2000, 10).replace("  links: hub\n", "  links:\n" + "".join(
            f"    - [ghost-{i:05d}, phantom-{i:05d}]\n" for i in range(10_000))),
        "unknown2k": big_plan(2000, 10).replace("  links: hub\n", "  links:\n" + "".join(
            f"    - [ghost-{i:05d}, phantom-{i:05d}]\n" for i in range(2000))).replace(
            "antenna: [night-wire, day-wire]", "antenna: [night-wyre, day-wire]"),
        "mesh60": mesh_plan(60, 40),
    }
    out = {}
    for name, text in plans.items():
        path = work / f"{name}.yaml"
        path.write_text(text, encoding="utf-8")
        out[name] = run_measured(["check", "-q", str(path)], work, timeout) + (len(text.encode()),)
    return out


def main() -> int:
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--fuzz", type=int, default=1000, help="examples per fuzz property (default 1000)")
    ap.add_argument("--kills", type=int, default=12, help="SIGKILLed builds (default 12)")
    ap.add_argument("--analysis-timeout", type=float, default=150.0, help="seconds allowed for the full check")
    args = ap.parse_args()

    from tests.hardening import hostile, test_browser_inert, test_cli_hostile, test_hostile_values
    from tests.hardening.test_build_interrupt import SEED, kill_loop

    work = Path(tempfile.mkdtemp(prefix="planpack-robustness-"))
    os.environ["PLANPACK_CACHE_DIR"] = hc.CACHE_DIR
    try:
        print("fuzzing the reader ...", file=sys.stderr, flush=True)
        inputs, fuzz_s = fuzz(args.fuzz)
        print("killing builds ...", file=sys.stderr, flush=True)
        kills = kill_loop(work / "kills", runs=args.kills, seed=SEED)
        print("reading and checking the 500-station plan ...", file=sys.stderr, flush=True)
        big = big_plan_figures(work, args.analysis_timeout)
        print("checking the plans at the size bounds ...", file=sys.stderr, flush=True)
        size = size_figures(work, args.analysis_timeout)
    finally:
        shutil.rmtree(work, ignore_errors=True)
        shutil.rmtree(hc.CACHE_DIR, ignore_errors=True)

    surprises = len(test_hostile_values.SURPRISES) * len(test_hostile_values.TEXT_FIELDS)
    strings = len(test_browser_inert.HOSTILE_STRINGS)
    machine = f"{platform.machine()}, {os.cpu_count()} cores, Python {platform.python_version()}"
    if big["full_code"] is None:
        full = f"did not finish within {big['timeout']:.0f} s (stopped)"
    else:
        full = f"{big['full_s']:.1f} s, peak {big['full_mb']:.0f} MB (exit {big['full_code']}: warnings only)" \
            if big["full_code"] in (0, 1) else f"exit {big['full_code']} after {big['full_s']:.1f} s"
    print(f"""
Reliability figures (bench/robustness.py, {machine}):

- Fuzzed reader inputs: {inputs} (mutated demo plans, random structures under the plan's keys, raw YAML
  text and random bytes spliced into the demo plans) in {fuzz_s:.0f} s; every one gave a clean plan or
  positioned diagnostics, none a traceback, hang or memory blow-up. Plus {len(test_cli_hostile.NAMES)} hostile files through
  `planpack check` (alias bomb, 50 MB sparse file, deep nesting, UTF-16/32, invalid UTF-8, NUL, tags,
  a FIFO, a device, ...) under a 1 GiB memory cap, and {surprises} YAML surprises (every one of
  {len(test_hostile_values.SURPRISES)} surprises in each of {len(test_hostile_values.TEXT_FIELDS)} text fields).
- Kill points: {kills['whole']} of {kills['runs']} SIGKILLed builds left a whole site, byte for byte the previous or the new one
  ({kills['killed_while_publishing']} killed while publishing, {kills['killed_before_publishing']} before; temporary folders were found after {kills['leftovers_seen']} of the runs, all removed by the next one).
- Largest plan read: 500 stations, 200 channels ({big['bytes'] / 1024:.0f} KiB of YAML, 499 links): read and validated in
  {big['read_s'] * 1000:.0f} ms ({big['read_peak_mb']:.0f} MB traced); `planpack check --no-analysis` {big['quick_s']:.1f} s, peak {big['quick_mb']:.0f} MB
  (target: under 10 s and 1 GB); full `planpack check` with the analysis: {full}.
- Size bounds (`planpack check`, each in a fresh process): {_size_line(size, "mesh700", "700 stations, links: all (244 650 links)")};
  {_size_line(size, "unknown10k", "10 000 link pairs naming unknown stations")}; {_size_line(size, "unknown2k",
  "2000 pairs and 1333 stations naming unknown ids, hints within a budget")}; {_size_line(size, "mesh60",
  "the largest all-pairs net within the bounds, 60 stations, 1770 links, 40 channels, with the analysis")}.
- Hostile strings in the browser test: {strings} (every free-text field: net title, handling marking,
  Markdown instructions, base URL, station names, channel notes, and the plan's file name), loaded in
  headless Chromium on every page and chart: no dialog, no script, no inline handler, CSP on every page.
""")
    print(f"(hostile ids tried through build: {len(hostile.HOSTILE_IDS)} in 5 id places; hostile base URLs: {len(hostile.HOSTILE_URLS)})")
    return 0


def _size_line(size: dict, name: str, what: str) -> str:
    code, wall, mb, nbytes = size[name]
    if code is None:
        return f"{what} ({nbytes / 1024:.0f} KiB): did not finish in time"
    answer = {0: "checked clean", 1: "refused or reported with positioned errors"}.get(code, f"exit {code}")
    return f"{what} ({nbytes / 1024:.0f} KiB): {answer} in {wall:.1f} s, peak {mb:.0f} MB"


if __name__ == "__main__":
    sys.exit(main())
