"""Incremental rebuilds: the cache of solids, the kept outputs of an unchanged build, damaged
entries rebuilt, --fresh."""

from __future__ import annotations

import hashlib
from pathlib import Path

import pytest
import yaml
from designs import demo_document

from geomgen.commands.pipeline import run_build
from geomgen.store.cache import MANIFEST, Cache, key_of


def test_a_cache_entry_reads_back_only_when_intact(tmp_path: Path) -> None:
    store = Cache(tmp_path / "c")
    key = key_of("thing", 1.0)
    assert store.get(key, "thing") is None  # not there yet
    store.put(key, lambda f: (f / "a.txt").write_text("alpha", encoding="utf-8"))
    entry = store.get(key, "thing")
    assert entry is not None and (entry / "a.txt").read_text(encoding="utf-8") == "alpha"
    # damaged: one byte changed -> not used, removed
    (entry / "a.txt").write_text("alphA", encoding="utf-8")
    assert store.get(key, "thing") is None and not entry.exists()
    # partial: no manifest (an interrupted write) -> not used
    store.put(key, lambda f: (f / "a.txt").write_text("alpha", encoding="utf-8"))
    (store.folder(key) / MANIFEST).unlink()
    assert store.get(key, "thing") is None
    # an extra file is damage too
    store.put(key, lambda f: (f / "a.txt").write_text("alpha", encoding="utf-8"))
    (store.folder(key) / "b.txt").write_text("beta", encoding="utf-8")
    assert store.get(key, "thing") is None
    # --fresh ignores a good entry
    store.put(key, lambda f: (f / "a.txt").write_text("alpha", encoding="utf-8"))
    assert Cache(tmp_path / "c", enabled=False).get(key, "thing") is None


def test_keys_change_with_any_input() -> None:
    assert key_of("x", 0.1) == key_of("x", 0.1)
    assert key_of("x", 0.1) != key_of("x", 0.1 + 1e-15)  # every bit of a float counts
    assert key_of("x", {"a": 1, "b": 2}) == key_of("x", {"b": 2, "a": 1})


def _write(doc: dict, path: Path) -> Path:
    path.write_text(yaml.safe_dump(doc, sort_keys=False), encoding="utf-8")
    return path


def _hashes(folder: Path) -> dict[str, str]:
    return {
        p.relative_to(folder).as_posix(): hashlib.sha256(p.read_bytes()).hexdigest()
        for p in sorted(folder.rglob("*"))
        if p.is_file()
    }


@pytest.fixture(scope="module")
def tail_builds(tmp_path_factory: pytest.TempPathFactory):
    """The demo's fin and right stabilizer built, built again unchanged, then with the
    horizontal tail's aspect ratio changed."""
    tmp = tmp_path_factory.mktemp("cache")
    out = tmp / "out"
    only = {"fin", "stabilizer-right"}
    doc = demo_document()
    # a body of fixed length: with the demo's following body a tail change moves the body's
    # end, and so truly changes the fin's mount (tests/test_resizing.py covers that case)
    doc["fuselage"].pop("end_behind_tails")
    path = _write(doc, tmp / "design.yaml")
    first = run_build(path, out, None, only)
    before = _hashes(first.folder)
    again = run_build(path, out, None, only)
    after = _hashes(again.folder)
    doc["horizontal_tail"]["aspect_ratio"] = 4.9
    changed = run_build(_write(doc, path), out, None, only)
    return first, again, changed, before, after, out, path, only


def test_an_unchanged_build_keeps_every_output(tail_builds) -> None:
    first, again, _, before, after, _, _, _ = tail_builds
    assert set(first.rebuilt) == {"fin", "stabilizer-right"} and not first.reused
    assert again.unchanged
    assert after == before  # nothing rewritten, nothing lost


def test_a_horizontal_tail_change_rebuilds_only_the_horizontal_tail(tail_builds) -> None:
    _, _, changed, _, _, _, _, _ = tail_builds
    assert changed.rebuilt == ("stabilizer-right",)
    assert changed.reused == ("fin",)
    assert changed.checks > 0  # and all of them passed (run_build raises otherwise)


def test_a_damaged_cache_entry_is_rebuilt_not_used(tail_builds) -> None:
    _, _, _, _, _, out, path, only = tail_builds
    # damage every cached fin solid, then change the design so the build runs
    for brep in (out / ".cache").rglob("*.brep"):
        if brep.stat().st_size > 0:
            data = bytearray(brep.read_bytes())
            data[len(data) // 2] ^= 0xFF
            brep.write_bytes(bytes(data))
    doc = yaml.safe_load(path.read_text(encoding="utf-8"))
    doc["horizontal_tail"]["aspect_ratio"] = 5.0
    result = run_build(_write(doc, path), out, None, only)
    assert "fin" in result.rebuilt and not result.reused


def test_fresh_builds_everything_anew(tail_builds) -> None:
    _, _, _, _, _, out, path, only = tail_builds
    result = run_build(path, out, None, only, fresh=True)
    assert not result.unchanged and set(result.rebuilt) == only and not result.reused
