"""Outputs are a function of the design alone: a clean build, a build whose solids all come from
the cache, a build resumed after the first one was killed (SIGKILL) once its solids were built,
a build that finds its cache entries damaged, a ``--fresh`` build beside a full cache, and a
build on one worker process (``--jobs 1``) against the clean one on two write the same bytes in
every file.

Every build runs in a fresh interpreter (as a user runs it), so each is its process's first
STEP export (OCCT numbers assembly occurrences from a per-process counter)."""

from __future__ import annotations

import os
import signal
import subprocess
import sys
from pathlib import Path

import pytest
import yaml
from designs import ROOT, demo_document
from test_determinism import assert_same_files

from geomgen.store import stamp

pytestmark = pytest.mark.slow

CODE = "import sys; from geomgen.cli import main; sys.exit(main(sys.argv[1:]))"
NAME = "veyra-t2"


def _env() -> dict[str, str]:
    env = {k: v for k, v in os.environ.items() if k != stamp.ENV_KEY}
    env["PYTHONPATH"] = os.pathsep.join(filter(None, [str(ROOT), env.get("PYTHONPATH")]))
    return env


def _build(design: Path, out: Path, *extra: str) -> str:
    done = subprocess.run(
        [sys.executable, "-c", CODE, "build", str(design), "--out", str(out), *extra],
        env=_env(),
        capture_output=True,
        text=True,
    )
    assert done.returncode == 0, done.stderr
    return done.stdout


def _assert_no_process_writes_into(out: Path, wait: float = 10.0) -> None:
    """No process left whose command line names ``out`` (a build's workers are forked, so
    they carry its arguments), within ``wait`` seconds."""
    import time

    deadline = time.monotonic() + wait
    while True:
        left = []
        for cmdline in Path("/proc").glob("[0-9]*/cmdline"):
            try:
                if str(out).encode() in cmdline.read_bytes():
                    left.append(cmdline.parent.name)
            except OSError:
                pass  # ended meanwhile
        if not left or time.monotonic() > deadline:
            break
        time.sleep(0.1)
    assert not left, f"processes still running for {out}: {left}"


def _brep_files(out: Path) -> list[Path]:
    return sorted((out / ".cache").rglob("*.brep"))


@pytest.fixture(scope="module")
def design(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """The demo re-sized to a 46 kn stall speed (the case the path difference was measured on);
    one design file for every build, so the reports name the same source."""
    doc = demo_document()
    doc["requirements"]["stall_speed"] = "46 kn"
    path = tmp_path_factory.mktemp("design") / f"{NAME}.yaml"
    path.write_text(yaml.safe_dump(doc, sort_keys=False), encoding="utf-8")
    return path


@pytest.fixture(scope="module")
def clean(design: Path, tmp_path_factory: pytest.TempPathFactory) -> Path:
    """A clean build: a fresh output root, so no cache."""
    out = tmp_path_factory.mktemp("clean")
    stdout = _build(design, out, "--jobs", "2")
    assert "reused" not in stdout
    return out / NAME


def test_a_build_from_the_cache_equals_a_clean_build(design, clean, tmp_path) -> None:
    _build(design, tmp_path)
    import shutil

    shutil.rmtree(tmp_path / NAME)  # the outputs go, the cache stays
    stdout = _build(design, tmp_path)
    # every solid came from the cache: wing and stabilizer (each side), fin and fuselage
    assert "reused 6 solid(s) from the cache" in stdout, stdout
    assert_same_files(clean, tmp_path / NAME)


def test_a_build_resumed_after_a_kill_equals_a_clean_build(design, clean, tmp_path) -> None:
    proc = subprocess.Popen(
        [sys.executable, "-c", CODE, "build", str(design), "--out", str(tmp_path)],
        env=_env(),
        stdout=subprocess.PIPE,
        stderr=subprocess.DEVNULL,
        text=True,
    )
    assert proc.stdout is not None
    try:
        for line in proc.stdout:
            if "built" in line and "solids" in line:  # the solids are in the cache
                os.kill(proc.pid, signal.SIGKILL)
                break
    finally:
        proc.kill()
        proc.wait()
    assert proc.returncode == -signal.SIGKILL
    _assert_no_process_writes_into(tmp_path)  # its workers died with it
    assert not (tmp_path / NAME).exists()  # killed before its outputs were swapped in
    assert _brep_files(tmp_path)
    stdout = _build(design, tmp_path)
    assert "reused" in stdout
    assert_same_files(clean, tmp_path / NAME)


def test_a_build_over_a_damaged_cache_equals_a_clean_build(design, clean, tmp_path) -> None:
    _build(design, tmp_path)
    import shutil

    shutil.rmtree(tmp_path / NAME)
    breps = _brep_files(tmp_path)
    assert breps
    for p in breps[::2]:  # every other solid file cut to half its length
        data = p.read_bytes()
        p.write_bytes(data[: len(data) // 2])
    stdout = _build(design, tmp_path)
    assert "reused 6 solid(s)" not in stdout  # the damaged entries were built again
    assert_same_files(clean, tmp_path / NAME)


def test_a_fresh_build_beside_a_full_cache_equals_a_clean_build(design, clean, tmp_path) -> None:
    _build(design, tmp_path)
    stdout = _build(design, tmp_path, "--fresh")  # ignores the cache and the kept outputs
    assert "reused" not in stdout and "unchanged" not in stdout
    assert_same_files(clean, tmp_path / NAME)


def test_a_build_on_one_worker_equals_a_build_on_two(design, clean, tmp_path) -> None:
    stdout = _build(design, tmp_path, "--jobs", "1")
    assert "reused" not in stdout
    assert_same_files(clean, tmp_path / NAME)
