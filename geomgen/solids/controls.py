"""Control surfaces cut free, mm in the aircraft frame (x aft, y right, z up), angles in rad.

Half-spaces, slabs between the streamwise side planes and cones about the hinge axis make the
regions of each control surface: the moving part's, the fixed part's cut (the cove) and the
region aft of the hinge plane (for the checks). ``build_side`` lofts one surface side and cuts
its control surfaces free; ``_deflect`` turns a moving part about its hinge axis.
"""

from __future__ import annotations

import math

import cadquery as cq
import numpy as np

from geomgen.errors import GeometryError
from geomgen.geometry.layout import ControlLayout, SurfaceLayout, fixed_part_name
from geomgen.geometry.sections import surface_sections, unit_section
from geomgen.solids.kernel import _VOLUMES, MM, _checked, _place, _unit, _vec, volume
from geomgen.solids.loft import loft
from geomgen.solids.records import ControlBuild, SideBuild


def _slab(key: str, side: str, s0: float, s1: float, centre: np.ndarray, reach: float):
    """Box between the two streamwise side planes at spanwise positions s0 < s1 (mm), reaching
    ``reach`` from ``centre`` in the other two directions."""
    x, y, z = centre[0] - reach, centre[1] - reach, centre[2] - reach
    if key == "vertical_tail":
        return cq.Solid.makeBox(2 * reach, 2 * reach, s1 - s0, cq.Vector(x, y, s0))
    if side == "right":
        return cq.Solid.makeBox(2 * reach, s1 - s0, 2 * reach, cq.Vector(x, s0, z))
    return cq.Solid.makeBox(2 * reach, s1 - s0, 2 * reach, cq.Vector(x, -s1, z))


def _half_space(point: np.ndarray, normal: np.ndarray, axis: np.ndarray, reach: float):
    """A box filling, up to ``reach`` (mm), the side of the plane through ``point`` containing
    ``axis`` that ``normal`` points into."""
    e1 = _unit(axis)
    e2 = _unit(normal - np.dot(normal, e1) * e1)
    e3 = np.cross(e1, e2)
    box = cq.Solid.makeBox(2 * reach, reach, 2 * reach, cq.Vector(-reach, 0.0, -reach))
    # box local axes x, y, z -> e1, e2, e3, origin -> point
    return _place(box, np.column_stack([e1, e2, e3]), point)


def _rotate_about(v: np.ndarray, axis: np.ndarray, angle: float) -> np.ndarray:
    """Rodrigues' rotation of vector v about the unit axis by angle (rad, right hand)."""
    k = _unit(axis)
    return (
        v * math.cos(angle)
        + np.cross(k, v) * math.sin(angle)
        + k * np.dot(k, v) * (1 - math.cos(angle))
    )


def _thickness_normal(sl: SurfaceLayout, s: float) -> np.ndarray:
    """Unit 'up' direction of the sections at s, turned by incidence and twist."""
    ss = sl.sizing
    theta = ss.spec.incidence + ss.planform.section_frame(s)[1]  # the ruled panel's twist
    if ss.planform.symmetric:
        return np.array([math.sin(theta), 0.0, math.cos(theta)])
    return np.array([math.sin(theta), math.cos(theta), 0.0])


def _half_thickness(
    sl: SurfaceLayout, s: float, fraction: float, points: int, te: float, dirs: tuple
) -> float:
    """Half the section's thickness at a chord fraction, mm."""
    af = unit_section(sl.sizing, s, points, te, dirs)
    yu = np.interp(fraction, af.upper[:, 0], af.upper[:, 1])
    yl = np.interp(fraction, af.lower[:, 0], af.lower[:, 1])
    return 0.5 * float(yu - yl) * sl.sizing.planform.at(s)[1] * MM


#: The rounded nose's radius over the local half-thickness: a little more than 1, so the nose
#: is round from skin to skin (a smaller radius leaves small steps at the skins).
NOSE_RADIUS_FACTOR = 1.05


def _cone(p0: np.ndarray, p1: np.ndarray, r0: float, r1: float) -> cq.Shape:
    """Truncated cone about the axis p0 -> p1, extended 20 % beyond both ends (mm)."""
    d = p1 - p0
    length = float(np.linalg.norm(d))
    ext = 0.2 * length
    slope = (r1 - r0) / length
    ra, rb = r0 - slope * ext, r1 + slope * ext
    start = p0 - _unit(d) * ext
    return cq.Solid.makeCone(
        max(ra, 1e-3), max(rb, 1e-3), length + 2 * ext, _vec(start), _vec(_unit(d))
    )


def _control_regions(
    sl: SurfaceLayout, side: str, c: ControlLayout, points: int, te: float, dirs: tuple
):
    """Regions for one control surface (mm): the moving part's (undeflected), the fixed part's
    cut (the cove: clears the moving part over +- deflection_range with the hinge gap), and the
    region aft of the hinge plane between the side planes (for checks)."""
    spec = next(x for x in sl.sizing.spec.controls if x.kind == c.kind)
    p0 = np.array(c.hinge[0].point) * MM
    p1 = np.array(c.hinge[-1].point) * MM
    axis = p1 - p0
    s_mid = 0.5 * (c.s_start + c.s_end)
    up = _thickness_normal(sl, s_mid)
    e1 = _unit(axis)
    up = _unit(up - np.dot(up, e1) * e1)
    aft = np.cross(e1, up)
    if aft[0] < 0:
        aft = -aft
    gap, side_gap = spec.hinge_gap * MM, spec.side_gap * MM
    r0 = NOSE_RADIUS_FACTOR * _half_thickness(
        sl, c.s_start, c.hinge[0].chord_fraction, points, te, dirs
    )
    r1 = NOSE_RADIUS_FACTOR * _half_thickness(
        sl, c.s_end, c.hinge[-1].chord_fraction, points, te, dirs
    )
    # side planes in the aircraft frame: y = +-s for a wing or tail, z = apex z + s for the fin
    offset = sl.sizing.apex_z if sl.key == "vertical_tail" else 0.0
    s0, s1 = (c.s_start + offset) * MM, (c.s_end + offset) * MM
    key = sl.key
    inner, outer = s0 + side_gap, s1 - side_gap
    if outer - inner <= 0:
        raise GeometryError(
            "side gaps leave nothing of the part", part=c.name, operation="control region"
        )
    name = c.name
    pf = sl.sizing.planform
    reach = 2.0 * (pf.semi_span + max(st.chord for st in pf.stations)) * MM
    try:
        aft_box = _half_space(p0, aft, axis, reach)
        moving_region = _slab(key, side, inner, outer, p0, reach).intersect(
            aft_box.fuse(_cone(p0, p1, r0, r1))
        )
        rng = spec.deflection_range
        cove = (
            _half_space(p0, _rotate_about(aft, e1, rng), axis, reach)
            .fuse(_half_space(p0, _rotate_about(aft, e1, -rng), axis, reach))
            .fuse(_cone(p0, p1, r0 + gap, r1 + gap))
        )
        cut_region = _slab(key, side, s0, s1, p0, reach).intersect(cove)
        aft_region = _slab(key, side, s0, s1, p0, reach).intersect(aft_box)
    except Exception as err:
        raise GeometryError(str(err), part=name, operation="control region") from err
    return moving_region, cut_region, aft_region, (p0, p1), (p0, aft)


def _hinge_turn(sl: SurfaceLayout, p0: np.ndarray, p1: np.ndarray, angle: float):
    """(a, b, degrees): the hinge axis pointing right (wing, tails) or up (fin) and the
    right-hand turn about it that deflects by ``angle`` (rad): positive = trailing edge down
    (wing, tails), trailing edge left (rudder)."""
    if sl.key == "vertical_tail":
        a, b = (p0, p1) if p1[2] > p0[2] else (p1, p0)  # axis pointing up
        return a, b, -math.degrees(angle)  # right-hand turn about +z moves the TE right
    a, b = (p0, p1) if p1[1] > p0[1] else (p1, p0)  # axis pointing right
    return a, b, math.degrees(angle)  # right-hand turn about +y moves the TE down


def _deflect(
    shape: cq.Shape, sl: SurfaceLayout, p0: np.ndarray, p1: np.ndarray, angle: float
) -> cq.Shape:
    """Turn a moving part about its hinge axis by ``angle`` (rad, see ``_hinge_turn``)."""
    if angle == 0.0:
        return shape
    a, b, degrees = _hinge_turn(sl, p0, p1, angle)
    return shape.rotate(_vec(a), _vec(b), degrees)


def undeflect_points(
    sl: SurfaceLayout, p0: np.ndarray, p1: np.ndarray, angle: float, points: np.ndarray
) -> np.ndarray:
    """Points (N, 3, mm) of a part turned by ``_deflect`` turned back to zero deflection (the
    same axis and sign, numpy only: for checks of exported meshes)."""
    pts = np.asarray(points, dtype=float)
    if angle == 0.0:
        return pts.copy()
    a, b, degrees = _hinge_turn(sl, p0, p1, angle)
    k = _unit(np.asarray(b, dtype=float) - np.asarray(a, dtype=float))
    v = pts - a
    c, s_ = math.cos(-math.radians(degrees)), math.sin(-math.radians(degrees))
    return a + v * c + np.cross(k, v) * s_ + np.outer(v @ k, k) * (1 - c)


def thickness_probe(
    shape: cq.Shape, point: np.ndarray, direction: np.ndarray, reach: float
) -> tuple[np.ndarray, np.ndarray] | None:
    """Where the line through ``point`` (mm) along ``direction`` enters and leaves the solid:
    the (lower, upper) surface points along the direction, or None if it misses."""
    d = _unit(np.asarray(direction, dtype=float))
    line = cq.Edge.makeLine(_vec(point - reach * d), _vec(point + reach * d))
    inside = shape.intersect(line)
    ends = [np.array(v.toTuple()) for v in inside.Vertices()]
    if len(ends) < 2:
        return None
    along = [float(np.dot(e - point, d)) for e in ends]
    return ends[int(np.argmin(along))], ends[int(np.argmax(along))]


def build_side(sl: SurfaceLayout, side: str, points: int, te: float, dirs: tuple) -> SideBuild:
    name = fixed_part_name(sl.key, side)
    secs = surface_sections(sl, side, points, te, dirs)
    whole = loft(secs.sections, name)
    fixed = whole
    controls = []
    for c in (c for c in sl.controls if c.side == side):
        spec = next(x for x in sl.sizing.spec.controls if x.kind == c.kind)
        moving_region, cut_region, aft_region, (p0, p1), plane = _control_regions(
            sl, side, c, points, te, dirs
        )
        try:
            fixed = _checked(fixed.cut(cut_region), name, f"cut {c.name}")
            moving0 = _checked(whole.intersect(moving_region), c.name, "intersect")
            aft_portion = _checked(whole.intersect(aft_region), c.name, "intersect aft region")
            cut_volume = volume(_checked(whole.intersect(cut_region), c.name, "intersect cove"))
            moving = _deflect(moving0, sl, p0, p1, spec.deflection)
            if not moving.isValid():
                raise GeometryError("invalid after turning", part=c.name, operation="deflect")
            _VOLUMES[moving] = volume(moving0)  # a rigid turn keeps the volume
        except GeometryError:
            raise
        except Exception as err:
            raise GeometryError(str(err), part=c.name, operation="cut") from err
        controls.append(
            ControlBuild(
                layout=c,
                moving_undeflected=moving0,
                moving=moving,
                axis=(p0, p1),
                hinge_plane=plane,
                aft_portion=aft_portion,
                cut_region_volume=cut_volume,
            )
        )
    return SideBuild(surface=sl, side=side, whole=whole, fixed=fixed, controls=tuple(controls))
