"""Fixtures shared by every test folder: the one headless Chromium of the session.

Playwright's sync API allows one running instance per process, so every browser
test uses this fixture. Without a browser the tests skip, unless
PLANPACK_REQUIRE_BROWSER=1 (CI), where they fail.
"""

from __future__ import annotations

import os
import shutil

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


