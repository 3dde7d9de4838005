"""The build cache: entries keyed by a hash of exactly what they depend on (no CAD import).

An entry is a folder ``<root>/<key[:2]>/<key>/`` holding its files and ``manifest.json``
(the sha256 and size of every file). An entry is used only if its manifest is present and
every file matches it; a partial or corrupt entry is deleted and rebuilt, never used. Entries
are written into a temporary folder beside their place and renamed into it at the end, so an
interrupted write leaves no entry at all.

Keys hash JSON text of the inputs (sorted keys) plus the versions of geomgen, cadquery and
OCP, so a change of any of them misses the cache instead of reusing stale solids.
"""

from __future__ import annotations

import hashlib
import json
import os
import shutil
import tempfile
from collections.abc import Callable, Iterable
from dataclasses import asdict, is_dataclass
from importlib import metadata
from pathlib import Path
from typing import Any

import numpy as np

from geomgen import __version__
from geomgen.store.folder import cannot_write

MANIFEST = "manifest.json"
#: a temporary entry folder older than this (s) was left by a killed run (SIGKILL, power
#: loss) and is removed; a younger one may belong to a build running beside this one
STALE_TEMPORARY_AGE = 3600.0


def versions() -> dict[str, str]:
    """Versions of what the solids depend on (read from package metadata: no import)."""
    out = {"geomgen": __version__}
    for dist in ("cadquery", "cadquery-ocp"):
        try:
            out[dist] = metadata.version(dist)
        except metadata.PackageNotFoundError:  # pragma: no cover - installed with geomgen
            out[dist] = "missing"
    return out


def _plain(value: Any) -> Any:
    """JSON-ready form of dataclasses, tuples, arrays and floats (repr keeps every bit)."""
    if is_dataclass(value) and not isinstance(value, type):
        return {k: _plain(v) for k, v in asdict(value).items()}
    if isinstance(value, dict):
        return {str(k): _plain(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [_plain(v) for v in value]
    if isinstance(value, np.ndarray):
        return hashlib.sha256(np.ascontiguousarray(value, dtype=np.float64).tobytes()).hexdigest()
    if isinstance(value, float):
        return repr(value)
    if isinstance(value, (np.floating, np.integer)):
        return repr(value.item())
    if isinstance(value, Path):
        return str(value)
    if isinstance(value, bytes):
        return hashlib.sha256(value).hexdigest()
    return value


def key_of(*parts: Any) -> str:
    """sha256 of the inputs and the versions."""
    text = json.dumps([versions(), *(_plain(p) for p in parts)], sort_keys=True)
    return hashlib.sha256(text.encode("utf-8")).hexdigest()


def file_digest(path: Path) -> str:
    h = hashlib.sha256()
    with open(path, "rb") as fh:
        for block in iter(lambda: fh.read(1 << 20), b""):
            h.update(block)
    return h.hexdigest()


def manifest_of(folder: Path, skip: Iterable[str] = (MANIFEST,)) -> dict[str, list]:
    """{relative path: [sha256, size]} of every file under a folder."""
    skipped = set(skip)
    out = {}
    for p in sorted(folder.rglob("*")):
        rel = p.relative_to(folder).as_posix()
        if p.is_file() and rel not in skipped:
            out[rel] = [file_digest(p), p.stat().st_size]
    return out


def intact(folder: Path, skip: Iterable[str] = (MANIFEST,)) -> bool:
    """True if the folder's manifest is readable and every file matches it, none missing and
    none extra."""
    try:
        recorded = json.loads((folder / MANIFEST).read_text(encoding="utf-8"))
    except (OSError, ValueError):
        return False
    return recorded.get("files") == manifest_of(folder, skip)


class Cache:
    """Entries under ``root`` (usually ``<out>/.cache``). ``enabled=False`` (``--fresh``)
    ignores what is there and overwrites entries it makes."""

    def __init__(self, root: Path, enabled: bool = True):
        self.root = Path(root)
        self.enabled = enabled
        self.hits: list[str] = []
        self.misses: list[str] = []

    def folder(self, key: str) -> Path:
        return self.root / key[:2] / key

    def get(self, key: str, what: str) -> Path | None:
        """The entry's folder if it is there and intact; a damaged one is removed."""
        folder = self.folder(key)
        if self.enabled and folder.is_dir():
            if intact(folder):
                self.hits.append(what)
                return folder
            shutil.rmtree(folder, ignore_errors=True)
        self.misses.append(what)
        return None

    def put(self, key: str, write: Callable[[Path], None]) -> Path:
        """Make an entry: ``write(folder)`` fills a temporary folder, which gets its manifest
        and is renamed into place (an entry already there is replaced)."""
        final = self.folder(key)
        try:
            final.parent.mkdir(parents=True, exist_ok=True)
            _remove_stale_temporaries(final.parent)
            temp = Path(tempfile.mkdtemp(prefix=f".{key[:12]}.", dir=final.parent))
        except OSError as err:
            raise cannot_write(err, self.root, "the build cache") from None
        try:
            write(temp)
            files = manifest_of(temp)
            (temp / MANIFEST).write_text(
                json.dumps({"key": key, "files": files}, indent=1, sort_keys=True),
                encoding="utf-8",
            )
            if final.exists():
                shutil.rmtree(final, ignore_errors=True)
            try:
                os.replace(temp, final)
            except OSError:
                # another process (a sweep's other worker) made the same entry meanwhile:
                # same key, same inputs, so an intact one is as good as ours
                if not (final.is_dir() and intact(final)):
                    raise
                shutil.rmtree(temp, ignore_errors=True)
        except OSError as err:  # a full disk: one line (exit 1), no half-made entry
            shutil.rmtree(temp, ignore_errors=True)
            raise cannot_write(err, self.root, "the build cache") from None
        except BaseException:
            shutil.rmtree(temp, ignore_errors=True)
            raise
        return final


def _remove_stale_temporaries(shard: Path) -> None:
    """Remove temporary entry folders (names starting with '.') a killed run left behind."""
    import time

    now = time.time()
    for p in shard.glob(".*"):
        try:
            if p.is_dir() and now - p.stat().st_mtime > STALE_TEMPORARY_AGE:
                shutil.rmtree(p, ignore_errors=True)
        except OSError:
            pass
