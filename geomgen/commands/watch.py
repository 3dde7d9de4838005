"""``geomgen watch``: size (or build) a design file again each time it is saved, tell what
changed since the last good state, and serve the report on a local port that reloads itself.

Polling only (the standard library): the file's modification time and size are looked at a
few times a second, and its bytes hashed (sha256) when they change, so a save that leaves the
bytes as they were, or a touch, runs nothing. A build goes through the pipeline with its
caches; an invalid edit is one line and keeps the last good outputs (the pipeline writes
nothing for bad input, and a failed build leaves the previous folder as it was). The page is
served by :mod:`http.server` on 127.0.0.1: report.html as it is on disk with a small script
added on its way out (never on disk) that asks ``/version`` every half second and reloads
when a new good state is there.
"""

from __future__ import annotations

import contextlib
import hashlib
import http.server
import json
import threading
import time
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

from geomgen.errors import GeomgenError, InputError

#: seconds between two looks at the design file
POLL_SECONDS = 0.25
#: lines of the diff's Markdown shown after each good run
DIFF_LINES = 14

RELOAD_SCRIPT = """<script>
(function () {
  var seen = null;
  function ask() {
    fetch("/version", {cache: "no-store"}).then(function (r) { return r.text(); })
      .then(function (v) {
        if (seen === null) { seen = v; } else if (v !== seen) { location.reload(); }
      }).catch(function () {});
  }
  setInterval(ask, 500);
  ask();
})();
</script>
"""

WAITING_PAGE = (
    "<!DOCTYPE html><html><head><meta charset='utf-8'><title>geomgen watch</title></head>"
    "<body><p>geomgen watch: no good state of the design yet; fix the design file and save "
    "it.</p></body></html>"
)


@dataclass
class _State:
    """What the server shows: the folder of the last good outputs and its version number
    (0 until the first good run). Changed by the watching thread, read by the server's."""

    folder: Path | None = None
    version: int = 0


def _fingerprint(path: Path) -> tuple[int, int] | None:
    try:
        st = path.stat()
    except OSError:
        return None
    return (st.st_mtime_ns, st.st_size)


def _digest(path: Path) -> str | None:
    try:
        return hashlib.sha256(path.read_bytes()).hexdigest()
    except OSError:
        return None


def _reports(folder: Path) -> tuple[dict, dict | None]:
    report = json.loads((folder / "report.json").read_text(encoding="utf-8"))
    parts_path = folder / "parts.json"
    parts = json.loads(parts_path.read_text(encoding="utf-8")) if parts_path.is_file() else None
    return report, parts


def _changes(old: tuple[dict, dict | None], new: tuple[dict, dict | None]) -> list[str]:
    """The top lines of ``geomgen diff`` between the last good state and this one."""
    from geomgen.commands import diff

    parts_old, parts_new = old[1], new[1]
    if parts_old is None or parts_new is None:
        parts_old = parts_new = None
    result = diff.compare(old[0], new[0], parts_old, parts_new)
    lines = diff.to_markdown(result, "last good", "now").splitlines()[2:]  # past the title
    lines = [line for line in lines if line.strip()]
    if len(lines) > DIFF_LINES:
        lines = [*lines[:DIFF_LINES], f"... ({len(lines) - DIFF_LINES} more lines)"]
    return lines


#: report.html's policy lets nothing be fetched; the served copy may ask its own server
CSP_NONE = "default-src 'none'; "
CSP_SERVED = "default-src 'none'; connect-src 'self'; "


def served_page(text: str) -> str:
    """The page as served: its content policy lets it ask ``/version`` of the server it came
    from, and the reload script is added before ``</body>``. The file itself is not changed."""
    text = text.replace(CSP_NONE, CSP_SERVED, 1)
    at = text.rfind("</body>")
    at = len(text) if at < 0 else at
    return text[:at] + RELOAD_SCRIPT + text[at:]


def _handler(state: _State, page: str):
    class Handler(http.server.BaseHTTPRequestHandler):
        def log_message(self, *args) -> None:  # quiet: the terminal is for the changes
            return

        def _send(self, body: bytes, kind: str, code: int = 200) -> None:
            self.send_response(code)
            self.send_header("Content-Type", kind)
            self.send_header("Content-Length", str(len(body)))
            self.send_header("Cache-Control", "no-store")
            self.end_headers()
            self.wfile.write(body)

        def do_GET(self) -> None:
            route = self.path.split("?")[0]
            folder, version = state.folder, state.version
            if route == "/version":
                self._send(str(version).encode(), "text/plain; charset=utf-8")
                return
            if route in ("/", "/" + page):
                text = WAITING_PAGE
                if folder is not None:
                    with contextlib.suppress(OSError):
                        text = (folder / page).read_text(encoding="utf-8")
                body = served_page(text).encode("utf-8")
                self._send(body, "text/html; charset=utf-8")
                return
            if folder is not None:
                target = (folder / route.lstrip("/")).resolve()
                if target.is_file() and target.is_relative_to(folder.resolve()):
                    kinds = {
                        ".svg": "image/svg+xml",
                        ".png": "image/png",
                        ".json": "application/json",
                    }
                    self._send(target.read_bytes(), kinds.get(target.suffix, "text/plain"))
                    return
            self._send(b"not found", "text/plain", 404)

    return Handler


def watch(
    design_path: Path,
    out_root: Path,
    *,
    size_only: bool = False,
    port: int = 8765,
    units: str | None = None,
    say: Callable[[str], None] = print,
    tell: Callable[[str], None] = print,
    run_size: Callable | None = None,
    run_build: Callable | None = None,
) -> int:
    """Watch ``design_path`` until interrupted (KeyboardInterrupt, which the CLI also raises
    on SIGTERM); returns 130 then. ``run_size``/``run_build`` are what sizes or builds the
    file (default the pipeline's); ``say`` prints one line, ``tell`` one error line."""
    from geomgen.commands import pipeline

    run_size = run_size or pipeline.run_size
    run_build = run_build or pipeline.run_build
    state = _State()
    try:
        server = http.server.ThreadingHTTPServer(
            ("127.0.0.1", port), _handler(state, "report.html")
        )
    except OSError as err:
        raise InputError(
            f"cannot serve on 127.0.0.1:{port} ({err.strerror or err}); give another port, or 0 "
            "for any free one",
            path="--port",
        ) from None
    server.daemon_threads = True
    thread = threading.Thread(target=server.serve_forever, name="geomgen-watch-http", daemon=True)
    thread.start()
    what = "sizes" if size_only else "builds"
    say(
        f"geomgen: watching {design_path} ({what} on each save); the report is at "
        f"http://127.0.0.1:{server.server_address[1]}/ (Ctrl-C ends)"
    )
    last_good: tuple[dict, dict | None] | None = None
    seen_print: tuple[int, int] | None = None
    seen_digest: str | None = None
    try:
        while True:
            printed = _fingerprint(design_path)
            if printed == seen_print:
                time.sleep(POLL_SECONDS)
                continue
            seen_print = printed
            digest = _digest(design_path)
            if digest == seen_digest:
                continue
            seen_digest = digest
            started = time.perf_counter()
            try:
                if size_only:
                    folder = run_size(design_path, out_root, units)
                else:
                    folder = run_build(design_path, out_root, units).folder
            except GeomgenError as err:
                kept = f"; last good outputs kept in {state.folder}" if state.folder else ""
                tell(f"geomgen: error: {err}{kept}")
                continue
            now = _reports(folder)
            seconds = time.perf_counter() - started
            state.folder = folder
            state.version += 1
            verb = "sized" if size_only else "built"
            if last_good is None:
                say(f"geomgen: {verb} in {seconds:.1f} s; outputs in {folder}")
            else:
                lines = _changes(last_good, now)
                say(f"geomgen: {verb} in {seconds:.1f} s; changed since the last good state:")
                for line in lines or ["No differences."]:
                    say(f"  {line}")
            last_good = now
    except KeyboardInterrupt:
        say("geomgen: watch ended; outputs left as they were")
        return 130
    finally:
        server.shutdown()
        server.server_close()
