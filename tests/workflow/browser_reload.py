"""Run by test_serve.py in its own process (the browser tests' session keeps a playwright loop in the
test process): open a served page in headless Chromium, edit the plan, and see the page reload itself.

Usage: python browser_reload.py BASE_URL PLAN_FILE EDITED_FILE BROKEN_FILE
Exit 0 when it worked, 1 with the reason on stdout, 3 when no browser can be started.
"""

from __future__ import annotations

import os
import shutil
import sys
import time

CHROMIUM = os.environ.get("PLANPACK_CHROMIUM", "/usr/bin/chromium")
WAIT_S = 90


def main(base: str, plan: str, edited: str, broken: str) -> int:
    try:
        from playwright.sync_api import sync_playwright
    except ImportError:
        print("the playwright package is not installed")
        return 3
    if not shutil.which(CHROMIUM):
        print(f"no Chromium at {CHROMIUM}")
        return 3
    with sync_playwright() as p:
        b = p.chromium.launch(executable_path=CHROMIUM, args=["--headless", "--no-sandbox", "--disable-gpu"],
                              timeout=60_000)
        try:
            page = b.new_page()
            problems: list[str] = []
            page.on("console", lambda m: problems.append(m.text) if m.type in ("error", "warning") else None)
            page.on("pageerror", lambda e: problems.append(str(e)))
            page.on("response", lambda r: problems.append(f"{r.status} {r.url}") if r.status >= 400 else None)
            page.goto(base + "tiny-net/schedule.html", timeout=30_000)

            def wait(text: str) -> bool:
                # the page's policy forbids eval, so wait from outside the page, not with a page function
                end = time.monotonic() + WAIT_S
                while time.monotonic() < end:
                    try:
                        if text in page.content():
                            return True
                    except Exception:  # between two documents while it reloads
                        pass
                    time.sleep(0.1)
                return False

            if not wait("Invented hill group test net"):
                print("the first page does not show the plan")
                return 1
            shutil.copyfile(edited, plan)
            if not wait("Reloaded hill net"):
                print("the page did not reload itself after the edit")
                return 1
            shutil.copyfile(broken, plan)
            if not wait("The plan has errors"):
                print("the page did not show the diagnostics after a broken edit")
                return 1
            if not page.url.endswith("tiny-net/schedule.html"):
                print(f"the page moved to {page.url}")
                return 1
            if problems:
                print("the browser reported: " + "; ".join(problems))
                return 1
            return 0
        finally:
            b.close()


if __name__ == "__main__":
    sys.exit(main(*sys.argv[1:5]))
