"""Error types. Everything raises these; only the CLI maps them to exit codes.

InputError    -> the design file or an input file is wrong (exit 2)
GeometryError -> the geometry could not be built or a self-check failed (exit 1)
OutputError   -> the outputs could not be written: a full disk, an I/O error (exit 1)
FolderBusyError -> another geomgen run is writing the same output folder (exit 1)
"""

from __future__ import annotations


class GeomgenError(Exception):
    """Base of every error geomgen raises on purpose."""

    exit_code = 1

    def __reduce__(self):
        # raised in a worker process and re-raised in the main one with its key path, part
        # and operation (the default pickling would call __init__ with the message only)
        return (_remade, (type(self), self.args, dict(self.__dict__)))


def _remade(cls: type, args: tuple, state: dict) -> GeomgenError:
    err = cls.__new__(cls)
    err.args = args
    err.__dict__.update(state)
    return err


class InputError(GeomgenError):
    """Bad design file, bad key or value, unreadable input file (exit code 2).

    The message should read ``<file>: <key.path>: <what is allowed> (got <value>)``.
    """

    exit_code = 2

    def __init__(self, message: str, *, source: str | None = None, path: str | None = None):
        self.source = source
        self.path = path
        self.detail = message
        parts = [p for p in (source, path) if p]
        super().__init__(": ".join([*parts, message]))


class GeometryError(GeomgenError):
    """The CAD kernel could not build a part, or a self-check failed (exit code 1)."""

    exit_code = 1

    def __init__(self, message: str, *, part: str | None = None, operation: str | None = None):
        self.part = part
        self.operation = operation
        prefix = " ".join(p for p in (part, operation) if p)
        super().__init__(f"{prefix}: {message}" if prefix else message)


class OutputError(GeomgenError):
    """The outputs could not be written although the input was good: a full disk, an I/O
    error (exit code 1). The message names the folder and the reason; nothing half-written
    is left behind."""

    exit_code = 1


class FolderBusyError(GeomgenError):
    """Another geomgen run holds the lock of the output folder (exit code 1)."""

    exit_code = 1
