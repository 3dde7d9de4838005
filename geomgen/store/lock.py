"""One geomgen run at a time per output folder.

``with FolderLock(out / name, "build"):`` takes a lock file beside the target folder,
``out/.<name>.lock``, with ``flock(LOCK_EX | LOCK_NB)`` and holds it for the whole run; the file
records its holder (pid, host name, command, start time in UTC). A second run that cannot take
the lock refuses at once with one line naming the holder (``FolderBusyError``, exit 1).

Stale locks: the kernel releases a flock when its process ends, however it ends (also by
SIGKILL), so a lock file left behind by a killed run is stale by construction: the next run
simply takes it and overwrites the holder record. Nothing is guessed from pids or ages.

The holder removes the file when it is done, while it still holds the lock, so that the output
root is left as it was. A run that opened the file just before and takes the lock only after
the removal holds a lock on a file no longer at that path; it sees this (the path names
another file, or none) and tries again on the path as it is now.
"""

from __future__ import annotations

import contextlib
import datetime
import fcntl
import json
import os
import socket
from pathlib import Path
from types import TracebackType

from geomgen.errors import FolderBusyError
from geomgen.store.folder import (
    cannot_write,
    prepare_parent,
    remove_empty,
    resolve_target,
    sweep_stale,
)

#: tries to take a lock whose file is being replaced under us before giving up
ATTEMPTS = 20


def lock_path(target: Path) -> Path:
    """The lock file of an output folder: hidden, beside it (not one of its outputs)."""
    target = Path(target)
    return target.with_name(f".{target.name}.lock")


class FolderLock:
    """Context manager: the lock of output folder ``target`` for a run of ``command``."""

    def __init__(self, target: Path, command: str):
        self.target = resolve_target(target)
        self.command = command
        self.path = lock_path(self.target)
        self.fd: int | None = None
        self.made: list[Path] = []  # folders made on the way to the target's parent

    def __enter__(self) -> FolderLock:
        prepare_parent(self.target, self.made)
        try:
            self._take()
        except BaseException:
            remove_empty(self.made)
            raise
        sweep_stale(self.target)  # ours alone now: what a killed run left is stale
        return self

    def _take(self) -> None:
        for _ in range(ATTEMPTS):
            try:
                fd = os.open(self.path, os.O_RDWR | os.O_CREAT | os.O_CLOEXEC, 0o644)
            except OSError as err:
                raise cannot_write(err, self.target.parent) from None
            try:
                fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
            except BlockingIOError:
                holder = _holder(fd)
                os.close(fd)
                raise FolderBusyError(
                    f"{self.target} is being written by another geomgen run ({holder}); "
                    "wait for it or use another --out"
                ) from None
            except OSError as err:  # e.g. no locks on this file system
                os.close(fd)
                raise cannot_write(err, self.target.parent, "the lock file") from None
            if _still_at(fd, self.path):
                break
            os.close(fd)  # the file was removed by the run that held it: take the new one
        else:
            raise FolderBusyError(
                f"{self.target}: its lock file {self.path.name} keeps being replaced; "
                "wait for the other geomgen runs or use another --out"
            )
        self.fd = fd
        self._record()

    def _record(self) -> None:
        """Who holds the lock, for the message of a run that finds it taken. Best effort:
        the lock holds without it (a full disk may refuse even these few bytes)."""
        assert self.fd is not None
        record = {
            "pid": os.getpid(),
            "host": socket.gethostname(),
            "command": self.command,
            "since": datetime.datetime.now(datetime.UTC).isoformat(timespec="seconds"),
        }
        with contextlib.suppress(OSError):
            os.ftruncate(self.fd, 0)
            os.pwrite(self.fd, (json.dumps(record) + "\n").encode("utf-8"), 0)

    def __exit__(
        self,
        exc_type: type[BaseException] | None,
        exc: BaseException | None,
        tb: TracebackType | None,
    ) -> None:
        if self.fd is None:
            return
        with contextlib.suppress(OSError):  # still holding the lock: the file is ours
            self.path.unlink()
        os.close(self.fd)  # releases the lock
        self.fd = None
        remove_empty(self.made)  # a refused run leaves no empty folders behind


def _still_at(fd: int, path: Path) -> bool:
    try:
        now = os.stat(path)
    except FileNotFoundError:
        return False
    mine = os.fstat(fd)
    return (mine.st_dev, mine.st_ino) == (now.st_dev, now.st_ino)


def _holder(fd: int) -> str:
    """The holder record in words: ``pid 1234 on host, build, since 2026-...``."""
    try:
        record = json.loads(os.pread(fd, 4096, 0).decode("utf-8"))
        return (
            f"pid {int(record['pid'])} on {record['host']}, {record['command']}, "
            f"since {record['since']}"
        )
    except (OSError, ValueError, KeyError, TypeError):
        return "its holder is not recorded yet"
