"""Lofted surfaces, mm in the aircraft frame (x aft, y right, z up): the closed wire of a
placed section and the ruled loft through every station of a surface side.

Measured on cadquery 2.8 / OCP 7.9 (see DEVELOPERS.md): a section is an upper and a lower
spline meeting at the leading edge (unit end tangents, ``scale=False``: the default scaling can
make a spline overshoot, after which booleans silently come back empty) plus a trailing-edge
line; surfaces are ruled lofts through all stations (a smooth loft would round off a crank).
"""

from __future__ import annotations

import cadquery as cq
import numpy as np

from geomgen.errors import GeometryError
from geomgen.geometry.sections import PlacedSection
from geomgen.solids.kernel import MM, _checked, _unit, _vec


def section_wire(sec: PlacedSection, part: str) -> cq.Wire:
    """Closed wire: upper spline TE -> LE, lower spline LE -> TE, trailing-edge line (mm)."""
    up = sec.upper[::-1] * MM  # TE -> LE
    lo = sec.lower * MM  # LE -> TE
    le_tangent = _unit(lo[1] - up[-2])  # central difference through the leading edge
    up_te = _unit(up[1] - up[0])
    lo_te = _unit(lo[-1] - lo[-2])
    up_v = [_vec(p) for p in up]
    lo_v = [_vec(p) for p in lo]
    lo_v[0] = up_v[-1]
    # The same parameter at the same grid point of every section (all sections share one
    # cosine grid), so the ruled loft joins corresponding points: chord-length parameters
    # would pair different chord fractions on sections of different shape.
    params = list(np.linspace(0.0, 1.0, len(up_v)))
    try:
        e_up = cq.Edge.makeSpline(
            up_v, tangents=[_vec(up_te), _vec(le_tangent)], parameters=params, scale=False
        )
        e_lo = cq.Edge.makeSpline(
            lo_v, tangents=[_vec(le_tangent), _vec(lo_te)], parameters=params, scale=False
        )
        edges = [e_up, e_lo]
        gap = float(np.linalg.norm(lo[-1] - up[0]))
        if gap > 1e-6:
            edges.append(cq.Edge.makeLine(lo_v[-1], up_v[0]))
        wire = cq.Wire.assembleEdges(edges)
    except Exception as err:  # OCP raises its own exception types
        raise GeometryError(str(err), part=part, operation="section wire") from err
    for edge, pts in ((e_up, up), (e_lo, lo)):
        polyline = float(np.linalg.norm(np.diff(pts, axis=0), axis=1).sum())
        if abs(edge.Length() / polyline - 1.0) > 1e-3:
            raise GeometryError(
                f"a section spline at {sec.s:.3f} m strays from its points",
                part=part,
                operation="section wire",
            )
    if not wire.IsClosed():
        raise GeometryError(
            f"section at {sec.s:.3f} m is not closed", part=part, operation="section wire"
        )
    return wire


def loft(sections: tuple[PlacedSection, ...], part: str) -> cq.Shape:
    """Ruled loft through every station: straight-tapered panels, kinks kept at panel breaks,
    closed root and tip faces."""
    wires = [section_wire(s, part) for s in sections]
    try:
        solid = cq.Solid.makeLoft(wires, True)
    except Exception as err:
        raise GeometryError(str(err), part=part, operation="loft") from err
    return _checked(solid, part, "loft")
