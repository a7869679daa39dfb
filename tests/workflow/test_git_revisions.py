"""planpack diff REV:path against the work tree, in a temporary git repository."""

from __future__ import annotations

import shutil
import subprocess

import pytest
from tests.workflow.conftest import run_cli, write
from tests.workflow.plans import TINY, variant

pytestmark = pytest.mark.skipif(shutil.which("git") is None, reason="git is not installed")
GIT_ENV = {"GIT_AUTHOR_NAME": "Test Planner", "GIT_AUTHOR_EMAIL": "planner@example.invalid",
           "GIT_COMMITTER_NAME": "Test Planner", "GIT_COMMITTER_EMAIL": "planner@example.invalid",
           "GIT_CONFIG_GLOBAL": "/dev/null", "GIT_CONFIG_SYSTEM": "/dev/null"}


def git(repo, *args):
    import os

    subprocess.run(["git", *args], cwd=repo, check=True, capture_output=True, env={**os.environ, **GIT_ENV})


@pytest.fixture
def repo(tmp_path, shared_cache):
    (tmp_path / "plans").mkdir()
    write(tmp_path / "plans", "net.yaml", TINY)
    git(tmp_path, "init", "-q")
    git(tmp_path, "add", "plans/net.yaml")
    git(tmp_path, "commit", "-q", "-m", "first plan")
    return tmp_path


def test_head_against_an_edited_work_tree(repo):
    write(repo / "plans", "net.yaml", variant(("address: TNYCMP", "address: TNYCAMP")))
    # from the repository root, and from inside the plan's folder
    code, out, err = run_cli(["diff", "HEAD:plans/net.yaml", "plans/net.yaml"], repo)
    assert code == 1, err
    assert "HEAD:plans/net.yaml → plans/net.yaml" in out and "self address: TNYCMP → TNYCAMP" in out
    code, out, err = run_cli(["diff", "HEAD:net.yaml", "net.yaml"], repo / "plans")
    assert code == 1, err and "TNYCAMP" in out


def test_unchanged_work_tree_is_no_change(repo):
    code, out, err = run_cli(["diff", "HEAD:plans/net.yaml", "plans/net.yaml"], repo)
    assert code == 0, err
    assert "no change" in out


def test_two_revisions(repo):
    write(repo / "plans", "net.yaml", variant(("address: TNYCMP", "address: TNYCAMP")))
    git(repo, "commit", "-q", "-am", "new camp address")
    code, out, err = run_cli(["diff", "HEAD~1:plans/net.yaml", "HEAD:plans/net.yaml"], repo)
    assert code == 1, err and "TNYCAMP" in out


def test_bad_revisions_exit_2(repo):
    code, out, err = run_cli(["diff", "HEAD~5:plans/net.yaml", "plans/net.yaml"], repo)
    assert code == 2 and "HEAD~5:plans/net.yaml: git cannot show that file" in err
    code, out, err = run_cli(["diff", "HEAD:plans/other.yaml", "plans/net.yaml"], repo)
    assert code == 2 and "does not exist in 'HEAD'" in err
    code, out, err = run_cli(["diff", "HEAD:nowhere/net.yaml", "plans/net.yaml"], repo)
    assert code == 2 and "does not exist here" in err


def test_plan_with_errors_at_a_revision_is_named_by_its_revision(repo):
    write(repo / "plans", "net.yaml", variant(("power_w: 50", "power_w: -5")))
    git(repo, "commit", "-q", "-am", "a bad edit")
    write(repo / "plans", "net.yaml", TINY)
    code, out, err = run_cli(["diff", "HEAD:plans/net.yaml", "plans/net.yaml"], repo)
    assert code == 2
    assert err.startswith("HEAD:plans/net.yaml:") and "power_w" in err
