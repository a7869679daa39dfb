"""Exit codes and output streams of `planpack check` and `planpack schema`, through the real command line."""

from __future__ import annotations

import json
import os
import subprocess
import sys

import pytest

from tests.plan.conftest import BASE

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))


def run(*args, env=None):
    e = dict(os.environ, **(env or {}))
    return subprocess.run([sys.executable, "-m", "planpack", *args], capture_output=True, text=True, cwd=ROOT, env=e, timeout=300)


@pytest.fixture
def plans(tmp_path):
    good = tmp_path / "good.yaml"
    good.write_text(BASE)
    bad = tmp_path / "bad.yaml"
    bad.write_text(BASE.replace("power_w: 20", "power_w: 1,000"))
    warn = tmp_path / "warn.yaml"
    warn.write_text(BASE.replace("antennas:\n", "antennas:\n  spare:\n    kind: whip\n    length_m: 3\n    height_m: 1\n"))
    return good, bad, warn


def test_clean_plan_exits_0(plans):
    r = run("check", "--no-analysis", str(plans[0]))
    assert r.returncode == 0, r.stderr
    assert r.stdout == ""


def test_plan_with_errors_exits_1_and_prints_position(plans):
    r = run("check", "--no-analysis", str(plans[1]))
    assert r.returncode == 1
    line = BASE.splitlines().index("    power_w: 20") + 1
    assert f"{plans[1]}:{line}:14: error number-comma: stations.ridge.power_w" in r.stderr
    assert "Traceback" not in r.stderr


def test_warnings_pass_unless_strict(plans):
    assert run("check", "--no-analysis", str(plans[2])).returncode == 0
    assert run("check", "--no-analysis", "--strict", str(plans[2])).returncode == 1


def test_missing_file_exits_2(tmp_path):
    r = run("check", str(tmp_path / "absent.yaml"))
    assert r.returncode == 2 and "no such file" in r.stderr and "Traceback" not in r.stderr


def test_bad_usage_exits_2():
    assert run("check").returncode == 2
    assert run("frobnicate").returncode == 2


def test_help_exits_0():
    r = run("check", "--help")
    assert r.returncode == 0 and "--format" in r.stdout


def test_json_format(plans):
    r = run("check", "--no-analysis", "--format", "json", str(plans[1]), str(plans[0]))
    assert r.returncode == 1
    data = json.loads(r.stdout)
    assert {tuple(sorted(d)) for d in data} == {("code", "column", "file", "key", "line", "message", "severity")}
    assert data[0]["code"] == "number-comma" and data[0]["key"] == "stations.ridge.power_w"


def test_directory_checks_every_yaml_sorted(plans, tmp_path):
    r = run("check", "--no-analysis", "--format", "json", str(tmp_path))
    files = [d["file"] for d in json.loads(r.stdout)]
    assert files == sorted(files) and str(plans[1]) in files and str(plans[2]) in files


def test_no_colour_when_not_a_terminal(plans):
    r = run("check", "--no-analysis", str(plans[1]))
    assert "\x1b[" not in r.stderr


def test_demo_plans_check_clean():
    r = run("check", "plans/")
    assert r.returncode == 0, r.stderr


def test_schema_prints_json_schema():
    r = run("schema")
    assert r.returncode == 0
    assert json.loads(r.stdout)["title"] == "planpack net plan"


def test_internal_error_is_one_line(monkeypatch, capsys):
    from planpack import cli
    from planpack.commands import codes

    def boom(args):
        raise RuntimeError("simulated")

    monkeypatch.setattr(codes, "run", boom)
    assert cli.main(["codes"]) == cli.EXIT_INTERNAL
    err = capsys.readouterr().err
    assert "internal error" in err and "Traceback" not in err
    assert len(err.strip().splitlines()) == 1


def test_check_prints_analysis_warnings_for_demo():
    r = run("check", "plans/southern-alps-sar.yaml")
    assert r.returncode == 0
    assert "warning channel-gap" in r.stderr and "warning wasted-channel" in r.stderr
    assert run("check", "--strict", "plans/southern-alps-sar.yaml").returncode == 1


def test_every_command_module_is_registered_with_the_same_interface():
    """A command is one module in planpack/commands/ plus its name in COMMANDS; nothing else."""
    import importlib
    import pkgutil

    import planpack.commands
    from planpack import cli
    from planpack.commands import COMMANDS

    modules = {m.name for m in pkgutil.iter_modules(planpack.commands.__path__)} - {"common"}
    assert modules == set(COMMANDS)
    for name in COMMANDS:
        mod = importlib.import_module(f"planpack.commands.{name}")
        assert mod.NAME == name and mod.HELP and mod.DESCRIPTION
        assert callable(mod.add_arguments) and callable(mod.run)
    sub = next(a for a in cli.build_parser()._actions if a.choices and "check" in a.choices)
    assert list(sub.choices) == list(COMMANDS)


def test_help_imports_nothing_heavy():
    probe = ("import sys\nfrom planpack import cli\ntry:\n    cli.main(['--help'])\nexcept SystemExit:\n    pass\n"
             "print(sorted(m for m in ('numpy', 'scipy', 'yaml', 'reportlab', 'jinja2') if m in sys.modules))")
    r = subprocess.run([sys.executable, "-c", probe], capture_output=True, text=True, cwd=ROOT, timeout=120)
    assert r.stdout.strip().splitlines()[-1] == "[]", r.stdout + r.stderr
