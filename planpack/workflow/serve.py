"""``planpack serve``: a live preview of the site while a plan is edited.

The site is built into a temporary folder and served on 127.0.0.1 only (never
on another interface; requests naming another host are refused, against DNS
rebinding). A loop polls the plan files' modification times (no extra
dependency) and rebuilds when one changes, through the compile cache. Each
page loads a small script from the site folder that polls ``/_preview/version``
and reloads the page when the number changes: the page's Content Security
Policy gains ``script-src 'self'; connect-src 'self'`` in the preview and
nothing else (no inline script). While a plan has errors, every page shows the
diagnostics instead of the last good site. Ctrl-C stops the server and removes
the temporary folder.
"""

from __future__ import annotations

import html
import http.server
import json
import os
import shutil
import sys
import tempfile
import threading
import time
from pathlib import Path

from planpack.errors import UsageError

PREVIEW_DIR = "_preview"
VERSION_PATH = f"/{PREVIEW_DIR}/version"
RELOAD_JS = """\
// planpack serve: reload this page when the preview is rebuilt (not part of a published site).
(function () {
  "use strict";
  var me = document.currentScript;
  var built = me ? new URL(me.src).searchParams.get("v") : null;
  function poll() {
    fetch("/_preview/version", {cache: "no-store"})
      .then(function (r) { return r.json(); })
      .then(function (v) {
        if (built !== null && String(v.version) !== built) { location.reload(); return; }
        setTimeout(poll, 700);
      })
      .catch(function () { setTimeout(poll, 2000); });
  }
  poll();
})();
"""
PREVIEW_CSS = """\
body { font: 16px/1.45 system-ui, sans-serif; margin: 2rem auto; max-width: 60rem; padding: 0 1rem; color: #111; }
h1 { color: #8a1010; font-size: 1.4rem; }
pre { background: #f5f1e6; border-left: 4px solid #8a1010; padding: .8rem; white-space: pre-wrap; overflow-wrap: anywhere; }
.note { color: #444; }
"""
PREVIEW_CSP = ("default-src 'none'; script-src 'self'; connect-src 'self'; style-src 'self'; img-src 'self' data:; "
               "base-uri 'none'; form-action 'none'")


def plan_paths(args: list[str]) -> list[str]:
    """The plan files the arguments name now (folders searched for *.yaml, sorted); missing ones kept as given."""
    out = []
    for arg in args:
        if os.path.isdir(arg):
            from planpack.plan import plan_files

            out += plan_files([arg])[0]
        else:
            out.append(arg)
    return out


def snapshot(args: list[str]) -> tuple:
    """What to compare between polls: each plan file with its size and modification time (None if missing)."""
    state = []
    for p in plan_paths(args):
        try:
            st = os.stat(p)
            state.append((p, st.st_mtime_ns, st.st_size))
        except OSError:
            state.append((p, None, None))
    return tuple(state)


class BuildFailed(Exception):
    """The plans cannot be built now; ``lines`` say why (diagnostics or a message)."""

    def __init__(self, title: str, lines: list[str]):
        super().__init__(title)
        self.title = title
        self.lines = lines


def _site_files(args: list[str], use_cache: bool) -> tuple[dict[str, bytes], int]:
    """The site of the plans as {path: bytes} and the number of warnings; raises BuildFailed."""
    from planpack.plan import plan_files, read_plan
    from planpack.publish import pipeline

    files, problems = plan_files(args)
    if problems:
        raise BuildFailed("The plans cannot be read", problems)
    results = [read_plan(f) for f in files]
    diags = [d for r in results for d in r.diagnostics]
    if any(not r.ok for r in results):
        raise BuildFailed("The plan has errors", [d.format() for d in diags])
    try:
        compiled = pipeline.compile_results(results, use_cache=use_cache)
    except UsageError as exc:
        raise BuildFailed("The plans cannot be built together", [str(exc)]) from None
    diags += [d for _, c in compiled for d in c.diagnostics]
    errors = [d for d in diags if d.severity == "error"]
    if errors:
        raise BuildFailed("The plan has errors", [d.format() for d in errors])
    try:
        from planpack.publish import site
    except ImportError:
        return _minimal_site([c.data for _, c in compiled]), len(diags)
    warnings = {c.data["net"]["id"]: [d.to_dict() for d in list(r.diagnostics) + list(c.diagnostics)] for r, c in compiled}
    return site.render_site([c.data for _, c in compiled], warnings=warnings), len(diags)


def _minimal_site(nets: list[dict]) -> dict[str, bytes]:
    """A one-page stand-in when the site renderer is not installed: each net's channel by hour."""
    parts = []
    for d in sorted(nets, key=lambda d: d["net"]["id"]):
        rows = "".join(f"<tr><td>{h['utc_hour']:02d}:00</td><td>{html.escape(h['local_time'])}</td>"
                       f"<td>{html.escape(h['first'] or '—')}</td><td>{html.escape(h['second'] or '—')}</td></tr>"
                       for h in d["net_schedule"]["hours"])
        parts.append(f"<h2>{html.escape(d['net']['title'])}</h2><table><tr><th>UTC</th><th>local</th>"
                     f"<th>first</th><th>second</th></tr>{rows}</table>")
    return {"index.html": _page("Net plans (preview)", "".join(parts)).encode("utf-8")}


def _page(title: str, body: str) -> str:
    return (f'<!DOCTYPE html>\n<html lang="en"><head><meta charset="utf-8">'
            f'<meta http-equiv="Content-Security-Policy" content="{PREVIEW_CSP}">'
            f'<title>{html.escape(title)}</title><link rel="icon" href="data:,">'
            f'<link rel="stylesheet" href="/{PREVIEW_DIR}/preview.css">'
            f'</head><body>{body}</body></html>\n')


def error_page(failure: BuildFailed, version: int) -> bytes:
    body = (f"<h1>{html.escape(failure.title)}</h1>"
            f"<p class=note>planpack serve shows this instead of the site until the plan is fixed; "
            f"the page reloads when you save.</p><pre>{html.escape(chr(10).join(failure.lines))}</pre>")
    return _with_reload(_page(failure.title, body), version).encode("utf-8")


def _with_reload(page: str, version: int) -> str:
    """Load the reload script from the site folder, and let the page's policy allow it (and only it)."""
    tag = f'<script src="/{PREVIEW_DIR}/reload.js?v={version}" defer></script>'
    marker = 'http-equiv="Content-Security-Policy" content="'
    at = page.find(marker)
    if at >= 0:
        start = at + len(marker)
        end = page.find('"', start)
        page = page[:start] + PREVIEW_CSP + page[end:]
    head = page.find("</head>")
    return page[:head] + tag + page[head:] if head >= 0 else tag + page


def preview_files(files: dict[str, bytes], version: int) -> dict[str, bytes]:
    out = {}
    for path, data in files.items():
        if path.endswith(".html"):
            data = _with_reload(data.decode("utf-8"), version).encode("utf-8")
        out[path] = data
    out[f"{PREVIEW_DIR}/reload.js"] = RELOAD_JS.encode("utf-8")
    out[f"{PREVIEW_DIR}/preview.css"] = PREVIEW_CSS.encode("utf-8")
    return dict(sorted(out.items()))


def _write_site(files: dict[str, bytes], out: Path) -> None:
    """Swap the whole site in (publish/output.py when installed; else a fresh folder renamed over the old)."""
    try:
        from planpack.publish import output
    except ImportError:
        output = None
    if output is not None:
        output.publish(files, out, force=True)
        return
    tmp = Path(tempfile.mkdtemp(prefix=".site-", dir=out.parent))
    for rel, data in files.items():
        (tmp / rel).parent.mkdir(parents=True, exist_ok=True)
        (tmp / rel).write_bytes(data)
    old = out.parent / f".old-{time.monotonic_ns()}"
    if out.exists():
        out.rename(old)
    tmp.rename(out)
    shutil.rmtree(old, ignore_errors=True)


class Preview:
    """The preview's state: the site folder, the build number, and the failure being shown (if any)."""

    def __init__(self, plans: list[str], use_cache: bool = True, log=None) -> None:
        self.plans = list(plans)
        self.use_cache = use_cache
        self.root = Path(tempfile.mkdtemp(prefix="planpack-serve-"))
        self.site = self.root / "site"
        self.version = 0
        self.failure: BuildFailed | None = None
        self.lock = threading.Lock()
        self.log = log or (lambda text: print(f"planpack: {text}", file=sys.stderr, flush=True))

    def build(self) -> bool:
        """Rebuild the site; on failure keep the last good files but show the failure. True when built."""
        started = time.monotonic()
        version = self.version + 1
        try:
            files, warnings = _site_files(self.plans, self.use_cache)
            _write_site(preview_files(files, version), self.site)
        except BuildFailed as exc:
            self._fail(exc, version)
            self.log(f"{exc.title.lower()}; the page shows them:\n  " + "\n  ".join(exc.lines))
            return False
        except Exception as exc:  # a bug must not stop the preview: show it and keep watching
            self._fail(BuildFailed("The preview could not be built",
                                   [f"{type(exc).__name__}: {exc}", "This is a bug in planpack; please report it with the plan."]),
                       version)
            self.log(f"internal error while building: {type(exc).__name__}: {exc}")
            return False
        with self.lock:
            self.failure, self.version = None, version
        self.log(f"built in {time.monotonic() - started:.1f} s ({warnings} warning{'s' * (warnings != 1)})")
        return True

    def _fail(self, failure: BuildFailed, version: int) -> None:
        if not self.site.exists():  # no good build yet: the error page still needs its script and style
            try:
                _write_site(preview_files({}, version), self.site)
            except Exception:  # noqa: BLE001 - the page then shows without them; the log has the failure
                pass
        with self.lock:
            self.failure, self.version = failure, version

    def close(self) -> None:
        shutil.rmtree(self.root, ignore_errors=True)


def handler_for(preview: Preview, port_box: list[int]):
    class Handler(http.server.SimpleHTTPRequestHandler):
        def __init__(self, *args, **kwargs):
            super().__init__(*args, directory=str(preview.site), **kwargs)

        def log_message(self, format, *args):  # noqa: A002 - the base class's name
            pass  # quiet: the terminal is for build messages

        def end_headers(self):
            self.send_header("Cache-Control", "no-store")
            self.send_header("Content-Security-Policy", PREVIEW_CSP)
            self.send_header("X-Content-Type-Options", "nosniff")
            super().end_headers()

        def _host_ok(self) -> bool:
            host = (self.headers.get("Host") or "").lower()
            return host in {f"127.0.0.1:{port_box[0]}", f"localhost:{port_box[0]}"}

        def _send(self, status: int, ctype: str, body: bytes, head_only: bool) -> None:
            self.send_response(status)
            self.send_header("Content-Type", ctype)
            self.send_header("Content-Length", str(len(body)))
            self.end_headers()
            if not head_only:
                self.wfile.write(body)

        def _route(self, head_only: bool) -> None:
            if not self._host_ok():
                self._send(421, "text/plain; charset=utf-8", b"planpack serve answers 127.0.0.1 only\n", head_only)
                return
            path = self.path.split("?", 1)[0].split("#", 1)[0]
            if not _plain_request_path(path):
                self._send(400, "text/plain; charset=utf-8", b"planpack serve: not a path it serves\n", head_only)
                return
            with preview.lock:
                version, failure = preview.version, preview.failure
            if path == VERSION_PATH:
                self._send(200, "application/json", json.dumps({"version": version}).encode(), head_only)
                return
            is_page = path.endswith((".html", "/")) or "." not in path.rsplit("/", 1)[-1]
            if failure is not None and is_page and not path.startswith(f"/{PREVIEW_DIR}/"):
                self._send(200, "text/html; charset=utf-8", error_page(failure, version), head_only)
                return
            try:
                if head_only:
                    super().do_HEAD()
                else:
                    super().do_GET()
            except ValueError:  # a path the file system cannot name; nothing was sent yet
                self._send(400, "text/plain; charset=utf-8", b"planpack serve: not a path it serves\n", head_only)

        def do_GET(self):  # noqa: N802 - http.server's names
            self._route(False)

        def do_HEAD(self):  # noqa: N802
            self._route(True)

    return Handler


def _plain_request_path(path: str) -> bool:
    """A request path the preview answers: no NUL or control characters once %-decoded, not too long."""
    from urllib.parse import unquote

    try:
        decoded = unquote(path, errors="strict")
    except UnicodeDecodeError:
        return False
    return len(decoded) <= 1024 and not any(ord(c) < 32 or ord(c) == 127 for c in decoded)


class PreviewServer(http.server.ThreadingHTTPServer):
    """The threading HTTP server, with one line instead of a traceback when a request fails."""

    daemon_threads = True
    log = staticmethod(lambda text: print(f"planpack: {text}", file=sys.stderr, flush=True))

    def handle_error(self, request, client_address) -> None:
        exc = sys.exc_info()[1]
        if isinstance(exc, (ConnectionError, TimeoutError)):
            return  # a browser that reloads or closes a tab drops its connection: nothing to report
        self.log(f"a request failed ({type(exc).__name__}: {exc}); the preview goes on")


def start_server(preview: Preview, port: int) -> tuple[http.server.ThreadingHTTPServer, threading.Thread]:
    port_box = [port]
    try:
        server = PreviewServer(("127.0.0.1", port), handler_for(preview, port_box))
    except OSError as exc:
        raise UsageError(f"cannot listen on 127.0.0.1:{port}: {exc.strerror or exc}; "
                         "choose another --port (0 picks a free one)") from None
    server.log = preview.log
    port_box[0] = server.server_address[1]
    thread = threading.Thread(target=server.serve_forever, kwargs={"poll_interval": 0.2}, daemon=True,
                              name="planpack-serve")
    thread.start()
    return server, thread


def run(plans: list[str], port: int = 8000, interval_s: float = 0.5, use_cache: bool = True,
        stop: threading.Event | None = None) -> int:
    """Build, serve and watch until Ctrl-C (or ``stop`` is set); returns the exit code (0)."""
    interval_s = min(max(interval_s, 0.05), 10.0)
    missing = [p for p in plans if not os.path.exists(p)]
    if missing:
        raise UsageError(f"{missing[0]}: no such file or folder")
    preview = Preview(plans, use_cache)
    server = None
    restore = _stop_on_sigterm()
    try:
        server, _ = start_server(preview, port)  # listen first: a port in use fails before a build
        state = snapshot(plans)
        preview.build()
        preview.log(f"serving http://127.0.0.1:{server.server_address[1]}/ — edit a plan and the page reloads; "
                    "Ctrl-C to stop")
        stop = stop or threading.Event()
        while not stop.wait(interval_s):
            now = snapshot(plans)
            if now != state:
                state = now
                time.sleep(min(interval_s, 0.1))  # let an editor finish writing
                state = snapshot(plans)
                preview.build()
    except KeyboardInterrupt:
        preview.log("stopped")
    finally:
        if server is not None:
            server.shutdown()
            server.server_close()
        preview.close()
        restore()
    return 0


def _stop_on_sigterm():
    """Let SIGTERM stop the preview as Ctrl-C does (temporary folder removed); returns the undo."""
    import signal

    if threading.current_thread() is not threading.main_thread():
        return lambda: None

    def stop(signum, frame):
        raise KeyboardInterrupt

    old = signal.signal(signal.SIGTERM, stop)
    return lambda: signal.signal(signal.SIGTERM, old)
