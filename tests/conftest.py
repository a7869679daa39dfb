"""Fixtures shared by every test folder: the one headless Chromium of the session, and a private cache folder.

Playwright's sync API allows one running instance per process, so every browser
test uses this fixture. Without a browser the tests skip, unless
PLANPACK_REQUIRE_BROWSER=1 (CI), where they fail.
"""

from __future__ import annotations

import os
import shutil
import tempfile

import pytest

CHROMIUM = os.environ.get("PLANPACK_CHROMIUM", "/usr/bin/chromium")
ARGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking",
        "--disable-component-update", "--disable-sync", "--no-first-run"]


def _unavailable(why: str):
    if os.environ.get("PLANPACK_REQUIRE_BROWSER") == "1":
        pytest.fail(f"browser tests required (PLANPACK_REQUIRE_BROWSER=1) but {why}")
    pytest.skip(why)


@pytest.fixture(scope="session")
def browser():
    try:
        from playwright.sync_api import sync_playwright
    except ImportError:
        _unavailable("the playwright package is not installed")
    if not (os.path.isfile(CHROMIUM) and os.access(CHROMIUM, os.X_OK)) and not shutil.which(CHROMIUM):
        _unavailable(f"no Chromium at {CHROMIUM} (apt-get install chromium)")
    with sync_playwright() as p:
        b = p.chromium.launch(executable_path=CHROMIUM, args=ARGS, timeout=60_000)
        try:
            yield b
        finally:
            b.close()


@pytest.fixture(scope="session", autouse=True)
def _private_cache_folder():
    """planpack's cache goes to the user's cache folder by default: give the test session its own."""
    saved = os.environ.get("XDG_CACHE_HOME")
    folder = tempfile.mkdtemp(prefix="planpack-test-xdg-cache-")
    os.environ["XDG_CACHE_HOME"] = folder
    yield
    if saved is None:
        os.environ.pop("XDG_CACHE_HOME", None)
    else:
        os.environ["XDG_CACHE_HOME"] = saved
    shutil.rmtree(folder, ignore_errors=True)
