"""Benchmark: what a rebuild costs when nothing (or one plan) changed, against a full build.

Everything is measured in one run, each build a fresh ``python -m planpack build``
process (start-up and imports included), with a cache folder of its own:

- full build of the demo plans (plans/*.yaml) with ``--no-cache``, with and
  without the field cards;
- a first build that fills the cache, then no-change rebuilds into the same
  folder (best of 3): every net's compiled data comes from the compile cache and
  its cards and pages from the previous site, checked against recorded hashes;
  the site folder is not rewritten;
- a rebuild after one plan was edited (its net is compiled and rendered again,
  the other taken from the previous site).

It prints the no-change rebuild as a fraction of the full ``--no-cache`` build
(goal: under 15 %). A synthetic repository of ``--plans`` starter variations
shows the compile cache alone (read and compile, no rendering).

Run:  .venv/bin/python bench/bench_rebuild.py [--plans N]
"""

from __future__ import annotations

import argparse
import glob
import os
import random
import shutil
import subprocess
import sys
import tempfile
import time

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
sys.path.insert(0, ROOT)

GOAL = 0.15


def planpack(args: list[str], cache: str) -> float:
    """Seconds one ``planpack`` command takes in a fresh process (it must succeed)."""
    env = {**os.environ, "PLANPACK_CACHE_DIR": cache, "PYTHONPATH": ROOT, "NO_COLOR": "1"}
    env.pop("SOURCE_DATE_EPOCH", None)
    t = time.perf_counter()
    r = subprocess.run([sys.executable, "-m", "planpack", *args], env=env, capture_output=True, text=True, cwd=ROOT)
    took = time.perf_counter() - t
    if r.returncode != 0:
        raise SystemExit(f"planpack {' '.join(args)} failed (exit {r.returncode}):\n{r.stderr[-3000:]}")
    return took


def demo_builds(work: str) -> dict:
    plans = os.path.join(work, "plans")
    os.mkdir(plans)
    for p in sorted(glob.glob(os.path.join(ROOT, "plans", "*.yaml"))):
        shutil.copy(p, plans)
    cache = os.path.join(work, "cache")
    out = {}
    out["full"] = planpack(["build", plans, "--out", os.path.join(work, "full"), "-q", "--no-cache"], cache)
    out["full_no_cards"] = planpack(["build", plans, "--out", os.path.join(work, "nocards"), "-q", "--no-cache",
                                     "--no-cards"], cache)
    site = os.path.join(work, "site")
    out["first"] = planpack(["build", plans, "--out", site, "-q"], cache)
    out["same"] = min(planpack(["build", plans, "--out", site, "-q"], cache) for _ in range(3))
    edited = sorted(glob.glob(os.path.join(plans, "*.yaml")))[0]
    with open(edited, "a", encoding="utf-8") as fh:
        fh.write("# edited\n")
    out["one_edited"] = planpack(["build", plans, "--out", site, "-q"], cache)
    out["startup"] = min(_startup() for _ in range(3))
    return out


def _startup() -> float:
    t = time.perf_counter()
    subprocess.run([sys.executable, "-m", "planpack", "--version"], check=True, capture_output=True, cwd=ROOT)
    return time.perf_counter() - t


# ------------------------------------------------------------- the compile cache alone, on many plans

def synthetic_repository(folder: str, n: int, seed: int = 11) -> list[str]:
    """n starter variations in folder; returns their paths (sorted)."""
    from planpack.workflow.starter import starter_plan

    rng = random.Random(seed)
    paths = []
    for i in range(n):
        text = starter_plan(f"synthetic-net-{i:02d}")
        dlat, dlon = rng.uniform(-0.3, 0.3), rng.uniform(-0.4, 0.4)
        text = text.replace("at: {lat: 57.0060, lon: -3.3970}", f"at: {{lat: {57.006 + dlat:.4f}, lon: {-3.397 + dlon:.4f}}}")
        text = text.replace("power_w: 100", f"power_w: {rng.choice([50, 100, 150, 400])}")
        text = text.replace("khz: 5410", f"khz: {5410 + rng.randrange(-40, 41, 5)}")
        text = text.replace("ssn: [40, 90]", f"ssn: [{rng.randrange(20, 60)}, {rng.randrange(70, 130)}]")
        path = os.path.join(folder, f"net-{i:02d}.yaml")
        with open(path, "w", encoding="utf-8") as fh:
            fh.write(text)
        paths.append(path)
    return paths


def compile_all(paths: list[str], cache_dir: str) -> float:
    from planpack.plan import read_plan
    from planpack.workflow.cache import cached_compile

    t = time.perf_counter()
    for p in paths:
        r = read_plan(p)
        if not r.ok:
            raise SystemExit(f"{p}: the plan has errors; the benchmark needs clean plans")
        cached_compile(r.plan, cache_dir=cache_dir)
    return time.perf_counter() - t


def repository_figures(n: int) -> dict:
    from planpack.antennas import clear_cache

    with tempfile.TemporaryDirectory(prefix="planpack-bench-repo-") as tmp:
        paths = synthetic_repository(tmp, n)
        cache = os.path.join(tmp, "cache")
        clear_cache()
        full = compile_all(paths, cache)
        same = min(compile_all(paths, cache) for _ in range(3))
    return {"n": n, "full": full, "same": same}


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--plans", type=int, default=30, help="plans in the synthetic repository (default 30)")
    args = ap.parse_args()
    with tempfile.TemporaryDirectory(prefix="planpack-bench-rebuild-") as work:
        d = demo_builds(work)
    fraction = d["same"] / d["full"]
    print("demo plans (plans/*.yaml), each build a fresh `python -m planpack build` process:")
    print(f"  full build, --no-cache, with cards      {d['full']:7.2f} s")
    print(f"  full build, --no-cache, without cards   {d['full_no_cards']:7.2f} s   "
          f"(cards: {d['full'] - d['full_no_cards']:.2f} s, {1 - d['full_no_cards'] / d['full']:.0%} of the build)")
    print(f"  first build filling the cache           {d['first']:7.2f} s")
    print(f"  no-change rebuild (best of 3)           {d['same']:7.2f} s   "
          f"= {fraction:.1%} of the full build (goal: under {GOAL:.0%}: {'met' if fraction < GOAL else 'NOT met'})")
    print(f"  rebuild after one plan was edited       {d['one_edited']:7.2f} s")
    print(f"  python start-up (planpack --version)    {d['startup']:7.2f} s   (paid by every command)")
    r = repository_figures(args.plans)
    print(f"synthetic repository, {r['n']} plans, read and compile only (the compile cache):")
    print(f"  empty cache   {r['full']:7.2f} s ({r['full'] / r['n']:.2f} s a plan)")
    print(f"  all cached    {r['same']:7.3f} s ({r['same'] / r['n'] * 1000:.1f} ms a plan)")


if __name__ == "__main__":
    main()
