"""The printed model's booleans, mm (full size in, model size out of ``scaled``): a solid
scaled about the origin, holes drilled, a solid sliced between two planes of constant x, y or z,
sockets cut; every volume integrated to ``MODEL_EPS``.
"""

from __future__ import annotations

import math

import cadquery as cq
import numpy as np
from OCP.BRepBuilderAPI import BRepBuilderAPI_Transform
from OCP.gp import gp_Pnt, gp_Trsf

from geomgen.errors import GeometryError
from geomgen.solids.kernel import _checked, _place, _unit, _vec, volume

#: relative accuracy of the volumes of model shapes: measured here, the default 1e-8 took
#: 125 s on the demo's fuselage with its sockets cut, 1e-5 takes 7 s and agrees to 1e-6
MODEL_EPS = 1e-5


def scaled(shape: cq.Shape, k: float, part: str) -> cq.Shape:
    """The shape scaled by k about the origin (a full-size solid in mm -> model mm)."""
    trsf = gp_Trsf()
    trsf.SetScale(gp_Pnt(0.0, 0.0, 0.0), k)
    try:
        out = cq.Shape.cast(BRepBuilderAPI_Transform(shape.wrapped, trsf, True).Shape())
    except Exception as err:
        raise GeometryError(str(err), part=part, operation="scale") from err
    volume(out, MODEL_EPS)
    return _checked(out, part, "scale")


def hole_solid(hole) -> cq.Shape:
    """The solid a ``printed_model.holes.Hole`` removes: a cylinder or a square prism (mm)."""
    a, b = np.array(hole.start), np.array(hole.end)
    e = _unit(b - a)
    length = float(np.linalg.norm(b - a))
    if hole.up is None:
        return cq.Solid.makeCylinder(hole.size / 2.0, length, _vec(a), _vec(e))
    up = np.array(hole.up)
    up = _unit(up - np.dot(up, e) * e)
    side = np.cross(e, up)
    box = cq.Solid.makeBox(
        hole.size, hole.size, length, cq.Vector(-hole.size / 2, -hole.size / 2, 0.0)
    )
    return _place(box, np.column_stack([side, up, e]), a)


def drill(shape: cq.Shape, holes, part: str) -> cq.Shape:
    """The shape with every hole cut out (holes that miss it change nothing)."""
    if not holes:
        return shape
    try:
        out = shape.cut(*[hole_solid(h) for h in holes])
    except Exception as err:
        raise GeometryError(str(err), part=part, operation="drill holes") from err
    volume(out, MODEL_EPS)
    return _checked(out, part, "drill holes")


def slice_between(shape: cq.Shape, axis: int, lo: float, hi: float, part: str) -> cq.Shape:
    """The part of a shape with lo <= coordinate ``axis`` <= hi (mm; infinite ends allowed)."""
    bb = shape.BoundingBox()
    mins = np.array([bb.xmin, bb.ymin, bb.zmin]) - 10.0
    maxs = np.array([bb.xmax, bb.ymax, bb.zmax]) + 10.0
    if math.isfinite(lo):
        mins[axis] = lo
    if math.isfinite(hi):
        maxs[axis] = hi
    box = cq.Solid.makeBox(*(maxs - mins), _vec(mins))
    try:
        out = shape.intersect(box)
    except Exception as err:
        raise GeometryError(str(err), part=part, operation="cut into pieces") from err
    if not out.isValid():
        out = out.fix()
    volume(out, MODEL_EPS)
    return _checked(out, part, "cut into pieces")


def cut_away(shape: cq.Shape, others: list[cq.Shape], part: str) -> cq.Shape:
    """The shape minus others (a socket in the body for each surface root)."""
    try:
        out = shape.cut(*others)
    except Exception as err:
        raise GeometryError(str(err), part=part, operation="cut sockets") from err
    if not out.isValid():
        out = out.fix()
    volume(out, MODEL_EPS)
    return _checked(out, part, "cut sockets")
