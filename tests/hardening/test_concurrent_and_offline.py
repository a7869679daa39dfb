"""Two builds into the same --out at once end with one complete site; a full build of the demo plans
needs nothing from the network."""

from __future__ import annotations

import shutil
import subprocess
import time

from tests.hardening.conftest import REPO, beside, manifest, popen_cli, run_cli, small_plan


def test_two_builds_at_once_end_with_one_complete_site(tmp_path):
    plans = {}
    for v in "AB":
        plans[v] = tmp_path / f"plans-{v}" / "net.yaml"
        plans[v].parent.mkdir()
        plans[v].write_text(small_plan(title=f"Concurrent net {v}"), encoding="utf-8")
    complete = {}
    for v in "AB":  # what each build alone publishes
        ref = tmp_path / f"ref-{v}" / "site"
        assert run_cli(["build", str(plans[v]), "--out", str(ref), "-q"], cwd=tmp_path).returncode == 0
        complete[v] = manifest(ref)
    out = tmp_path / "share" / "site"
    for round_ in range(2):
        # slowed writes: without the lock the two publishing steps would overlap for a good second
        procs = {v: popen_cli(["build", str(plans[v]), "--out", str(out)], cwd=tmp_path, PLANPACK_TEST_SLOW_WRITES="0.05")
                 for v in "AB"}
        started = time.monotonic()
        errs = {v: p.communicate(timeout=180)[1] for v, p in procs.items()}
        codes = {v: p.returncode for v, p in procs.items()}
        assert codes == {"A": 0, "B": 0}, errs
        assert all("planpack-test: publishing" in e for e in errs.values())
        assert time.monotonic() - started < 170
        assert manifest(out) in (complete["A"], complete["B"]), f"round {round_}: a mix of two builds"
        assert beside(out) == []


def test_a_full_build_with_the_network_blocked(tmp_path):
    """Every internet socket fails and is logged; inside a fresh network namespace too when the system allows."""
    out = tmp_path / "site"
    args = ["build", str(REPO / "plans"), "--out", str(out), "-q"]
    prefix = []
    if shutil.which("unshare") and subprocess.run(["unshare", "-n", "true"], capture_output=True).returncode == 0:
        prefix = ["unshare", "-n"]  # no interface but loopback: a real connection could not succeed anyway
    from tests.hardening.conftest import PYTHON, WRAPPER, env

    r = subprocess.run(prefix + [PYTHON, "-c", WRAPPER, *args], cwd=tmp_path, env=env(PLANPACK_TEST_NO_NET="1"),
                       capture_output=True, text=True, timeout=300)
    assert r.returncode == 0, r.stderr[-3000:]
    assert "network attempt" not in r.stderr, r.stderr
    for net in ("danube-relief", "southern-alps-sar"):
        assert (out / net / "index.html").is_file() and (out / net / "plan.json").is_file()
        assert list((out / net / "cards").glob("*.pdf"))


def test_the_network_guard_itself_blocks_and_logs(tmp_path):
    """The guard the test above trusts: a connection attempt under it fails and is logged."""
    from tests.hardening.conftest import PYTHON, WRAPPER, env

    probe = WRAPPER.replace("from planpack import cli\nsys.exit(cli.main(sys.argv[1:]))",
                            "import urllib.request\ntry:\n    urllib.request.urlopen('http://192.0.2.1/', timeout=1)\n"
                            "except OSError as e:\n    print('blocked', e)\n")
    assert probe != WRAPPER
    r = subprocess.run([PYTHON, "-c", probe], env=env(PLANPACK_TEST_NO_NET="1"), capture_output=True, text=True, timeout=60)
    assert "network attempt" in r.stderr and "blocked" in r.stdout
