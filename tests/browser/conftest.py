"""Real headless Chromium (Debian's package) driven by playwright, and the site it looks at.

Without a browser the tests skip, unless PLANPACK_REQUIRE_BROWSER=1 (CI), where they fail.
"""

from __future__ import annotations

import functools
import http.server
import os
import shutil
import sys
import threading
from pathlib import Path

import pytest

REPO = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(REPO / "tests" / "publish"))
from synthetic import synthetic_data  # noqa: E402

from tests.conftest import ARGS, CHROMIUM, _unavailable  # noqa: E402,F401 - shared with every browser test
SUBPATH = "/nets/site/"


def _demo_data() -> list[dict]:
    try:
        from planpack.compile import compile_plan
    except ImportError:
        return []
    from planpack.plan import read_plan

    out = []
    for path in sorted((REPO / "plans").glob("*.yaml")):
        r = read_plan(str(path))
        if r.ok:
            out.append(compile_plan(r.plan).data)
    return out


@pytest.fixture(scope="session")
def built_site(tmp_path_factory):
    """(folder, list of data dicts): the synthetic net plus the demo plans when compile is installed."""
    from planpack.publish import output, site

    datas = [synthetic_data()] + _demo_data()
    root = tmp_path_factory.mktemp("srv")
    folder = root / SUBPATH.strip("/")
    output.publish(site.render_site(datas), folder)
    return folder, datas


class _QuietHandler(http.server.SimpleHTTPRequestHandler):
    def log_message(self, *args):  # keep test output clean
        pass


@pytest.fixture(scope="session")
def http_base(built_site):
    """A local static server on 127.0.0.1 serving the site under a sub-path; always stopped."""
    folder, _ = built_site
    root = folder.parents[len(Path(SUBPATH.strip("/")).parts) - 1]
    handler = functools.partial(_QuietHandler, directory=str(root))
    server = http.server.ThreadingHTTPServer(("127.0.0.1", 0), handler)
    server.timeout = 5
    thread = threading.Thread(target=server.serve_forever, kwargs={"poll_interval": 0.1}, daemon=True)
    thread.start()
    try:
        yield f"http://127.0.0.1:{server.server_address[1]}{SUBPATH}"
    finally:
        server.shutdown()
        server.server_close()
        thread.join(10)


@pytest.fixture(scope="session")
def screenshot_dir(tmp_path_factory):
    wanted = os.environ.get("PLANPACK_SCREENSHOTS")
    path = Path(wanted) if wanted else tmp_path_factory.mktemp("screenshots")
    path.mkdir(parents=True, exist_ok=True)
    return path
