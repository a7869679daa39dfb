"""Benchmark: full and no-change rebuilds through the compile cache.

Two repositories: the demo plans (plans/*.yaml) and a synthetic repository of
30 plans made from small variations of the ``planpack new`` starter (each its
own net id, stations moved a little, other powers and channels), written to a
temporary folder. For each it prints

- full: read every plan and compile it with an empty cache (the in-process
  antenna solution cache cleared first), writing the cache entries;
- no change: read every plan again and answer it from the cache (what a
  rebuild does when no plan changed); the target for 30 plans is under 1 s;
- one edited: one plan of the repository changed, the rest from the cache;
- site: rendering the site of every compiled plan (planpack.publish.site), when
  the site renderer is installed, and the cost of starting Python with the
  compile modules imported, which a command line run pays on top.

Run:  .venv/bin/python bench/bench_rebuild.py [--plans N]
"""

from __future__ import annotations

import argparse
import glob
import os
import random
import subprocess
import sys
import tempfile
import time

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
sys.path.insert(0, ROOT)

from planpack.antennas import clear_cache  # noqa: E402
from planpack.plan import read_plan  # noqa: E402
from planpack.workflow.cache import cached_compile  # noqa: E402
from planpack.workflow.starter import starter_plan  # noqa: E402


def synthetic_repository(folder: str, n: int, seed: int = 11) -> list[str]:
    """n starter variations in folder; returns their paths (sorted)."""
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


def rebuild(paths: list[str], cache_dir: str) -> tuple[float, list]:
    t = time.perf_counter()
    compiled = []
    for p in paths:
        r = read_plan(p)
        if not r.ok:
            raise SystemExit(f"{p}: the plan has errors; the benchmark needs clean plans")
        compiled.append(cached_compile(r.plan, cache_dir=cache_dir))
    return time.perf_counter() - t, compiled


def site_time(compiled: list) -> float | None:
    try:
        from planpack.publish import site
    except ImportError:
        return None
    t = time.perf_counter()
    site.render_site([c.data for c in compiled])
    return time.perf_counter() - t


def import_time() -> float:
    t = time.perf_counter()
    subprocess.run([sys.executable, "-c", "import planpack.cli, planpack.plan, planpack.compile, planpack.workflow.cache"],
                   check=True, cwd=ROOT)
    return time.perf_counter() - t


def _commit(folder: str) -> bool:
    """Put the synthetic plans in a git repository, as planners keep them; False without git."""
    env = {**os.environ, "GIT_AUTHOR_NAME": "bench", "GIT_AUTHOR_EMAIL": "bench@example.invalid",
           "GIT_COMMITTER_NAME": "bench", "GIT_COMMITTER_EMAIL": "bench@example.invalid",
           "GIT_CONFIG_GLOBAL": os.devnull, "GIT_CONFIG_SYSTEM": os.devnull}
    try:
        for cmd in (["init", "-q"], ["add", "."], ["commit", "-q", "-m", "plans"]):
            subprocess.run(["git", *cmd], cwd=folder, check=True, capture_output=True, env=env)
    except (OSError, subprocess.CalledProcessError):
        return False
    return True


def report(name: str, paths: list[str]) -> None:
    with tempfile.TemporaryDirectory(prefix="planpack-bench-cache-") as cache_dir:
        clear_cache()
        full, _ = rebuild(paths, cache_dir)
        same = min(rebuild(paths, cache_dir)[0] for _ in range(3))
        # one plan edited (a comment is enough to change its bytes), the others unchanged
        with open(paths[0], "a", encoding="utf-8") as fh:
            fh.write("# edited\n")
        clear_cache()
        one, compiled = rebuild(paths, cache_dir)
        site = site_time(compiled)
    n = len(paths)
    print(f"{name}: {n} plan{'s' * (n != 1)}")
    print(f"  full rebuild (empty cache)      {full:8.2f} s   ({full / n:.2f} s a plan)")
    print(f"  no-change rebuild (all cached)  {same:8.3f} s   ({same / n * 1000:.1f} ms a plan)")
    print(f"  one plan edited                 {one:8.2f} s")
    if site is not None:
        print(f"  site rendering, all plans       {site:8.2f} s   (not cached)")


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--plans", type=int, default=30, help="plans in the synthetic repository (default 30)")
    args = ap.parse_args()
    print(f"python start-up with the compile modules imported: {import_time():.2f} s (paid once per command)")
    with tempfile.TemporaryDirectory(prefix="planpack-bench-demo-") as tmp:
        demo = []
        for p in sorted(glob.glob(os.path.join(ROOT, "plans", "*.yaml"))):
            demo.append(os.path.join(tmp, os.path.basename(p)))
            with open(p, "rb") as src, open(demo[-1], "wb") as dst:
                dst.write(src.read())
        report("demo plans", demo)
    with tempfile.TemporaryDirectory(prefix="planpack-bench-repo-") as tmp:
        paths = synthetic_repository(tmp, args.plans)
        in_git = _commit(tmp)
        report("synthetic repository" + (" (in git: revision stamps from git log)" if in_git else ""), paths)
    print("target: no-change rebuild of the 30-plan repository under 1 s")


if __name__ == "__main__":
    main()
