"""What every self-check shares: the ``Check`` record with its pass rules (relative,
absolute, yes/no, at least) and triangle meshes loaded into trimesh with coincident vertices
merged. Lengths in mm, areas in mm^2, volumes in mm^3 (the solids' unit).
"""

from __future__ import annotations

from dataclasses import asdict, dataclass

import numpy as np
import trimesh


@dataclass(frozen=True)
class Check:
    name: str  # what is checked, e.g. "mesh volume vs solid volume"
    part: str  # part or surface side it concerns
    measured: float
    expected: float
    tolerance: float  # allowed |measured - expected| / |expected| (relative), or absolute
    relative: bool
    unit: str
    passed: bool

    def as_dict(self) -> dict:
        return asdict(self)


def _rel(name: str, part: str, measured: float, expected: float, tol: float, unit: str) -> Check:
    ok = bool(np.isfinite(measured) and abs(measured - expected) <= tol * abs(expected))
    return Check(name, part, float(measured), float(expected), tol, True, unit, ok)


def _abs(name: str, part: str, measured: float, expected: float, tol: float, unit: str) -> Check:
    ok = bool(np.isfinite(measured) and abs(measured - expected) <= tol)
    return Check(name, part, float(measured), float(expected), tol, False, unit, ok)


def _flag(name: str, part: str, ok: bool) -> Check:
    return Check(name, part, float(ok), 1.0, 0.0, False, "yes/no", bool(ok))


def load_mesh(vertices: np.ndarray, faces: np.ndarray) -> trimesh.Trimesh:
    """A trimesh with coincident vertices merged (faces carry their own copies of edge nodes)."""
    mesh = trimesh.Trimesh(vertices=vertices, faces=faces, process=True)
    mesh.merge_vertices()
    return mesh


def _at_least(name: str, part: str, measured: float, minimum: float, unit: str) -> Check:
    """A one-sided check: passes when ``measured`` >= ``minimum`` (expected = the minimum)."""
    ok = bool(np.isfinite(measured) and measured >= minimum)
    return Check(name, part, float(measured), float(minimum), 0.0, False, unit, ok)
