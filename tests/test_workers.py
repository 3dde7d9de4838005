"""The build's worker processes (``geomgen.commands.workers``): a task runs after the tasks it
depends on and sees what they wrote; an error raised in a worker reaches the build with its key
path and part; a dependent of a failed task never runs; a worker that dies, or a build that is
interrupted, ends in one line and leaves no process behind; and the cache takes the same entry
from two processes at once (a sweep's workers share it)."""

from __future__ import annotations

import multiprocessing
import os
import signal
import time
from pathlib import Path

import pytest

from geomgen.commands.workers import Tasks, check_jobs, default_jobs
from geomgen.errors import GeometryError, InputError
from geomgen.store.cache import Cache, intact

pytestmark = pytest.mark.skipif(
    "fork" not in multiprocessing.get_all_start_methods(), reason="workers are forked"
)


# --- tasks: module-level, fn(context, *args) ---------------------------------------------------


def write_task(folder: Path, name: str, text: str) -> int:
    (folder / name).write_text(text, encoding="utf-8")
    return os.getpid()


def concat_task(folder: Path, names: list[str], into: str) -> str:
    text = "".join((folder / n).read_text(encoding="utf-8") for n in names)
    (folder / into).write_text(text, encoding="utf-8")
    return text


def bad_key_task(folder: Path) -> None:
    raise InputError("must be 1 to 3 (got 7)", source="design.yaml", path="wing.panels")


def bad_part_task(folder: Path) -> None:
    raise GeometryError("the loft failed", part="fin", operation="loft")


def die_task(folder: Path) -> None:
    os.kill(os.getpid(), signal.SIGKILL)


def sleep_task(folder: Path, seconds: float) -> int:
    (folder / f"sleeping-{os.getpid()}").write_text("", encoding="utf-8")
    time.sleep(seconds)
    return os.getpid()


def fuse_task(folder: Path) -> float:
    import cadquery as cq

    return kernel_boolean(cq)


def kernel_boolean(cq) -> float:
    """A union of a box and a sphere, run by the kernel on its parallel threads (mm^3)."""
    solid = cq.Workplane().box(2, 2, 2).union(cq.Workplane().sphere(1.3)).val()
    return solid.Volume()


def _alive(pid: int) -> bool:
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    # a zombie (dead, not yet reaped) counts as gone
    status = Path(f"/proc/{pid}/stat").read_text().split()[2] if Path("/proc").is_dir() else "R"
    return status != "Z"


# --- tests --------------------------------------------------------------------------------------


@pytest.mark.parametrize("jobs", [1, 2])
def test_a_task_runs_after_its_dependencies_and_reads_their_files(tmp_path, jobs) -> None:
    with Tasks(jobs, tmp_path) as tasks:
        a = tasks.add(write_task, "a", "first ")
        b = tasks.add(write_task, "b", "second ")
        c = tasks.add(concat_task, ["a", "b"], "c", after=[a, b])
        d = tasks.add(concat_task, ["c", "a"], "d", after=[c], priority=-1)
        assert tasks.result(d) == "first second first "
        pids = {tasks.result(a), tasks.result(b)}
    assert (tmp_path / "c").read_text(encoding="utf-8") == "first second "
    if jobs == 1:
        assert pids == {os.getpid()}  # in this process
    else:
        assert os.getpid() not in pids  # in the workers


@pytest.mark.parametrize("jobs", [1, 2])
def test_an_error_keeps_its_key_path_and_its_dependents_never_run(tmp_path, jobs) -> None:
    with Tasks(jobs, tmp_path) as tasks:
        bad = tasks.add(bad_key_task)
        after = tasks.add(write_task, "never", "x", after=[bad])
        part = tasks.add(bad_part_task)
        with pytest.raises(InputError) as err:
            tasks.result(after)
        assert err.value.path == "wing.panels" and err.value.source == "design.yaml"
        assert str(err.value) == "design.yaml: wing.panels: must be 1 to 3 (got 7)"
        with pytest.raises(GeometryError) as geo:
            tasks.result(part)
        assert (geo.value.part, geo.value.operation) == ("fin", "loft")
        assert str(geo.value) == "fin loft: the loft failed"
    assert not (tmp_path / "never").exists()


def test_a_worker_that_dies_gives_one_line(tmp_path) -> None:
    died = r"a worker process died .*--jobs 1"
    with pytest.raises(GeometryError, match=died), Tasks(2, tmp_path) as tasks:
        tasks.result(tasks.add(die_task))


def test_leaving_on_an_interrupt_ends_the_running_workers_at_once(tmp_path) -> None:
    start = time.monotonic()
    with pytest.raises(KeyboardInterrupt), Tasks(2, tmp_path) as tasks:
        tasks.add(sleep_task, 60.0)
        tasks.add(sleep_task, 60.0)
        deadline = time.monotonic() + 30
        while len(list(tmp_path.glob("sleeping-*"))) < 2:  # both workers are busy
            assert time.monotonic() < deadline
            time.sleep(0.05)
        raise KeyboardInterrupt
    assert time.monotonic() - start < 30  # not the tasks' 60 s
    pids = [int(p.name.split("-")[1]) for p in tmp_path.glob("sleeping-*")]
    deadline = time.monotonic() + 10
    while any(_alive(pid) for pid in pids):
        assert time.monotonic() < deadline, "a worker outlived the build"
        time.sleep(0.05)


@pytest.mark.slow
def test_workers_run_the_kernel_after_this_process_has_run_it(tmp_path) -> None:
    """An in-process build, then another (a script, watch, the tests): the second build's
    workers must not inherit the kernel's thread pool from this process (forked from it, a
    boolean in a worker waited forever)."""
    import cadquery as cq

    here = kernel_boolean(cq)  # the kernel's threads now run in this process
    for _ in range(2):
        with Tasks(2, tmp_path) as tasks:
            runs = [tasks.add(fuse_task) for _ in range(4)]
            got = [tasks.result(r, timeout=120) for r in runs]
        # the same union in each process: the box less the sphere's outside part
        assert got == pytest.approx([here] * 4, rel=1e-9)
        assert 8.0 < here < 8.0 + 4.0 / 3.0 * 3.141592653589793 * 1.3**3


def _put_same_entry(root: str, key: str, start_at: float) -> None:
    def write(folder: Path) -> None:
        for i in range(20):
            (folder / f"part-{i}.brep").write_bytes(b"solid" * 1000)
        time.sleep(max(0.0, start_at - time.time()))  # rename at the same moment

    Cache(Path(root)).put(key, write)


def test_two_processes_make_the_same_cache_entry_at_once(tmp_path) -> None:
    key = "ab" + "0" * 62
    ctx = multiprocessing.get_context("fork")
    start_at = time.time() + 1.0
    procs = [
        ctx.Process(target=_put_same_entry, args=(str(tmp_path), key, start_at)) for _ in range(4)
    ]
    for p in procs:
        p.start()
    for p in procs:
        p.join(30)
    assert [p.exitcode for p in procs] == [0, 0, 0, 0]
    entry = Cache(tmp_path).folder(key)
    assert intact(entry)
    assert len(list(entry.glob("*.brep"))) == 20
    assert not [p for p in entry.parent.iterdir() if p.name.startswith(".")]  # no temporaries


def test_jobs_limits() -> None:
    assert default_jobs() >= 1
    assert check_jobs(2) == 2
    for bad in (0, -1, 65):
        with pytest.raises(InputError, match=r"--jobs: must be 1 to 64"):
            check_jobs(bad)


def test_build_refuses_a_bad_jobs_count_in_one_line_before_any_work(tmp_path, capsys) -> None:
    from designs import DEMO

    from geomgen import cli

    out = tmp_path / "out"
    code = cli.main(["build", str(DEMO), "--jobs", "0", "--out", str(out)])
    assert code == 2
    assert capsys.readouterr().err.strip().splitlines() == [
        "geomgen: error: --jobs: must be 1 to 64 (got 0)"
    ]
    assert not out.exists()  # nothing written
