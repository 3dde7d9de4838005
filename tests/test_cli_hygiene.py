"""Command-line hygiene: a closed pipe ends quietly with 141, a full disk or an unwritable
output gives one line and exit 1 (2 for a bad --out), and an output folder is written by one
run at a time (a lock beside it, free again once its holder is killed).

The pipe and /dev/full cases run geomgen as a real process (``python -m geomgen.cli``): what
is tested is what the interpreter does at exit, which an in-process call cannot show."""

from __future__ import annotations

import errno
import json
import os
import signal
import subprocess
import sys
from pathlib import Path

import pytest

import geomgen.errors
import geomgen.store.folder
from geomgen.cli import main
from geomgen.errors import FolderBusyError
from geomgen.store.lock import FolderLock, lock_path

REPO = Path(__file__).resolve().parent.parent
DEMO = REPO / "examples" / "veyra-t2.yaml"
NAME = "veyra-t2"
#: what a shell reports for a process a broken pipe ended: 128 + SIGPIPE
BROKEN_PIPE = 128 + signal.SIGPIPE
#: more than a pipe holds (64 KiB on Linux), so that the writer meets the closed end
PIPE_CAPACITY = 65536


def _env() -> dict[str, str]:
    env = dict(os.environ)
    env["PYTHONPATH"] = os.pathsep.join(p for p in (str(REPO), env.get("PYTHONPATH")) if p)
    return env


def _command(*args: str) -> list[str]:
    return [sys.executable, "-m", "geomgen.cli", *args]


def _into_closed_pipe(*args: str) -> tuple[bytes, int, str]:
    """Run geomgen with stdout a pipe closed after its first line: (line, code, stderr)."""
    # bufsize=0: the first line is read byte by byte, so the child's output beyond it stays
    # in the pipe (or in the child) and must meet the closed end
    proc = subprocess.Popen(
        _command(*args),
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        bufsize=0,
        env=_env(),
        cwd=REPO,
    )
    first = proc.stdout.readline()
    proc.stdout.close()
    err = proc.stderr.read().decode("utf-8", "replace")
    proc.stderr.close()
    return first, proc.wait(timeout=120), err


def _into_full_disk(*args: str) -> tuple[int, str]:
    if not Path("/dev/full").exists():
        pytest.skip("no /dev/full here")
    with open("/dev/full", "wb") as full:
        done = subprocess.run(
            _command(*args), stdout=full, stderr=subprocess.PIPE, env=_env(), cwd=REPO, timeout=120
        )
    return done.returncode, done.stderr.decode("utf-8", "replace")


@pytest.fixture(scope="module")
def two_reports(tmp_path_factory: pytest.TempPathFactory) -> tuple[Path, Path]:
    """Two tiny output folders whose report.json differ in every one of 3000 quantities:
    the JSON diff is far longer than a pipe holds."""
    root = tmp_path_factory.mktemp("diff")
    folders = []
    for name, factor in (("a", 1.0), ("b", 2.0)):
        folder = root / name
        folder.mkdir()
        values = {f"q{i}": {"value": factor * i + 1.0, "unit": "m"} for i in range(3000)}
        (folder / "report.json").write_text(json.dumps({"values": values}), encoding="utf-8")
        folders.append(folder)
    return folders[0], folders[1]


# --- a closed pipe -------------------------------------------------------------------------------


def test_schema_into_a_closed_pipe_ends_quietly_with_141() -> None:
    first, code, err = _into_closed_pipe("schema")
    assert first == b"{\n"
    assert code == BROKEN_PIPE, err  # not -13: the process ends itself, cleanly
    assert "Traceback" not in err
    assert err == "", err


def test_diff_into_a_closed_pipe_ends_quietly_with_141(two_reports: tuple[Path, Path]) -> None:
    a, b = two_reports
    full = subprocess.run(
        _command("diff", str(a), str(b), "--format", "json"),
        capture_output=True,
        env=_env(),
        cwd=REPO,
        timeout=120,
    )
    assert full.returncode == 1  # they differ
    assert len(full.stdout) > 4 * PIPE_CAPACITY
    first, code, err = _into_closed_pipe("diff", str(a), str(b), "--format", "json")
    assert first == b"{\n"
    assert code == BROKEN_PIPE, err
    assert "Traceback" not in err
    assert err == "", err


def test_help_into_a_closed_pipe_is_not_an_error() -> None:
    """The help is shorter than a pipe holds: it is all written before the reader goes."""
    first, code, err = _into_closed_pipe("--help")
    assert first.startswith(b"usage: geomgen")
    assert code in (0, BROKEN_PIPE)
    assert "Traceback" not in err


# --- a full disk on standard output --------------------------------------------------------------


def _one_full_disk_line(err: str) -> str:
    assert "Traceback" not in err
    lines = err.splitlines()
    assert len(lines) == 1, err
    assert lines[0] == "geomgen: error: cannot write the output: No space left on device"
    return lines[0]


def test_schema_to_a_full_disk_is_one_line_and_exit_1() -> None:
    code, err = _into_full_disk("schema")
    assert code == 1, err
    _one_full_disk_line(err)


def test_diff_to_a_full_disk_is_one_line_and_exit_1(two_reports: tuple[Path, Path]) -> None:
    a, b = two_reports
    code, err = _into_full_disk("diff", str(a), str(b), "--format", "json")
    assert code == 1, err
    _one_full_disk_line(err)


def test_a_short_output_to_a_full_disk_fails_at_the_flush_in_one_line() -> None:
    """--version is a few bytes, refused only when they are flushed (argparse alone would
    drop the error and exit 0)."""
    code, err = _into_full_disk("--version")
    assert code == 1, err
    _one_full_disk_line(err)


# --- output folders that cannot be written -------------------------------------------------------


def _leftovers(root: Path) -> list[str]:
    """Hidden entries (temporary folders, lock files) left in an output root."""
    return sorted(p.name for p in root.iterdir() if p.name.startswith(".")) if root.exists() else []


def _size(out: Path, capsys: pytest.CaptureFixture[str]) -> tuple[int, list[str]]:
    code = main(["size", str(DEMO), "--out", str(out), "--no-drawings"])
    err = capsys.readouterr().err
    assert "Traceback" not in err
    return code, err.splitlines()


@pytest.mark.skipif(os.geteuid() == 0, reason="root writes through file modes")
def test_unwritable_output_parent_is_one_line(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    locked = tmp_path / "locked"
    locked.mkdir()
    locked.chmod(0o500)
    try:
        code, lines = _size(locked / "out", capsys)
    finally:
        locked.chmod(0o700)
    assert code == 2, lines  # a --out the user cannot write to: bad input, as before
    assert len(lines) == 1 and str(locked) in lines[0] and "Permission denied" in lines[0]
    assert list(locked.iterdir()) == []


def test_output_under_a_regular_file_is_one_line(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    """Root-proof: no mode bits let anyone make a folder inside a regular file."""
    (tmp_path / "file.txt").write_text("a file\n", encoding="utf-8")
    out = tmp_path / "file.txt" / "sub"
    code, lines = _size(out, capsys)
    assert code == 2, lines
    assert len(lines) == 1, lines
    assert lines[0].startswith(f"geomgen: error: {out}") and "Not a directory" in lines[0]
    assert sorted(p.name for p in tmp_path.iterdir()) == ["file.txt"]


def _no_space(*args, **kwargs):
    raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC))


@pytest.mark.parametrize(
    "where",
    ["temporary folder", "a file", "the swap"],
)
def test_a_full_disk_while_writing_outputs_is_one_line_and_exit_1(
    where: str, tmp_path: Path, capsys: pytest.CaptureFixture[str], monkeypatch
) -> None:
    out = tmp_path / "out"
    assert _size(out, capsys)[0] == 0
    before = {p.name: p.read_bytes() for p in (out / NAME).iterdir()}
    if where == "temporary folder":
        monkeypatch.setattr(geomgen.store.folder.tempfile, "mkdtemp", _no_space)
    elif where == "a file":
        monkeypatch.setattr(geomgen.store.folder.OutputFolder, "write_text", _no_space)
    else:
        monkeypatch.setattr(geomgen.store.folder.os, "replace", _no_space)
    code, lines = _size(out, capsys)
    assert code == 1, lines
    assert len(lines) == 1, lines
    assert lines[0].startswith("geomgen: error: ") and str(out) in lines[0]
    assert "No space left on device" in lines[0]
    # nothing half-written: the previous outputs as they were, no temporary folder, no lock
    assert {p.name: p.read_bytes() for p in (out / NAME).iterdir()} == before
    assert _leftovers(out) == []


def test_a_full_disk_on_the_swap_keeps_the_previous_outputs(tmp_path: Path, monkeypatch) -> None:
    """The old folder is moved aside first; when the new one cannot follow, it goes back."""
    target = tmp_path / "out" / NAME
    target.mkdir(parents=True)
    (target / "old.txt").write_text("old", encoding="utf-8")
    real = os.replace
    calls = []

    def second_fails(src, dst):
        calls.append((src, dst))
        if len(calls) == 2:
            _no_space()
        return real(src, dst)

    monkeypatch.setattr(geomgen.store.folder.os, "replace", second_fails)
    with (
        pytest.raises(geomgen.errors.OutputError, match="No space left"),
        geomgen.store.folder.OutputFolder(target) as folder,
    ):
        folder.write_text("new.txt", "new")
    assert sorted(p.name for p in target.iterdir()) == ["old.txt"]
    assert _leftovers(target.parent) == []


# --- the lock of an output folder ----------------------------------------------------------------

HOLDER = """
import sys, time
from pathlib import Path
from geomgen.store.lock import FolderLock
lock = FolderLock(Path(sys.argv[1]), "build")
lock.__enter__()
print("held", flush=True)
time.sleep(300)
"""


def _holder(target: Path) -> subprocess.Popen:
    proc = subprocess.Popen(
        [sys.executable, "-c", HOLDER, str(target)],
        stdout=subprocess.PIPE,
        text=True,
        env=_env(),
        cwd=REPO,
    )
    assert proc.stdout.readline() == "held\n"
    return proc


def test_a_locked_output_folder_is_refused_naming_the_holder_and_freed_by_its_death(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    out = tmp_path / "out"
    holder = _holder(out / NAME)
    try:
        code, lines = _size(out, capsys)
        assert code == 1, lines
        assert len(lines) == 1, lines
        line = lines[0]
        assert line.startswith(f"geomgen: error: {out / NAME} is being written by another ")
        assert f"(pid {holder.pid} on " in line and ", build, since 20" in line, line
        assert line.endswith("; wait for it or use another --out")
        assert not (out / NAME).exists()  # nothing written
    finally:
        holder.kill()  # SIGKILL: no chance to clean up
        holder.wait(timeout=30)
        holder.stdout.close()
    # the killed holder's lock file is left behind, stale: the next run takes it
    assert lock_path(out / NAME).exists()
    code, lines = _size(out, capsys)
    assert code == 0, lines
    assert (out / NAME / "report.json").is_file()
    assert _leftovers(out) == []  # the lock file is not an output and does not stay


def test_two_runs_one_after_the_other_both_succeed(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    out = tmp_path / "out"
    for _ in range(2):
        assert _size(out, capsys)[0] == 0
        assert not lock_path(out / NAME).exists()
        assert sorted(p.name for p in (out / NAME).iterdir()) == ["report.json", "report.md"]


def test_the_lock_records_its_holder_and_refuses_a_second_taker(tmp_path: Path) -> None:
    target = tmp_path / "out" / "plane"
    with FolderLock(target, "model") as lock:
        record = json.loads(lock_path(target).read_text(encoding="utf-8"))
        assert record["pid"] == os.getpid() and record["command"] == "model"
        assert record["host"] and record["since"].endswith("+00:00")
        # a lock on another folder of the same root is another lock
        with FolderLock(target.with_name("other"), "size"):
            pass
        busy = rf"pid {os.getpid()} on .*, model, since"
        with pytest.raises(FolderBusyError, match=busy), FolderLock(target, "size"):
            pass
        assert lock.fd is not None
    assert not lock_path(target).exists()
    assert not target.exists()  # a lock makes no output folder


def test_a_lock_file_removed_under_a_taker_is_taken_anew(tmp_path: Path, monkeypatch) -> None:
    """A run that opened the lock file just before its holder removed it does not keep a lock
    on the removed file: it sees the path name another file (or none) and takes that one."""
    import geomgen.store.lock

    target = tmp_path / "plane"
    path = lock_path(target)
    real = geomgen.store.lock.fcntl.flock
    opened = []

    def removed_first(fd, how):
        opened.append(os.fstat(fd).st_ino)
        if len(opened) == 1:
            path.unlink()  # the holder, done, removes its file between our open and flock
        return real(fd, how)

    monkeypatch.setattr(geomgen.store.lock.fcntl, "flock", removed_first)
    with FolderLock(target, "size") as lock:
        assert len(opened) == 2
        assert os.fstat(lock.fd).st_ino == path.stat().st_ino == opened[1]
    assert not path.exists()


def test_the_holder_record_of_a_stale_lock_file_is_overwritten(tmp_path: Path) -> None:
    target = tmp_path / "plane"
    lock_path(target).write_text('{"pid": 1, "host": "gone", "command": "build"}\n' * 50)
    with FolderLock(target, "size"):
        record = json.loads(lock_path(target).read_text(encoding="utf-8"))
        assert record["pid"] == os.getpid() and record["command"] == "size"


def test_a_full_disk_in_the_build_cache_is_one_line_and_no_half_made_entry(
    tmp_path: Path,
) -> None:
    from geomgen.store.cache import Cache

    def fill(folder: Path) -> None:
        (folder / "part.brep").write_text("half", encoding="utf-8")
        _no_space()

    cache = Cache(tmp_path / ".cache")
    with pytest.raises(geomgen.errors.OutputError) as caught:
        cache.put("ab" * 32, fill)
    assert str(caught.value) == (
        f"{tmp_path / '.cache'}: cannot write the build cache (No space left on device)"
    )
    assert [p for p in (tmp_path / ".cache").rglob("*") if p.is_file()] == []


def test_a_sweep_into_a_locked_sweep_folder_is_refused_naming_the_holder(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    out = tmp_path / "out"
    holder = _holder(out / f"{NAME}-sweep")
    try:
        code = main(["sweep", str(DEMO), "--out", str(out), "--vary", "wing.aspect_ratio=7.4,8.2"])
        lines = capsys.readouterr().err.strip().splitlines()
        assert code == 1, lines
        assert len(lines) == 1 and f"(pid {holder.pid} on " in lines[0], lines
        assert not (out / f"{NAME}-sweep").exists()  # nothing written
    finally:
        holder.kill()
        holder.wait(timeout=30)
        holder.stdout.close()
