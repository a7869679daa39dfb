"""planpack serve: build, serve on loopback, rebuild on an edit, show errors, stop cleanly on Ctrl-C."""

from __future__ import annotations

import json
import os
import re
import signal
import subprocess
import sys
import threading
import time
import urllib.error
import urllib.request

import pytest
from tests.workflow.conftest import REPO, write
from tests.workflow.plans import TINY, variant

WAIT_S = 90  # every wait is bounded; a compile of the tiny plan takes about a second

def _command(args: list[str]) -> list[str]:
    return [sys.executable, "-m", "planpack", *args]


def fetch(url: str, host: str | None = None) -> tuple[int, str, dict]:
    req = urllib.request.Request(url, headers={"Host": host} if host else {})
    try:
        with urllib.request.urlopen(req, timeout=10) as r:
            return r.status, r.read().decode("utf-8"), dict(r.headers)
    except urllib.error.HTTPError as exc:
        return exc.code, exc.read().decode("utf-8", "replace"), dict(exc.headers)


def wait_for(predicate, what: str, timeout: float = WAIT_S):
    end = time.monotonic() + timeout
    while time.monotonic() < end:
        value = predicate()
        if value:
            return value
        time.sleep(0.1)
    pytest.fail(f"timed out after {timeout:g} s waiting for {what}")


@pytest.fixture
def server(tmp_path, shared_cache):
    """A running ``planpack serve`` on a free port; always stopped (Ctrl-C, then kill if need be)."""
    plans = tmp_path / "plans"
    plans.mkdir()
    write(plans, "net.yaml", TINY)
    tmp = tmp_path / "tmp"
    tmp.mkdir()
    env = {**os.environ, "PYTHONPATH": str(REPO), "TMPDIR": str(tmp), "NO_COLOR": "1"}
    proc = subprocess.Popen(_command(["serve", str(plans), "--port", "0", "--interval", "0.1"]), cwd=tmp_path,
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True, env=env)
    log: list[str] = []  # stderr lines, appended by a reader thread
    threading.Thread(target=lambda: [log.append(ln) for ln in proc.stderr], daemon=True).start()

    def url():
        m = re.search(r"serving (http://127\.0\.0\.1:\d+/)", "".join(log))
        return m.group(1) if m else None

    try:
        base = wait_for(lambda: url() or (proc.poll() is not None and pytest.fail("serve exited: " + "".join(log))),
                        "the server to start")
        yield proc, base, plans, tmp, log
    finally:
        if proc.poll() is None:
            proc.send_signal(signal.SIGINT)
            try:
                proc.wait(timeout=20)
            except subprocess.TimeoutExpired:
                proc.kill()
                proc.wait(timeout=10)


def version(base: str) -> int:
    return json.loads(fetch(base + "_preview/version")[1])["version"]


def test_serve_rebuilds_on_edit_shows_errors_and_stops_cleanly(server):
    proc, base, plans, tmp, log = server
    status, page, headers = fetch(base + "tiny-net/index.html")
    assert status == 200 and "Invented hill group test net" in page
    assert '<script src="/_preview/reload.js?v=' in page and "<script>" not in page  # no inline script
    assert "script-src 'self'" in headers["Content-Security-Policy"]
    assert "default-src 'none'" in headers["Content-Security-Policy"]
    assert fetch(base + "_preview/reload.js")[0] == 200
    assert fetch(base)[0] == 200  # the site index

    v1 = version(base)
    write(plans, "net.yaml", variant(("title: Invented hill group test net", "title: Renamed hill net")))
    wait_for(lambda: version(base) > v1, "a rebuild after the edit")
    status, page, _ = fetch(base + "tiny-net/index.html")
    assert status == 200 and "Renamed hill net" in page and "Invented hill group test net" not in page

    v2 = version(base)
    write(plans, "net.yaml", variant(("power_w: 50", "power_w: lots")))
    wait_for(lambda: version(base) > v2, "a rebuild after the broken edit")
    for path in ("tiny-net/index.html", "tiny-net/schedule.html", ""):
        status, page, _ = fetch(base + path)
        assert "The plan has errors" in page and "stations.camp.power_w" in page, path
        assert "Renamed hill net" not in page  # not the last good site, silently

    v3 = version(base)
    write(plans, "net.yaml", TINY)
    wait_for(lambda: version(base) > v3, "a rebuild after the fix")
    status, page, _ = fetch(base + "tiny-net/index.html")
    assert status == 200 and "Invented hill group test net" in page and "has errors" not in page

    # another host name is refused (DNS rebinding), and the server listens on loopback only
    assert fetch(base + "tiny-net/index.html", host="planner.example:80")[0] == 421

    proc.send_signal(signal.SIGINT)
    assert proc.wait(timeout=30) == 0
    wait_for(lambda: "planpack: stopped" in "".join(log), "the stop message")
    assert "Traceback" not in "".join(log)
    assert list(tmp.iterdir()) == []  # the temporary site folder is removed


def test_missing_plan_is_a_usage_error(tmp_path):
    r = subprocess.run(_command(["serve", str(tmp_path / "none.yaml"), "--port", "0"]), capture_output=True,
                       text=True, timeout=60, env={**os.environ, "PYTHONPATH": str(REPO)})
    assert r.returncode == 2 and "no such file" in r.stderr


# ---- in a real browser: the reload script runs under the page's policy and reloads on an edit

def test_browser_reloads_by_itself_after_an_edit(server, tmp_path):
    """Headless Chromium (in its own process); skips without a browser unless PLANPACK_REQUIRE_BROWSER=1 (CI)."""
    proc, base, plans, tmp, log = server
    edited = write(tmp_path, "edited.txt", variant(("title: Invented hill group test net", "title: Reloaded hill net")))
    broken = write(tmp_path, "broken.txt", variant(("power_w: 50", "power_w: lots")))
    script = os.path.join(os.path.dirname(__file__), "browser_reload.py")
    r = subprocess.run([sys.executable, script, base, str(plans / "net.yaml"), str(edited), str(broken)],
                       capture_output=True, text=True, timeout=300, env={**os.environ, "PYTHONPATH": str(REPO)})
    if r.returncode == 3:
        if os.environ.get("PLANPACK_REQUIRE_BROWSER") == "1":
            pytest.fail(f"browser tests required (PLANPACK_REQUIRE_BROWSER=1) but {r.stdout.strip()}")
        pytest.skip(r.stdout.strip())
    assert r.returncode == 0, r.stdout + r.stderr


def test_first_build_broken_then_fixed_in_process(tmp_path, shared_cache):
    """The server started on a plan with errors shows them, with its script, until the plan is fixed."""
    from planpack.workflow import serve

    plan = write(tmp_path, "net.yaml", variant(("power_w: 50", "power_w: lots")))
    messages: list[str] = []
    preview = serve.Preview([str(plan)], log=messages.append)
    server = None
    try:
        assert preview.build() is False
        server, thread = serve.start_server(preview, 0)
        base = f"http://127.0.0.1:{server.server_address[1]}/"
        status, page, _ = fetch(base + "tiny-net/index.html")
        assert status == 200 and "stations.camp.power_w" in page
        assert fetch(base + "_preview/reload.js")[0] == 200 and fetch(base + "_preview/preview.css")[0] == 200
        write(tmp_path, "net.yaml", TINY)
        assert preview.build() is True
        status, page, _ = fetch(base + "tiny-net/index.html")
        assert status == 200 and "Invented hill group test net" in page
        assert any(m.startswith("the plan has errors") for m in messages)
    finally:
        if server is not None:
            server.shutdown()
            server.server_close()
        preview.close()
    assert not preview.root.exists()


def test_sigterm_stops_cleanly_too(server):
    proc, base, plans, tmp, log = server
    assert fetch(base + "tiny-net/index.html")[0] == 200
    proc.send_signal(signal.SIGTERM)
    assert proc.wait(timeout=30) == 0
    wait_for(lambda: "planpack: stopped" in "".join(log), "the stop message")
    assert list(tmp.iterdir()) == []


def _raw(base: str, request: bytes, read: bool = True, reset: bool = False) -> bytes:
    """Send raw bytes to the server; read the answer, or drop the connection at once (reset: with an RST)."""
    import socket
    import struct

    host, port = re.match(r"http://([\d.]+):(\d+)/", base).groups()
    s = socket.create_connection((host, int(port)), timeout=10)
    try:
        s.sendall(request)
        if reset:
            s.setsockopt(socket.SOL_SOCKET, socket.SO_LINGER, struct.pack("ii", 1, 0))
            return b""
        if not read:
            return b""
        chunks = []
        while True:
            try:
                chunk = s.recv(65536)
            except (ConnectionError, TimeoutError):
                break
            if not chunk:
                break
            chunks.append(chunk)
        return b"".join(chunks)
    finally:
        s.close()


def test_odd_requests_and_dropped_clients_print_no_traceback(server):
    """Finding 9: a NUL in the path gave a ValueError traceback and no answer; a client that went away
    (a browser reload) gave a BrokenPipeError traceback."""
    proc, base, plans, tmp, log = server
    port = re.search(r":(\d+)/", base).group(1)
    host = f"Host: 127.0.0.1:{port}\r\n".encode()
    for path in (b"/index.html%00.png", b"/tiny-net/%00", b"/%0a%0dx.html", b"/%ff%fe.html", b"/" + b"a" * 5000):
        answer = _raw(base, b"GET " + path + b" HTTP/1.1\r\n" + host + b"Connection: close\r\n\r\n")
        assert answer.startswith((b"HTTP/1.0 4", b"HTTP/1.1 4")), (path[:40], answer[:200])
    for _ in range(15):  # clients that ask for a page and go away before it is sent
        _raw(base, b"GET /tiny-net/plan.json HTTP/1.1\r\n" + host + b"\r\n", reset=True)
        _raw(base, b"GET /tiny-net/index.html HTTP/1.1\r\n" + host + b"\r\n", read=False)
    _raw(base, b"GET /tiny-net/index.html HTTP/1.1\r\n" + host, read=False)  # a request cut short
    assert fetch(base + "tiny-net/index.html")[0] == 200  # still serving
    time.sleep(0.5)
    assert "Traceback" not in "".join(log), "".join(log)[-3000:]
