"""What a build makes from each solid, cached per unit: a surface side (its fixed part and its
moving parts) or the fuselage. A unit's outputs are its parts' STL files and meshes, their mesh
checks, the side's surface and position checks (the fuselage's position and body checks).

A unit's cache key holds the key of its solids (so everything they were made from), its part
names and STL tolerances, the tolerances of the checks and a digest of geomgen's own source
code: a changed input, limit or check rule misses the cache, so a cached check can never stand
in for one that would now fail. A hit copies the unit's STL files and reads its checks and
meshes back; a miss makes them in the order a clean build does (STL files, then the checks, on
shapes just read back from their BREP files), so cached and clean builds write the same bytes.
Checks between units (junctions, the STEP read-back) are never cached.
"""

from __future__ import annotations

import hashlib
import json
import shutil
from dataclasses import dataclass, replace
from functools import lru_cache
from pathlib import Path

import numpy as np

PACKAGE = Path(__file__).resolve().parents[1]


@lru_cache(maxsize=1)
def source_digest() -> str:
    """sha256 of every Python file of the geomgen package (names and contents)."""
    h = hashlib.sha256()
    for p in sorted(PACKAGE.rglob("*.py")):
        h.update(p.relative_to(PACKAGE).as_posix().encode("utf-8") + b"\0")
        h.update(p.read_bytes() + b"\0")
    return h.hexdigest()


@dataclass
class UnitOutputs:
    """One unit's results, in the order a clean build makes them."""

    stl_checks: list  # of Check, part by part
    meshes: dict  # part name -> (vertices, faces) mm
    surface_checks: list  # a side's surface checks (none for the fuselage)
    position_checks: list
    body_checks: list  # the fuselage's checks (none for a side)

    LISTS = ("stl_checks", "surface_checks", "position_checks", "body_checks")


def _save(folder: Path, names: list[str], out: UnitOutputs, stl_dir: Path) -> None:
    for n in names:
        shutil.copyfile(stl_dir / f"{n}.stl", folder / f"{n}.stl")
        v, f = out.meshes[n]
        np.save(folder / f"{n}.vertices.npy", v, allow_pickle=False)
        np.save(folder / f"{n}.faces.npy", f, allow_pickle=False)
    data = {k: [c.as_dict() for c in getattr(out, k)] for k in UnitOutputs.LISTS}
    (folder / "checks.json").write_text(json.dumps(data), encoding="utf-8")


def _load(folder: Path, names: list[str], stl_dir: Path) -> UnitOutputs:
    from geomgen.checks.common import Check

    data = json.loads((folder / "checks.json").read_text(encoding="utf-8"))
    meshes = {}
    for n in names:
        shutil.copyfile(folder / f"{n}.stl", stl_dir / f"{n}.stl")
        meshes[n] = (
            np.load(folder / f"{n}.vertices.npy", allow_pickle=False),
            np.load(folder / f"{n}.faces.npy", allow_pickle=False),
        )
    lists = {k: [Check(**c) for c in data[k]] for k in UnitOutputs.LISTS}
    return UnitOutputs(meshes=meshes, **lists)


def unit_key(solid_key: str, parts, tessellation: float) -> str:
    """Cache key of a unit's outputs; ``parts``: (name, smallest local chord mm) pairs."""
    from geomgen.checks.tolerances import TOLERANCES
    from geomgen.store.cache import key_of

    return key_of(
        "unit outputs",
        solid_key,
        [(name, chord_min, tessellation) for name, chord_min in parts],
        TOLERANCES,
        source_digest(),
    )


def make_unit(build, unit, parts, stl_dir: Path, dirs: tuple) -> UnitOutputs:
    """Write the unit's STL files and run its checks (``unit``: a SideBuild, or None for
    the fuselage; ``build``: a Build holding at least the unit's side and parts)."""
    from geomgen.checks import solid_checks as checks
    from geomgen.solids import kernel, meshing

    d = build.layout.sizing.design
    stl_checks: list = []
    meshes = {}
    body_arrays = None
    for p in parts:
        deflection = d.solids.tessellation * p.local_chord_min
        stl = stl_dir / f"{p.name}.stl"
        if unit is None:  # pointed ends: the mesh without the tips' zero-area triangles
            body_arrays = meshing.body_mesh_arrays(p.shape, deflection)
            meshing.write_stl_arrays(*body_arrays, stl, stl.stem)
        else:
            meshing.write_stl(p.shape, stl, deflection)
        part_checks, meshes[p.name] = checks.stl_checks(p.name, stl, kernel.volume(p.shape))
        stl_checks += part_checks
    if unit is not None:
        alone = replace(build, sides=(unit,))
        surface = checks.surface_checks(alone, dirs)
        return UnitOutputs(
            stl_checks, meshes, surface, checks.position_checks(alone, meshes, dirs), []
        )
    body = parts[0]
    position = checks.position_checks(replace(build, sides=()), meshes, dirs)
    body_checks = checks.fuselage_checks(
        body.shape,
        build.layout.body,
        d.solids.tessellation * body.local_chord_min,
        arrays=body_arrays,  # the mesh just written: the body is meshed once
    )
    return UnitOutputs(stl_checks, meshes, [], position, body_checks)


def make_and_save(build, unit, parts, stl_dir: Path, dirs: tuple, store, key: str) -> Path:
    """Make a unit's outputs and save them as the cache entry ``key``; its folder."""
    names = [p.name for p in parts]
    out = make_unit(build, unit, parts, stl_dir, dirs)
    return store.put(key, lambda folder: _save(folder, names, out, stl_dir))


def load_unit(entry: Path, names: list[str], stl_dir: Path) -> UnitOutputs:
    """A unit's outputs read back from its entry, its STL files copied into ``stl_dir``: a
    unit just made is used as read back, as a cached one is, so both give the same bytes."""
    return _load(entry, names, stl_dir)
