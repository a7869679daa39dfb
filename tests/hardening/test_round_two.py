"""Hardening, round two: what an independent tester found with hostile inputs of their own.

Each test names its finding (the numbers of the round's report). Every case
runs the real command line, in a fresh process where the order of imports or
the exit code matters.
"""

from __future__ import annotations

import os
import re
import subprocess
import sys

import pytest

from planpack import cli
from planpack.plan.diagnostics import printable
from tests.hardening.conftest import REPO, env, run_cli, small_plan, snapshot


def git(cwd, *args):
    e = {**os.environ, "GIT_CONFIG_GLOBAL": os.devnull, "GIT_CONFIG_SYSTEM": os.devnull, "GIT_AUTHOR_NAME": "t",
         "GIT_AUTHOR_EMAIL": "t@example.invalid", "GIT_COMMITTER_NAME": "t", "GIT_COMMITTER_EMAIL": "t@example.invalid"}
    subprocess.run(["git", *args], cwd=cwd, env=e, check=True, capture_output=True)


# ------------------------------------------------------------ 5: --force and what it may delete

@pytest.fixture
def world(tmp_path, cached_compile, monkeypatch):
    """tmp/users/{home (the home folder), guest/}, tmp/work/{notes, project/.git}, and a plan elsewhere."""
    home = tmp_path / "users" / "home"
    home.mkdir(parents=True)
    (home / "letters.txt").write_text("personal\n")
    (tmp_path / "users" / "guest").mkdir()
    project = tmp_path / "work" / "deep" / "project"
    (project / ".git").mkdir(parents=True)
    (project / "src.txt").write_text("code\n")
    (tmp_path / "work" / "notes.txt").write_text("notes\n")
    plans = tmp_path / "plans"
    plans.mkdir()
    plan = plans / "net.yaml"
    plan.write_text(small_plan(), encoding="utf-8")
    monkeypatch.setenv("HOME", str(home))
    monkeypatch.chdir(plans)
    return {"tmp": tmp_path, "plan": plan, "users": tmp_path / "users", "work": tmp_path / "work"}


@pytest.mark.parametrize("target,words", [
    ("users", ["holds your home folder", "even with --force"]),
    ("work", ["holds the git work tree", "even with --force"]),
])
def test_force_never_deletes_a_folder_holding_home_or_a_work_tree(world, capsys, target, words):
    out = world[target]
    before = snapshot(world["tmp"])
    assert cli.main(["build", str(world["plan"]), "--out", str(out), "-q", "--no-cards", "--force"]) == 2
    err = capsys.readouterr().err
    assert all(w in err for w in words) and "Traceback" not in err, err
    assert snapshot(world["tmp"]) == before


def test_force_still_replaces_an_ordinary_foreign_folder(world, capsys):
    out = world["tmp"] / "old-site"
    out.mkdir()
    (out / "stale.html").write_text("old")
    assert cli.main(["build", str(world["plan"]), "--out", str(out), "-q", "--no-cards", "--force"]) == 0
    assert not (out / "stale.html").exists() and (out / "index.html").is_file()


# ------------------------------------------------------------ 7: diff with hostile REV:path

@pytest.fixture(scope="module")
def repo(tmp_path_factory):
    root = tmp_path_factory.mktemp("diff-repo")
    (root / "plans").mkdir()
    (root / "plans" / "net.yaml").write_text(small_plan(), encoding="utf-8")
    (root / "secret.txt").write_text("secret\n")
    git(root, "init", "-q")
    git(root, "add", ".")
    git(root, "commit", "-q", "-m", "plans")
    return root


@pytest.mark.parametrize("old,words", [
    ("--output=written-by-git.txt:plans/net.yaml", ["cannot start with '-'"]),
    ("-Osecret.txt:plans/net.yaml", ["cannot start with '-'"]),
    ("--no-index:plans/net.yaml", ["cannot start with '-'"]),
    ("HEAD:plans/", ["names a folder"]),
    ("HEAD:plans", ["is a folder at that revision"]),
    ("HEAD:.", ["names a folder"]),
    ("HEAD:plans/missing.yaml", ["git cannot show that file"]),
    (":plans/net.yaml", ["no revision"]),
    ("HEAD\x1b[2J:plans/net.yaml", ["control character"]),
])
def test_diff_refuses_hostile_revisions_cleanly(repo, old, words):
    before = snapshot(repo)
    r = run_cli(["diff", "--no-cache", "--", old, "plans/net.yaml"], cwd=repo)  # '--': argparse passes it on
    assert r.returncode == 2, r.stdout + r.stderr
    assert all(w in r.stderr for w in words), r.stderr
    assert "Traceback" not in r.stderr and "internal error" not in r.stderr
    assert snapshot(repo) == before  # git wrote nothing (no --output file)
    assert not (repo / "written-by-git.txt").exists()


def test_diff_of_a_revision_still_works(repo):
    r = run_cli(["diff", "HEAD:plans/net.yaml", "plans/net.yaml"], cwd=repo)
    assert r.returncode == 0, r.stderr
    assert "no change" in r.stdout


# ------------------------------------------------------------ 10: --format github cannot be steered

ANNOTATION = re.compile(r"::(error|warning) file=([^,:\r\n]*),line=(\d+),col=(\d+),title=([^,:\r\n]*)::([^\r\n]*)")
CONTROL = re.compile("[\x00-\x1f\x7f-\x9f]")


def _unescape(text: str) -> str:
    return text.replace("%3A", ":").replace("%2C", ",").replace("%0D", "\r").replace("%0A", "\n").replace("%25", "%")


@pytest.mark.parametrize("name", [
    "net\n::stop-commands::pause\n.yaml",
    "net,title=owned::x.yaml",
    "net%0A::error file=x::y.yaml",
    "n\x1bet\x07\r.yaml",
])
def test_github_annotations_cannot_be_steered_by_a_file_name_or_key(tmp_path, name):
    text = small_plan().replace("  ops:\n", '  ops:\n    "evil\\e]0;x\\a::warning::k": 1\n    "a,title=b::c": 2\n', 1)
    assert "evil" in text
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    r = subprocess.run([sys.executable, "-m", "planpack", "check", "--no-analysis", "--format", "github", name],
                       cwd=tmp_path, env=env(), capture_output=True, text=True, timeout=120)
    assert r.returncode == 1, r.stderr
    lines = r.stdout.split("\n")
    assert lines[-1] == ""
    lines = lines[:-1]
    assert len(lines) == 2  # one per unknown key: nothing injected a line
    for line in lines:
        m = ANNOTATION.fullmatch(line)
        assert m, repr(line)
        assert not CONTROL.search(line), repr(line)
        assert _unescape(m.group(2)) == printable(name)  # the name, control characters shown escaped
        assert m.group(5) == "unknown-key"
        assert "\\x1b" in m.group(6) or "a,title=b::c" in _unescape(m.group(6))


def test_github_annotation_escapes_each_field():
    from planpack.commands.common import github_annotation
    from planpack.plan.diagnostics import Diagnostic

    d = Diagnostic("a,b:c%\n.yaml", 3, 4, "error", "unknown-key", "k", "50% of x\r\n::warning::y \x1b[31m")
    line = github_annotation(d)
    assert line == ("::error file=a%2Cb%3Ac%25\\x0a.yaml,line=3,col=4,title=unknown-key::"
                    "50%25 of x\\x0d\\x0a::warning::y \\x1b[31m")


# ------------------------------------------------------------ 11: SOURCE_DATE_EPOCH

PROBE = """
import sys
from planpack import cli
code = cli.main(sys.argv[1:])
heavy = sorted(m for m in ("numpy", "yaml", "scipy", "reportlab", "planpack.plan", "planpack.compile") if m in sys.modules)
print("heavy:" + ",".join(heavy), file=sys.stderr)
sys.exit(code)
"""


@pytest.mark.parametrize("value", ["99999999999999999999", "253402300800", "²", "1e9", "-1", " 1", "1.5", "", "０"])
def test_bad_source_date_epoch_is_a_usage_error_before_any_import(tmp_path, value):
    plan = tmp_path / "net.yaml"
    plan.write_text(small_plan(), encoding="utf-8")
    for args in (["build", str(plan), "--out", str(tmp_path / "site")], ["check", str(plan)]):
        r = subprocess.run([sys.executable, "-c", PROBE, *args], cwd=tmp_path, env=env(SOURCE_DATE_EPOCH=value),
                           capture_output=True, text=True, timeout=120)
        assert r.returncode == 2, r.stderr
        assert "SOURCE_DATE_EPOCH" in r.stderr and "Traceback" not in r.stderr
        assert "heavy:\n" in r.stderr, r.stderr  # refused before numpy, the YAML reader or the compiler
    assert not (tmp_path / "site").exists()


@pytest.mark.parametrize("value,date", [("0", "1970-01-01"), ("1893456000", "2030-01-01"), ("253402300799", "9999-12-31")])
def test_sane_source_date_epoch_is_used(tmp_path, value, date):
    from planpack.revision import plan_revision

    plan = tmp_path / "net.yaml"
    plan.write_text(small_plan(), encoding="utf-8")
    r = run_cli(["check", "--no-analysis", str(plan)], cwd=tmp_path, SOURCE_DATE_EPOCH=value)
    assert r.returncode == 0, r.stderr
    old = os.environ.get("SOURCE_DATE_EPOCH")
    os.environ["SOURCE_DATE_EPOCH"] = value
    try:
        assert plan_revision(str(plan), "0" * 64).date == date
    finally:
        if old is None:
            del os.environ["SOURCE_DATE_EPOCH"]
        else:
            os.environ["SOURCE_DATE_EPOCH"] = old


# ------------------------------------------------------------ 12: check counts plans with errors

def test_check_counts_a_plan_whose_only_error_comes_from_the_analysis(tmp_path):
    # an inverted V whose legs would end in the ground: the plan reads clean, the antenna cannot be solved
    text = small_plan().replace("    kind: dipole\n", "    kind: inverted-v\n    apex_deg: 90\n", 1)
    text = re.sub(r"    height_m: [0-9.]+\n", "    height_m: 3\n", text, count=1)
    path = tmp_path / "net.yaml"
    path.write_text(text, encoding="utf-8")
    r = run_cli(["check", str(path)], cwd=tmp_path)
    assert r.returncode == 1, r.stderr
    errors = [ln for ln in r.stderr.splitlines() if ": error " in ln]
    assert len(errors) == 1, r.stderr
    assert "checked 1 plan: 1 with errors, 1 error," in r.stderr, r.stderr


def test_repository_root_is_importable_for_the_probe():
    assert (REPO / "planpack" / "cli.py").is_file()


# ------------------------------------------------------------ 3: size, bounded

def _capped_check(path, *extra, cwd):
    from tests.hardening.test_cli_hostile import check

    return check([str(path)], *extra, cwd=cwd)  # a fresh process under a 1 GiB address-space cap


def test_700_stations_all_pairs_is_refused_up_front_with_the_limit(tmp_path):
    """Finding 3: 132 KB, 700 stations, links: all ran 29 s into a MemoryError (exit 3)."""
    from tests.hardening.bigplan import mesh_plan

    text = mesh_plan(700, 10)
    path = tmp_path / "mesh.yaml"
    path.write_text(text, encoding="utf-8")
    r = _capped_check(path, cwd=tmp_path)  # with the analysis: refused before it starts
    assert r.returncode == 1, r.stderr[-2000:]
    line = text.splitlines().index("  links: all") + 1
    assert f"{path.name}:{line}:10: error plan-too-large: net.links: 244650 links" in r.stderr, r.stderr[-2000:]
    assert "at most 2000 links" in r.stderr and "Traceback" not in r.stderr


def test_300_stations_all_pairs_is_refused_too(tmp_path):
    from tests.hardening.bigplan import mesh_plan

    path = tmp_path / "mesh.yaml"
    path.write_text(mesh_plan(300, 10), encoding="utf-8")
    r = _capped_check(path, "--no-analysis", cwd=tmp_path)
    assert r.returncode == 1 and "44850 links" in r.stderr and "plan-too-large" in r.stderr


def test_ten_thousand_unknown_references_are_answered_with_bounded_hints(tmp_path):
    """Finding 3: 10 000 link pairs naming unknown stations took 811 s (difflib once per reference)."""
    from tests.hardening.bigplan import big_plan

    pairs = "".join(f"    - [ghost-{i:05d}, phantom-{i:05d}]\n" for i in range(10_000))
    path = tmp_path / "unknown.yaml"
    path.write_text(big_plan(2000, 10).replace("  links: hub\n", "  links:\n" + pairs), encoding="utf-8")
    r = _capped_check(path, "--no-analysis", cwd=tmp_path)
    assert r.returncode == 1 and "expected a list of 1 to 2000 items, got 10000" in r.stderr, r.stderr[-2000:]
    # within the bound: 2000 pairs, 4000 unknown names, and 2000 stations naming a misspelt antenna
    text = big_plan(2000, 10).replace("  links: hub\n", "  links:\n" + pairs[: pairs.index("    - [ghost-02000")])
    text = text.replace("antenna: [night-wire, day-wire]", "antenna: [night-wyre, day-wire]")
    path.write_text(text, encoding="utf-8")
    r = _capped_check(path, "--no-analysis", cwd=tmp_path)
    assert r.returncode == 1, r.stderr[-2000:]
    unknown = [ln for ln in r.stderr.splitlines() if "unknown-reference" in ln]
    assert len(unknown) == 4000 + 1333
    hinted = [ln for ln in unknown if "did you mean" in ln]
    assert 0 < len(hinted) < len(unknown)
    assert all("did you mean 'night-wire'" in ln for ln in unknown if "night-wyre" in ln)  # one look-up, reused


# ------------------------------------------------------------ 4: values the schema accepts, analysed without a crash

def test_a_low_solar_flux_is_taken_as_sunspot_number_zero(tmp_path):
    """Finding 4: solar: {f107: 60} became a negative sunspot number (exit 3)."""
    from planpack.plan import read_plan
    from planpack.predictions import ssn_levels

    path = tmp_path / "net.yaml"
    path.write_text(small_plan().replace("solar: {ssn: 60}", "solar: {f107: [60, 63]}"), encoding="utf-8")
    plan = read_plan(str(path)).plan
    assert ssn_levels(plan) == [0.0, 0.0]
    r = run_cli(["check", "-q", str(path)], cwd=tmp_path)
    assert r.returncode == 0, r.stderr[-2000:]


@pytest.mark.parametrize("valid,bad", [
    ("{from: 2027-03-01, to: 9999-12-31}", "to"),
    ("{from: 0001-01-01, to: 0001-03-01}", "from"),
    ("{from: 2100-12-01, to: 2101-01-31}", "to"),
])
def test_a_validity_beyond_the_horizon_is_a_positioned_error(tmp_path, valid, bad):
    text = small_plan()
    text = re.sub(r"valid: \{[^}]*\}", f"valid: {valid}", text)
    path = tmp_path / "net.yaml"
    path.write_text(text, encoding="utf-8")
    r = run_cli(["check", str(path)], cwd=tmp_path)
    assert r.returncode == 1, r.stderr
    line = next(i for i, ln in enumerate(text.splitlines(), 1) if "valid:" in ln)
    assert re.search(rf"{line}:\d+: error out-of-range: net\.valid\.{bad}: expected a date from 1900-01-01 to 2100-12-31",
                     r.stderr), r.stderr
    assert "Traceback" not in r.stderr and "internal error" not in r.stderr


# ------------------------------------------------------------ 8: what build refuses, check reports first

def test_a_long_custom_mode_id_is_refused_by_check_with_a_position(tmp_path):
    """Finding 8: a 39-character mode id checked clean, then build failed with 'cards-layout' and no position."""
    mode = "m" + "x" * 38
    text = small_plan().replace("mode: usb}", f"mode: {mode}}}", 1) + f"modes:\n  {mode}: {{snr_db: 10, bandwidth_hz: 3000}}\n"
    path = tmp_path / "net.yaml"
    path.write_text(text, encoding="utf-8")
    r = run_cli(["check", "--no-analysis", str(path)], cwd=tmp_path)
    assert r.returncode == 1
    assert re.search(r"net\.yaml:\d+:\d+: error out-of-range: channels\[0\]\.mode: expected text of at most 12", r.stderr)
    assert re.search(rf"net\.yaml:\d+:\d+: error out-of-range: modes\.{mode}: expected text of at most 12", r.stderr)


def test_check_reports_every_card_refusal_build_would_make(tmp_path):
    """Long channel ids, notes and four antennas a station: whatever the card renderer cannot lay out, check
    reports first with a position, and build refuses with the same positioned diagnostic."""
    from tests.hardening.cardplan import crowded_plan

    for i, (size, text) in enumerate(crowded_plan()):
        path = tmp_path / f"crowded-{i}.yaml"
        path.write_text(text, encoding="utf-8")
        checked = run_cli(["check", str(path)], cwd=tmp_path, timeout=600)
        built = run_cli(["build", str(path), "--out", str(tmp_path / f"site-{i}"), "-q"], cwd=tmp_path, timeout=600)
        assert "Traceback" not in checked.stderr + built.stderr
        refusals = [ln for ln in built.stderr.splitlines() if "error cards-layout" in ln]
        if built.returncode == 0:
            assert "cards-layout" not in checked.stderr, (size, checked.stderr[-2000:])
            continue
        assert built.returncode == 1 and len(refusals) == 1, (size, built.stderr[-2000:])
        assert re.match(rf"{re.escape(str(path))}:\d+:\d+: error cards-layout: net\.card_size: ", refusals[0])
        assert checked.returncode == 1 and refusals[0] in checked.stderr, (size, checked.stderr[-2000:])
