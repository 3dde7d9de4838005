"""Output folders written all at once: files go into a temporary folder beside the target,
which replaces the target only when every file is written. A failure or an interrupt leaves the
previous outputs as they were and removes the temporary folder."""

from __future__ import annotations

import os
import shutil
import tempfile
from pathlib import Path
from types import TracebackType

from geomgen.errors import InputError


class OutputFolder:
    """Context manager: ``with OutputFolder(target) as f: f.write_text("a.json", text)``."""

    def __init__(self, target: Path):
        self.target = Path(target)
        self.temp: Path | None = None

    def __enter__(self) -> OutputFolder:
        parent = self.target.parent
        if self.target.exists() and not self.target.is_dir():
            raise InputError("output path exists and is not a folder", source=str(self.target))
        try:
            parent.mkdir(parents=True, exist_ok=True)
            self.temp = Path(tempfile.mkdtemp(prefix=f".{self.target.name}.", dir=parent))
        except OSError as err:
            raise InputError(
                f"cannot write the output folder ({err.strerror})", source=str(parent)
            ) from None
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
            return
        old = None
        if self.target.exists():
            old = self.target.with_name(f".{self.target.name}.old-{os.getpid()}")
            os.replace(self.target, old)
        os.replace(self.temp, self.target)
        os.chmod(self.target, 0o755)
        if old is not None:
            shutil.rmtree(old, ignore_errors=True)
