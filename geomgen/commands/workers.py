"""Worker processes for one build: independent tasks run on ``jobs`` processes, each once the
tasks it depends on are done; with ``jobs == 1`` they run in this process, in the order they
were added.

Tasks hand their results over through files (cache entries, the output folder) and small
return values, and the main process reads everything back in a fixed order, so a build
writes the same bytes whatever ``jobs`` is. Workers are forked, not from this process but
from a fork server that has imported cadquery and trimesh once (see ``_worker_context``);
the context (the layout, the folders) is handed to each worker once. Each ignores Ctrl-C (the
main process ends them) and dies with the main process.
"""

from __future__ import annotations

import contextlib
import multiprocessing
import os
import signal
import threading
from collections.abc import Callable, Iterable
from concurrent.futures import Future, ProcessPoolExecutor
from concurrent.futures.process import BrokenProcessPool
from typing import Any

from geomgen.errors import GeometryError, InputError

#: the context every task gets as its first argument (set in each worker once)
_CONTEXT: Any = None

#: the most worker processes a build starts
MAX_JOBS = 64


def default_jobs() -> int:
    """All the CPUs this process may run on."""
    try:
        return max(1, len(os.sched_getaffinity(0)))
    except AttributeError:  # not Linux
        return max(1, os.cpu_count() or 1)


def check_jobs(jobs: int, key: str = "--jobs") -> int:
    if not 1 <= jobs <= MAX_JOBS:
        raise InputError(f"must be 1 to {MAX_JOBS} (got {jobs})", path=key)
    return jobs


#: what the fork server imports once, before it forks any worker
PRELOAD = ["geomgen.commands.build_tasks", "geomgen.solids.assembly", "geomgen.checks.solid_checks"]


def _worker_context():
    """Workers forked from a fork server: a clean process that imports cadquery and trimesh
    once and never runs the kernel itself. (Forking this process instead would copy the
    kernel's thread pool in whatever state an earlier build in it left it, and a boolean in
    the child can wait forever for threads that are not there: seen with two in-process
    builds.) None where there is no fork server (then the tasks run in this process)."""
    if "forkserver" not in multiprocessing.get_all_start_methods():
        return None
    ctx = multiprocessing.get_context("forkserver")
    ctx.set_forkserver_preload(PRELOAD)
    return ctx


def _die_with_parent() -> None:
    """Linux: the kernel kills this worker when the main process dies (even by SIGKILL)."""
    try:
        import ctypes

        libc = ctypes.CDLL(None, use_errno=True)
        libc.prctl(1, signal.SIGKILL)  # PR_SET_PDEATHSIG
    except (OSError, AttributeError):
        pass


def _start_worker(context: Any) -> None:
    global _CONTEXT
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    signal.signal(signal.SIGTERM, signal.SIG_DFL)
    _die_with_parent()
    _CONTEXT = context


def _call(fn: Callable, args: tuple) -> Any:
    if not os.environ.get("GEOMGEN_TRACE_TASKS"):
        return fn(_CONTEXT, *args)
    import sys
    import time

    start = time.time()
    try:
        return fn(_CONTEXT, *args)
    finally:  # a benchmark's view of the schedule: pid, task, start and end (epoch s)
        name = getattr(args[0], "name", "") if args else ""
        print(
            f"task {os.getpid()} {fn.__name__} {name} {start:.2f} {time.time():.2f}",
            file=sys.stderr,
            flush=True,
        )


class Tasks:
    """``with Tasks(jobs, context) as tasks: i = tasks.add(fn, a, after=[j]); tasks.result(i)``.

    ``fn(context, *args)`` must be a module-level function. Leaving the block on an error or
    an interrupt kills the workers at once (what they were writing is temporary)."""

    def __init__(self, jobs: int, context: Any):
        self.jobs = jobs
        self.context = context
        self._futures: list[Future] = []
        self._waiting: list[tuple[int, int, Callable, tuple, tuple[int, ...]]] = []
        self._running = 0  # tasks handed to the workers and not yet done
        self._lock = threading.Lock()
        self._pool: ProcessPoolExecutor | None = None
        mp_context = _worker_context() if jobs > 1 else None
        if mp_context is not None:
            self._pool = ProcessPoolExecutor(
                max_workers=jobs,
                mp_context=mp_context,
                initializer=_start_worker,
                initargs=(context,),
            )

    def __enter__(self) -> Tasks:
        return self

    def __exit__(self, exc_type, exc, tb) -> None:
        if self._pool is None:
            return
        if exc_type is None:
            self._pool.shutdown(wait=True)
            return
        # the worker processes (taken before shutdown drops them), killed: what they were
        # writing is temporary, and waiting for a long loft would hold up the interrupt
        processes = list((getattr(self._pool, "_processes", None) or {}).values())
        for p in processes:
            with contextlib.suppress(OSError, ValueError, AttributeError):
                p.kill()
        self._pool.shutdown(wait=False, cancel_futures=True)
        for p in processes:
            with contextlib.suppress(OSError, ValueError, AttributeError):
                p.join(5)

    def add(self, fn: Callable, *args: Any, after: Iterable[int] = (), priority: int = 0) -> int:
        """Queue ``fn(context, *args)`` to run once the tasks ``after`` are done; its id. Of
        the tasks ready to run, the lowest ``priority`` goes first, then the first added;
        no more than ``jobs`` are handed to the workers at a time, so a task that becomes
        ready later can still overtake those of a higher ``priority``."""
        outer: Future = Future()
        deps = tuple(after)
        with self._lock:
            task = len(self._futures)
            self._futures.append(outer)
        if self._pool is None:
            failed = next((self._futures[i] for i in deps if self._futures[i].exception()), None)
            if failed is not None:
                outer.set_exception(failed.exception())
                return task
            try:
                global _CONTEXT
                _CONTEXT = self.context
                outer.set_result(_call(fn, args))
            except Exception as err:  # re-raised by result(), as a worker's would be
                outer.set_exception(err)
            return task
        with self._lock:
            self._waiting.append((priority, task, fn, args, deps))
        self._submit_ready()
        return task

    def _submit_ready(self) -> None:
        """Hand ready tasks to idle workers, best first; a task whose dependency failed
        fails with the same error."""
        while True:
            with self._lock:
                pick = None
                for entry in sorted(self._waiting, key=lambda e: (e[0], e[1])):
                    deps = [self._futures[i] for i in entry[4]]
                    if not all(f.done() for f in deps):
                        continue
                    failed = next((f for f in deps if f.exception()), None)
                    if failed is not None or self._running < self.jobs:
                        pick = (entry, failed)
                        break
                if pick is None:
                    return
                entry, failed = pick
                self._waiting.remove(entry)
                if failed is None:
                    self._running += 1
            _, task, fn, args, _ = entry
            outer = self._futures[task]
            if failed is not None:
                outer.set_exception(failed.exception())
                continue
            assert self._pool is not None
            try:
                inner = self._pool.submit(_call, fn, args)
            except (BrokenProcessPool, RuntimeError) as err:
                with self._lock:
                    self._running -= 1
                outer.set_exception(_broken(err))
                continue
            inner.add_done_callback(lambda f, outer=outer: self._finished(f, outer))

    def _finished(self, inner: Future, outer: Future) -> None:
        with self._lock:
            self._running -= 1
        if inner.cancelled():
            outer.cancel()
        elif inner.exception() is not None:
            err = inner.exception()
            outer.set_exception(_broken(err) if isinstance(err, BrokenProcessPool) else err)
        else:
            outer.set_result(inner.result())
        self._submit_ready()

    def result(self, task: int, timeout: float | None = None) -> Any:
        """The task's return value once it is done; its error raised here."""
        return self._futures[task].result(timeout)


def _broken(err: BaseException) -> GeometryError:
    return GeometryError(
        f"a worker process died ({type(err).__name__}); run again with --jobs 1 to see why",
        operation="build",
    )
