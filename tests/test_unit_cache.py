"""The cache of what a build makes from each solid (STL files, meshes, the checks of one
surface side or of the fuselage): reused when nothing it depends on changed, made anew when
anything did, damaged entries made anew, and never a cached check standing in for one that
would now fail."""

from __future__ import annotations

import shutil
from dataclasses import replace
from pathlib import Path

import pytest
from designs import demo_document
from test_cache import _write
from test_determinism import hashes as _hashes

import geomgen.checks.solid_checks
import geomgen.checks.tolerances
from geomgen.commands import part_outputs
from geomgen.commands.pipeline import run_build
from geomgen.errors import GeometryError

pytestmark = pytest.mark.slow

ONLY = {"fin", "stabilizer-right"}


@pytest.fixture
def first(tmp_path: Path):
    """The demo's fin and right stabilizer built once (a body of fixed length, so a tail
    change leaves the fin's mount alone), its outputs then removed: the cache stays."""
    doc = demo_document()
    doc["fuselage"].pop("end_behind_tails")
    path = _write(doc, tmp_path / "design.yaml")
    out = tmp_path / "out"
    result = run_build(path, out, None, ONLY)
    assert result.outputs_reused == ()
    hashes = _hashes(result.folder)
    shutil.rmtree(result.folder)
    return doc, path, out, hashes


def test_an_unchanged_unit_is_reused_and_writes_the_same_bytes(first) -> None:
    _, path, out, hashes = first
    again = run_build(path, out, None, ONLY)
    assert not again.unchanged  # the outputs were gone: a real build
    assert again.outputs_reused == ("stabilizer-right", "fin")
    assert _hashes(again.folder) == hashes


def test_a_tail_change_remakes_only_the_tail_unit(first) -> None:
    doc, path, out, _ = first
    doc["horizontal_tail"]["aspect_ratio"] = 4.9
    changed = run_build(_write(doc, path), out, None, ONLY)
    assert changed.outputs_reused == ("fin",)


def test_a_cached_check_never_hides_a_new_failure(first, monkeypatch) -> None:
    _, path, out, _ = first
    # a stricter limit than any mesh can meet: the cached (passing) checks were made with the
    # old limit, so they must not be used; the checks run again and fail
    strict = replace(geomgen.checks.tolerances.TOLERANCES, mesh_vs_solid_volume=0.0)
    monkeypatch.setattr(geomgen.checks.tolerances, "TOLERANCES", strict)
    monkeypatch.setattr(geomgen.checks.solid_checks, "TOLERANCES", strict)
    with pytest.raises(GeometryError, match="mesh volume vs solid volume"):
        run_build(path, out, None, ONLY)


def test_changed_source_code_misses_every_unit(first, monkeypatch) -> None:
    _, path, out, hashes = first
    monkeypatch.setattr(part_outputs, "source_digest", lambda: "another version of geomgen")
    again = run_build(path, out, None, ONLY)
    assert again.outputs_reused == ()
    assert _hashes(again.folder) == hashes


def test_a_damaged_unit_entry_is_made_anew(first) -> None:
    _, path, out, hashes = first
    damaged = 0
    for checks in (out / ".cache").rglob("checks.json"):  # only unit entries hold one
        checks.write_text(checks.read_text(encoding="utf-8").replace("false", "true"))
        data = bytearray(checks.read_bytes())
        data[len(data) // 2] ^= 0x01
        checks.write_bytes(bytes(data))
        damaged += 1
    assert damaged == 2
    again = run_build(path, out, None, ONLY)
    assert again.outputs_reused == ()
    assert _hashes(again.folder) == hashes
