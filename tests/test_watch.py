"""``geomgen watch`` as a user runs it: a subprocess on a copy of the demo, edited while it
watches (a good edit, a bad edit), its messages, its outputs and its page."""

from __future__ import annotations

import hashlib
import json
import math
import os
import queue
import re
import shutil
import signal
import subprocess
import sys
import threading
import time
import urllib.request
from pathlib import Path

import pytest
from designs import DEMO
from test_html_report import CHROMEDRIVER, CHROMIUM, driver  # noqa: F401  (the browser)

ROOT = Path(__file__).resolve().parent.parent


class Watcher:
    """``geomgen watch`` in a subprocess, its stdout and stderr lines read as they come."""

    def __init__(self, design: Path, out: Path, *extra: str) -> None:
        env = {**os.environ, "PYTHONPATH": str(ROOT)}
        code = "import sys; from geomgen.cli import main; sys.exit(main())"
        self.proc = subprocess.Popen(
            [sys.executable, "-c", code, "watch", str(design), "--out", str(out), "--port", "0"]
            + list(extra),
            stdout=subprocess.PIPE,
            stderr=subprocess.PIPE,
            text=True,
            env=env,
        )
        self.lines: queue.Queue[tuple[str, str]] = queue.Queue()
        self.seen: list[tuple[str, str]] = []
        for name, stream in (("out", self.proc.stdout), ("err", self.proc.stderr)):
            threading.Thread(target=self._pump, args=(name, stream), daemon=True).start()
        first = self.wait_for(r"the report is at (http://127\.0\.0\.1:\d+/)")
        self.url = re.search(r"http://127\.0\.0\.1:\d+/", first).group(0)

    def _pump(self, name: str, stream) -> None:
        for line in stream:
            self.lines.put((name, line.rstrip("\n")))

    def wait_for(self, pattern: str, timeout: float = 120.0, stream: str | None = None) -> str:
        """The next line matching ``pattern`` (on ``stream``: out or err, or either)."""
        deadline = time.monotonic() + timeout
        while True:
            left = deadline - time.monotonic()
            assert left > 0, f"no line matching {pattern!r}; seen: {self.seen}"
            try:
                name, line = self.lines.get(timeout=left)
            except queue.Empty:
                continue
            self.seen.append((name, line))
            if re.search(pattern, line) and stream in (None, name):
                return line

    def since(self, mark: int) -> list[tuple[str, str]]:
        while not self.lines.empty():
            self.seen.append(self.lines.get())
        return self.seen[mark:]

    def get(self, route: str) -> str:
        with urllib.request.urlopen(self.url + route.lstrip("/"), timeout=10) as reply:
            return reply.read().decode("utf-8")

    def stop(self, sig: int = signal.SIGTERM) -> int:
        self.proc.send_signal(sig)
        code = self.proc.wait(timeout=180)  # a loaded CI machine: the exit took over 60 s once
        time.sleep(0.2)  # the reader threads take the last lines
        self.since(0)
        return code


def _hashes(folder: Path) -> dict[str, str]:
    return {
        str(p.relative_to(folder)): hashlib.sha256(p.read_bytes()).hexdigest()
        for p in sorted(folder.rglob("*"))
        if p.is_file()
    }


def _edit(path: Path, old: str, new: str) -> None:
    text = path.read_text(encoding="utf-8")
    assert old in text
    time.sleep(0.05)  # a later modification time than the last save
    path.write_text(text.replace(old, new, 1), encoding="utf-8")


@pytest.fixture
def design_copy(tmp_path: Path) -> Path:
    path = tmp_path / "trainer.yaml"
    shutil.copy(DEMO, path)
    return path


def test_watch_size_only_follows_good_and_bad_edits(design_copy: Path, tmp_path: Path) -> None:
    out = tmp_path / "out"
    folder = out / "veyra-t2"
    w = Watcher(design_copy, out, "--size-only")
    try:
        w.wait_for(r"^geomgen: sized in .* s; outputs in ", stream="out")
        assert w.get("/version") == "1"
        served = w.get("/")
        on_disk = (folder / "report.html").read_text(encoding="utf-8")
        assert "/version" in served and "/version" not in on_disk  # added on the way out only
        # the same page, but for its content policy (it may ask its own server) and the script
        assert "default-src 'none'; script-src" in on_disk
        added = served[served.rfind("<script>") : served.rfind("</body>")]
        assert served.replace(added, "").replace("connect-src 'self'; ", "") == on_disk
        assert "default-src 'none'; connect-src 'self'; script-src" in served
        assert w.get("/three-view.svg").lstrip().startswith("<?xml")

        # a save that leaves the bytes as they were runs nothing
        mark = len(w.seen)
        os.utime(design_copy)
        time.sleep(1.0)
        assert w.since(mark) == []

        # a good edit: sized again, the diff's lines say what changed
        _edit(design_copy, "aspect_ratio: 7.8", "aspect_ratio: 8.2")
        w.wait_for(r"changed since the last good state", stream="out")
        w.wait_for(r"\| surfaces\.wing\.aspect_ratio \| 7\.8 \| 8\.2 \| 0\.4 \| 5\.128 \| 1 \|")
        report = json.loads((folder / "report.json").read_text(encoding="utf-8"))
        wing = report["surfaces"]["wing"]
        assert wing["aspect_ratio"]["value"] == pytest.approx(8.2)
        # AR = b^2 / S (the aspect ratio's definition)
        assert wing["span"]["value"] == pytest.approx(math.sqrt(8.2 * wing["area"]["value"]))
        assert w.get("/version") == "2"
        good = _hashes(folder)

        # a bad edit: one line on stderr, the outputs as they were, the page unchanged
        mark = len(w.seen)
        _edit(design_copy, "aspect_ratio: 8.2", "aspect_ratio: -1")
        line = w.wait_for(r"^geomgen: error: ", stream="err")
        assert line == (
            f"geomgen: error: {design_copy}: wing.aspect_ratio: must be in [0.1, 40] (got -1); "
            f"last good outputs kept in {folder}"
        )
        time.sleep(0.5)
        assert _hashes(folder) == good
        assert w.get("/version") == "2"
    finally:
        code = w.stop(signal.SIGTERM)
    assert code == 130
    text = "\n".join(line for _, line in w.seen)
    assert "Traceback" not in text
    assert w.seen[-1] == ("out", "geomgen: watch ended; outputs left as they were")
    assert not [p for p in out.iterdir() if p.name.startswith(".") and "tmp" in p.name]


def test_watch_refuses_a_port_in_use(design_copy: Path, tmp_path: Path) -> None:
    import socket

    with socket.socket() as taken:
        taken.bind(("127.0.0.1", 0))
        taken.listen()
        port = taken.getsockname()[1]
        result = subprocess.run(
            [
                sys.executable,
                "-c",
                "import sys; from geomgen.cli import main; sys.exit(main())",
                "watch",
                str(design_copy),
                "--port",
                str(port),
                "--out",
                str(tmp_path / "out"),
            ],
            capture_output=True,
            text=True,
            timeout=60,
            env={**os.environ, "PYTHONPATH": str(ROOT)},
        )
    assert result.returncode == 2
    assert result.stderr.startswith(f"geomgen: error: --port: cannot serve on 127.0.0.1:{port} ")
    assert len(result.stderr.strip().splitlines()) == 1


@pytest.mark.slow
def test_watch_builds_again_from_the_cache(design_copy: Path, tmp_path: Path) -> None:
    """Build mode: an edit of the rudder's deflection rebuilds from the cache; the diff names
    the rudder's changed part (parts.json) and no quantity of the sizing."""
    out = tmp_path / "out"
    w = Watcher(design_copy, out)
    try:
        w.wait_for(r"^geomgen: built in .* s; outputs in ", timeout=300, stream="out")
        text = design_copy.read_text(encoding="utf-8")
        rudder = text[text.index("    rudder:") : text.index("drawings:")]
        turned = rudder.replace("hinge_at: 0.6\n", 'hinge_at: 0.6\n      deflection: "5 deg"\n')
        assert turned != rudder
        _edit(design_copy, rudder, turned)
        w.wait_for(r"changed since the last good state", timeout=300, stream="out")
        w.wait_for(r"parts changed")
        w.wait_for(r"^  \| rudder \|")
        checks = json.loads((out / "veyra-t2" / "checks.json").read_text(encoding="utf-8"))
        assert checks["passed"]
    finally:
        assert w.stop(signal.SIGINT) == 130


@pytest.mark.browser
def test_the_served_page_reloads_itself_after_a_rebuild(
    driver,  # noqa: F811
    design_copy: Path,
    tmp_path: Path,
) -> None:
    w = Watcher(design_copy, tmp_path / "out", "--size-only")
    try:
        w.wait_for(r"^geomgen: sized in ", stream="out")
        driver.get(w.url)
        assert driver.title.startswith("Veyra T2")
        driver.execute_script("window.stillTheFirstLoad = true;")
        before = driver.execute_script("return document.body.innerText")
        _edit(design_copy, "aspect_ratio: 7.8", "aspect_ratio: 8.2")
        w.wait_for(r"changed since the last good state", stream="out")
        deadline = time.monotonic() + 20
        while driver.execute_script("return window.stillTheFirstLoad === true"):
            assert time.monotonic() < deadline, "the page did not reload itself"
            time.sleep(0.1)
        after = driver.execute_script("return document.body.innerText")
        assert after != before
        assert driver.title.startswith("Veyra T2")
        errors = [e for e in driver.get_log("browser") if e["level"] == "SEVERE"]
        assert errors == []
    finally:
        assert w.stop() == 130
