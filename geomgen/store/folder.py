"""Output folders written all at once: files go into a temporary folder beside the target,
which replaces the target only when every file is written. A failure or an interrupt leaves the
previous outputs as they were and removes the temporary folder.

A target that is not a folder, or a parent that cannot be made or written to (no permission,
a read-only file system, a file in the way), is bad input (``InputError``, exit 2); a full disk
or an I/O error while the outputs are written is ``OutputError`` (exit 1). Both are one line
naming the folder and the reason, and leave no temporary folder behind."""

from __future__ import annotations

import contextlib
import errno
import os
import re
import shutil
import tempfile
from pathlib import Path
from types import TracebackType

from geomgen.errors import InputError, OutputError

#: errors of the machine, not of the path the user gave: exit 1 rather than 2
NOT_THE_INPUT = frozenset({errno.ENOSPC, errno.EDQUOT, errno.EIO, errno.EFBIG, errno.ENOMEM})


def _reason(err: OSError) -> str:
    return err.strerror or str(err)


def cannot_write(err: OSError, where: Path, what: str = "the output folder"):
    """The one-line error for an OSError met while making or writing ``where``."""
    if err.errno in NOT_THE_INPUT:
        return OutputError(f"{where}: cannot write {what} ({_reason(err)})")
    return InputError(f"cannot write {what} ({_reason(err)})", source=str(where))


def resolve_target(target: Path) -> Path:
    """The folder the outputs go to: ``target``, or where it points if it is a symbolic link
    (the outputs are written through the link, which stays). A link to nothing is refused."""
    target = Path(target)
    if not target.is_symlink():
        return target
    real = target.resolve()
    if not real.exists():
        raise InputError(
            f"output folder is a symbolic link to {real}, which does not exist; make that "
            "folder or remove the link",
            source=str(target),
        )
    return real


def prepare_parent(target: Path, made: list[Path] | None = None) -> Path:
    """Check that ``target`` may become an output folder and make its parent; returns it.
    The folders it makes are appended to ``made`` (outermost first)."""
    target = Path(target)
    if target.exists() and not target.is_dir():
        raise InputError("output path exists and is not a folder", source=str(target))
    missing = []
    for folder in [target.parent, *target.parent.parents]:
        if folder.exists() or folder.is_symlink():
            break
        missing.append(folder)
    try:
        target.parent.mkdir(parents=True, exist_ok=True)
    except OSError as err:
        raise cannot_write(err, target.parent) from None
    if made is not None:
        made.extend(reversed(missing))
    return target.parent


def remove_empty(folders: list[Path]) -> None:
    """Remove those of ``folders`` (outermost first) that are empty, innermost first: what a
    refused run made on the way to its output folder."""
    for folder in reversed(folders):
        try:
            folder.rmdir()
        except OSError:
            return


def remove_tree(path: Path) -> None:
    """Remove a folder of ours, also one whose folders were made read-only (an old output
    folder a user protected): each folder is made writable first. Symbolic links inside are
    removed, never followed."""

    def writable(folder: str) -> None:
        try:
            os.chmod(folder, 0o700, follow_symlinks=False)
            with os.scandir(folder) as entries:
                subfolders = [e.path for e in entries if e.is_dir(follow_symlinks=False)]
        except OSError:
            return
        for sub in subfolders:
            writable(sub)

    if os.path.isdir(path) and not os.path.islink(path):
        writable(os.fspath(path))
        shutil.rmtree(path, ignore_errors=True)
    else:
        with contextlib.suppress(FileNotFoundError):
            os.unlink(path)


def temporary_names(target: Path) -> re.Pattern:
    """The names :class:`OutputFolder` gives its folders beside ``target``: ``.NAME.`` and
    eight characters of ``tempfile.mkdtemp`` (a-z, 0-9, _), or ``.NAME.old-PID``. A dotted
    design name (``a.b``) does not match those of another (``a``): its own hold a dot more."""
    return re.compile(rf"\.{re.escape(Path(target).name)}\.(?:[a-z0-9_]{{8}}|old-[0-9]+)")


def sweep_stale(target: Path) -> None:
    """Remove the temporary folders a killed run into ``target`` left beside it. Call it only
    while holding the lock of ``target`` (``store.lock.FolderLock``): then no other run is
    writing into it, and every such folder is stale by construction."""
    target = Path(target)
    names = temporary_names(target)
    try:
        entries = list(os.scandir(target.parent))
    except OSError:
        return
    for entry in entries:
        if names.fullmatch(entry.name):
            remove_tree(Path(entry.path))


class OutputFolder:
    """Context manager: ``with OutputFolder(target) as f: f.write_text("a.json", text)``."""

    def __init__(self, target: Path):
        self.target = resolve_target(target)
        self.temp: Path | None = None

    def __enter__(self) -> OutputFolder:
        parent = prepare_parent(self.target)
        try:
            self.temp = Path(tempfile.mkdtemp(prefix=f".{self.target.name}.", dir=parent))
        except OSError as err:
            raise cannot_write(err, parent) from None
        return self

    def path(self, name: str) -> Path:
        """Path of a file inside the folder being written."""
        assert self.temp is not None
        p = self.temp / name
        p.parent.mkdir(parents=True, exist_ok=True)
        return p

    def write_text(self, name: str, text: str) -> Path:
        p = self.path(name)
        p.write_text(text, encoding="utf-8")
        return p

    def __exit__(
        self,
        exc_type: type[BaseException] | None,
        exc: BaseException | None,
        tb: TracebackType | None,
    ) -> None:
        assert self.temp is not None
        if exc_type is not None:
            shutil.rmtree(self.temp, ignore_errors=True)
            if isinstance(exc, OSError):  # a full disk, an I/O error: one line, not a traceback
                where = f": {exc.filename}" if exc.filename else ""
                raise OutputError(
                    f"{self.target}: cannot write the outputs ({_reason(exc)}{where}); "
                    "the previous outputs are left as they were"
                ) from None
            return
        try:
            self._swap()
        except OSError as err:
            shutil.rmtree(self.temp, ignore_errors=True)
            raise OutputError(
                f"{self.target}: cannot put the new outputs in place ({_reason(err)})"
            ) from None

    def _swap(self) -> None:
        """The target replaced by the temporary folder; on failure the old target is back."""
        assert self.temp is not None
        old = None
        if self.target.exists():
            old = self.target.with_name(f".{self.target.name}.old-{os.getpid()}")
            os.replace(self.target, old)
        try:
            os.replace(self.temp, self.target)
        except OSError:
            if old is not None:
                os.replace(old, self.target)
            raise
        os.chmod(self.target, 0o755)
        if old is not None:
            remove_tree(old)
