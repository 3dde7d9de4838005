"""Kernel helpers shared by the solids modules: validity checks, volumes and areas remembered
per shape, vectors, rigid placement, exact bounding boxes.

Geometry is in millimetres in the aircraft frame (x aft, y right, z up), the CAD package's
native unit; layout data (metres) is scaled by ``MM`` on the way in. Every kernel operation is
followed by a validity check (``_checked``) that raises GeometryError naming the part and the
operation.

Measured on cadquery 2.8 / OCP 7.9 (see DEVELOPERS.md): volumes come from Gauss-Kronrod
integration with a tolerance (``Shape.Volume()`` is off by up to 20 % on lofted B-spline
solids).
"""

from __future__ import annotations

import weakref
from collections.abc import Iterable

import cadquery as cq
import numpy as np
from OCP.BRepGProp import BRepGProp
from OCP.gp import gp_Trsf
from OCP.GProp import GProp_GProps

from geomgen.errors import GeometryError

MM = 1000.0  # mm per m


def _checked(shape: cq.Shape, part: str, operation: str) -> cq.Shape:
    if shape is None or not shape.isValid():
        raise GeometryError("the kernel returned an invalid shape", part=part, operation=operation)
    solids = shape.Solids()
    if not solids:
        raise GeometryError("the kernel returned no solid", part=part, operation=operation)
    if volume(shape) <= 0:
        raise GeometryError("the result has no volume", part=part, operation=operation)
    return shape


_VOLUMES: weakref.WeakKeyDictionary = weakref.WeakKeyDictionary()


def volume(shape: cq.Shape, eps: float | None = 1e-8) -> float:
    """Volume (model units^3) by adaptive Gauss-Kronrod integration, remembered per shape.

    Measured here: once a shape sharing the same faces has been meshed (a deflected copy
    written as STL), the integration on it can take 100 times longer, so every volume is
    computed once, right after the kernel operation that made the shape.
    """
    known = _VOLUMES.get(shape)
    if known is not None:
        return known
    props = GProp_GProps()
    if eps is None:
        BRepGProp.VolumePropertiesGK_s(shape.wrapped, props)
    else:
        BRepGProp.VolumePropertiesGK_s(shape.wrapped, props, eps)
    _VOLUMES[shape] = float(props.Mass())
    return _VOLUMES[shape]


def _vec(p: Iterable[float]) -> cq.Vector:
    x, y, z = (float(v) for v in p)
    return cq.Vector(x, y, z)


def _unit(v: np.ndarray) -> np.ndarray:
    return v / np.linalg.norm(v)


def _place(shape: cq.Shape, m: np.ndarray, t: np.ndarray) -> cq.Shape:
    """Move a shape by the rigid transform x -> m x + t (m orthonormal, right-handed)."""
    trsf = gp_Trsf()
    trsf.SetValues(
        m[0, 0], m[0, 1], m[0, 2], t[0],
        m[1, 0], m[1, 1], m[1, 2], t[1],
        m[2, 0], m[2, 1], m[2, 2], t[2],
    )  # fmt: skip
    return shape._apply_transform(trsf)


_AREAS: weakref.WeakKeyDictionary = weakref.WeakKeyDictionary()


def surface_area(shape: cq.Shape, eps: float = 1e-5) -> float:
    """Total area of the faces (model units^2) by adaptive Gauss integration, remembered per
    shape (like ``volume``)."""
    known = _AREAS.get(shape)
    if known is not None:
        return known
    props = GProp_GProps()
    BRepGProp.SurfaceProperties_s(shape.wrapped, props, eps)
    _AREAS[shape] = float(props.Mass())
    return _AREAS[shape]


def bounding_box(shape: cq.Shape) -> tuple[list[float], list[float]]:
    """(min, max) corners (mm) of the exact geometry's axis-aligned box (not the mesh's:
    after meshing, ``BoundingBox()`` grows by the triangles' tolerance)."""
    from OCP.Bnd import Bnd_Box
    from OCP.BRepBndLib import BRepBndLib

    box = Bnd_Box()
    BRepBndLib.AddOptimal_s(shape.wrapped, box, False, False)
    x0, y0, z0, x1, y1, z1 = box.Get()
    return [x0, y0, z0], [x1, y1, z1]
