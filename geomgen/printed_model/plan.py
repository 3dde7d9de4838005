"""The printable wind-tunnel model's plan: scale, pieces, cuts, deflections, Reynolds number
(pure math).

Model frame: the aircraft frame (x aft, y right, z up) scaled by the model scale k, in model
millimetres: a full-size point p (m) sits at 1000 k p. Every part that does not fit the
printer is cut into pieces across its long axis (the span of a surface side, x for the
fuselage); each joint gets dowel holes centred on its plane, a wing half gets a spar bore
through its pieces, the fuselage a sting bore, and every control surface a square key bar on
its hinge axis that holds each printed deflection at its angle. Where the dowels and bores can
go, keeping their walls, is searched in `holes`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from geomgen.design import ModelSpec
from geomgen.errors import GeometryError, InputError
from geomgen.geometry.frame import place
from geomgen.geometry.layout import Layout, SurfaceLayout, fixed_part_name, mean_line_offset
from geomgen.printed_model.holes import (
    DOWEL_CLEARANCE,
    Hole,
    _axis,
    _dowel_fractions,
    _scale_point,
    _spar_bore,
    _sting,
)
from geomgen.sizing.atmosphere import sutherland_viscosity

#: the gas constant of dry air used by the standard atmosphere, J/(kg K) (ICAO Doc 7488)
AIR_GAS_CONSTANT = 287.05287
#: pieces are planned this much shorter than the printer's longest side (mm), for the
#: oriented box's growth by dihedral and twist
LENGTH_MARGIN = 12.0
#: a joint stays this far (mm) from a control surface's end and from a root chord in the body
JOINT_CLEARANCE = 4.0
#: the most pieces a model may be printed in (fixed pieces and one piece per printed
#: deflection); a scale or printer needing more is refused before any solid is built
MAX_MODEL_PIECES = 200


@dataclass(frozen=True)
class Joint:
    """A cut between two pieces of one part (model mm)."""

    part: str
    index: int  # between piece index and index + 1 (1-based)
    station: float  # mm along the cut axis
    point: tuple[float, float, float]
    normal: tuple[float, float, float]  # unit, towards the next piece


@dataclass(frozen=True)
class PartPlan:
    """How one full-size part becomes printed pieces (model mm)."""

    part: str  # the full-size part name
    axis: int  # 0 x, 1 y, 2 z: the cut axis
    sign: float  # +1 if stations grow along +axis, -1 (left side) if along -axis
    start: float  # station of the part's inner end (mm along sign * axis)
    end: float
    joints: tuple[Joint, ...]
    holes: tuple[Hole, ...]

    @property
    def pieces(self) -> tuple[str, ...]:
        n = len(self.joints) + 1
        return (self.part,) if n == 1 else tuple(f"{self.part}-{i}" for i in range(1, n + 1))

    def bounds(self, i: int) -> tuple[float, float]:
        """Station range (mm) of piece i (0-based), inner to outer; the ends are open."""
        edges = [-math.inf, *(j.station for j in self.joints), math.inf]
        return edges[i], edges[i + 1]


@dataclass(frozen=True)
class Variant:
    """One printed deflection of a moving part."""

    part: str  # the full-size moving part, e.g. aileron-right
    name: str  # the piece, e.g. aileron-right-at+10deg
    deflection: float  # rad


# --- scale ------------------------------------------------------------------------------------


def parse_scale(text: str, path: str = "--scale") -> float:
    """Model scale k (model / full size) from ``1:N``."""
    parts = text.strip().split(":")
    try:
        if len(parts) != 2 or float(parts[0]) != 1.0:
            raise ValueError
        n = float(parts[1])
    except ValueError:
        raise InputError(
            f"must be a scale written 1:N, e.g. 1:10 (got {text!r})", path=path
        ) from None
    if not 1.0 <= n <= 1000.0:
        raise InputError(f"must be 1:N with N in [1, 1000] (got {text!r})", path=path)
    return 1.0 / n


def model_scale(layout: Layout, spec: ModelSpec, scale: float | None, span: float | None) -> float:
    """k from the command line (scale, or a model span in m) or else the design's model
    section; the wing's span gives k for a span."""
    d = layout.sizing.design
    wing_span = layout.sizing.wing.planform.span
    if scale is not None:
        k, path = scale, "--scale"
    elif span is not None:
        k, path = span / wing_span, "--span"
    elif spec.scale is not None:
        k, path = spec.scale, "model.scale"
    elif spec.span is not None:
        k, path = spec.span / wing_span, "model.span"
    else:
        raise InputError(
            "give the model's scale (1:N) or span, in the design or with --scale / --span",
            source=d.source,
            path="model.scale",
        )
    _check_pieces(layout, spec, k, path)
    return k


def piece_estimate(layout: Layout, spec: ModelSpec, k: float) -> int:
    """Pieces a model at scale k needs, from the layout alone (no CAD): every fixed surface
    side and the body in the fewest pieces the printer's longest side allows, plus one piece
    per printed deflection of each control surface."""
    f = 1000.0 * k
    longest = max(spec.build_volume) * 1000.0 - LENGTH_MARGIN
    count = len(deflections(layout, spec))
    for sl in layout.surfaces:
        length = (sl.sizing.planform.semi_span - sl.mount_s) * f
        count += len(sl.sides) * max(1, math.ceil(length / longest - 1e-9))
    if layout.body is not None:
        length = (layout.body[-1].x - layout.body[0].x) * f
        count += max(1, math.ceil(length / longest - 1e-9))
    return count


def _check_pieces(layout: Layout, spec: ModelSpec, k: float, path: str) -> None:
    """Refuse, before any solid is built, a model of absurdly many pieces or one whose
    surface roots do not fit the printer."""
    count = piece_estimate(layout, spec, k)
    if count > MAX_MODEL_PIECES:
        raise InputError(
            f"the model at 1:{1 / k:.4g} would be printed in about {count} pieces on a "
            f"{max(spec.build_volume) * 1000:.0f} mm printer; at most {MAX_MODEL_PIECES} are "
            f"made: choose a smaller scale or a larger model.build_volume",
            source=layout.sizing.design.source,
            path=path,
        )
    for sl in layout.surfaces:
        for side in sl.sides:
            _check_root_fits(sl.sizing.planform.root_chord, fixed_part_name(sl.key, side), spec, k)


def _check_root_fits(root_chord: float, name: str, spec: ModelSpec, k: float) -> None:
    wide = sorted(spec.build_volume)[1] * 1000.0
    if root_chord * 1000.0 * k > wide:
        raise GeometryError(
            f"the root chord is {root_chord * 1000.0 * k:.0f} mm at this scale, more than the "
            f"printer's {wide:.0f} mm",
            part=name,
            operation="plan pieces",
        )


def deflections(layout: Layout, spec: ModelSpec) -> tuple[Variant, ...]:
    """Every printed control-surface piece: the requested deflections, or the design's."""
    asked = dict(spec.deflections)
    out = []
    for sl in layout.surfaces:
        for c in sl.controls:
            design = next(x for x in sl.sizing.spec.controls if x.kind == c.kind).deflection
            for angle in asked.get(c.kind, (design,)):
                out.append(Variant(c.name, f"{c.name}-at{_angle_text(angle)}", angle))
    return tuple(out)


def _angle_text(angle: float) -> str:
    deg = math.degrees(angle)
    text = f"{deg:+.1f}".rstrip("0").rstrip(".")
    return ("0" if text in ("+0", "-0") else text) + "deg"


# --- cuts -------------------------------------------------------------------------------------


def plan_cuts(
    start: float, end: float, longest: float, avoid: list[tuple[float, float]]
) -> tuple[float, ...]:
    """Stations (mm) cutting [start, end] into the fewest pieces no longer than ``longest``
    whose cuts lie outside the ``avoid`` intervals where possible: equal pieces first, each
    cut moved to the nearest allowed station; if that fails, the farthest allowed station
    within reach from the inner end, piece by piece (which needs the fewest pieces)."""
    length = end - start
    if length <= longest:
        return ()
    n = math.ceil(length / longest - 1e-9)
    if n > MAX_MODEL_PIECES:
        raise GeometryError(
            f"{length:.0f} mm would need {n} pieces of at most {longest:.0f} mm; at most "
            f"{MAX_MODEL_PIECES} are made",
            operation="plan pieces",
        )
    grid = np.linspace(start, end, 4001)[1:-1]
    allowed = grid[[all(not (a <= g <= b) for a, b in avoid) for g in grid]]
    if len(allowed) == 0:
        allowed = grid
    for count in range(n, n + 4):
        cuts = []
        for i in range(1, count):
            target = start + length * i / count
            cuts.append(float(allowed[np.argmin(np.abs(allowed - target))]))
        edges = [start, *cuts, end]
        if all(0 < b - a <= longest for a, b in zip(edges[:-1], edges[1:], strict=True)):
            return tuple(cuts)
    cuts, at = [], start
    while end - at > longest:
        reach = allowed[(allowed > at) & (allowed <= at + longest)]
        if len(reach) == 0:
            reach = grid[(grid > at) & (grid <= at + longest)]
        if len(reach) == 0:  # pieces shorter than the station grid's step
            raise GeometryError(
                f"no cut station within {longest:.1f} mm of {at:.1f} mm", operation="plan pieces"
            )
        at = float(reach.max())
        cuts.append(at)
    return tuple(cuts)


# --- surfaces ---------------------------------------------------------------------------------


def surface_plan(
    layout: Layout,
    sl: SurfaceLayout,
    side: str,
    spec: ModelSpec,
    k: float,
    te: float,
    dirs: tuple,
) -> PartPlan:
    """Cuts, dowels and (wing halves) the spar bore of one fixed surface side."""
    d = layout.sizing.design
    points = d.solids.section_points
    ss, pf = sl.sizing, sl.sizing.planform
    f = 1000.0 * k
    axis, sign, offset = _axis(sl, side)
    name = fixed_part_name(sl.key, side)
    start, end = (sl.mount_s + offset) * f, (pf.semi_span + offset) * f
    longest = max(spec.build_volume) * 1000.0 - LENGTH_MARGIN
    _check_root_fits(pf.root_chord, name, spec, k)
    dowel, wall = spec.dowel_diameter * 1000.0, spec.min_wall * 1000.0
    key_reach = _key_reach(spec)
    avoid = []
    for c in (c for c in sl.controls if c.side == side):
        for s in (c.s_start, c.s_end):
            m = (s + offset) * f
            avoid.append((m - key_reach - JOINT_CLEARANCE, m + key_reach + JOINT_CLEARANCE))
    cuts = plan_cuts(start, end, longest, avoid)
    joints, holes = [], []
    spar = None
    if spec.spar_diameter is not None and sl.key == "wing":
        spar = _spar_bore(sl, side, spec, f, te, dirs, start, end, points)
        if spar is not None:
            holes.append(spar)
    direction = np.zeros(3)
    direction[axis] = sign
    for i, station in enumerate(cuts, start=1):
        s = station / f - offset
        fractions = _dowel_fractions(sl, side, s, spec, f, te, dirs, points, spar)
        if not fractions:
            raise GeometryError(
                f"the joint {station:.1f} mm from the root is too thin for a {dowel:g} mm "
                f"dowel with a {wall:g} mm wall",
                part=name,
                operation="plan dowels",
            )
        for fr in fractions:
            centre = (
                np.array(place(ss, side, s, np.array([[fr, mean_line_offset(ss, s, fr, dirs)]]))[0])
                * f
            )
            half = spec.dowel_length * 500.0 + DOWEL_CLEARANCE
            holes.append(
                Hole(
                    "dowel",
                    _scale_point(centre - half * direction, 1.0),
                    _scale_point(centre + half * direction, 1.0),
                    dowel,
                )
            )
        lead = np.array(place(ss, side, s, np.array([[0.0, 0.0]]))[0]) * f
        joints.append(Joint(name, i, station, _scale_point(lead, 1.0), tuple(direction)))
    return PartPlan(name, axis, sign, start, end, tuple(joints), tuple(holes))


def _key_reach(spec: ModelSpec) -> float:
    """How far (mm) a hinge key bar runs into the fixed part beyond each end of its control."""
    return max(4.0 * spec.hinge_key * 1000.0, 5.0)


# --- control surfaces -------------------------------------------------------------------------


def hinge_key(
    sl: SurfaceLayout, control, spec: ModelSpec, f: float, up: np.ndarray, side_gap: float
) -> Hole:
    """The square key bar's hole on a control's hinge axis (model mm), running up to
    ``_key_reach`` beyond each end into the fixed part (less where the surface ends sooner,
    keeping the least wall); one pair of its sides along ``up`` (the sections' thickness
    direction). ``side_gap``: the control's side gap, model mm."""
    p0 = np.array(control.hinge[0].point) * f
    p1 = np.array(control.hinge[-1].point) * f
    length = float(np.linalg.norm(p1 - p0))
    e = (p1 - p0) / length
    reach = _key_reach(spec)
    wall = spec.min_wall * 1000.0
    inner_room = (control.s_start - sl.mount_s) * f - wall
    outer_room = (sl.sizing.planform.semi_span - control.s_end) * f - wall
    for other in (c for c in sl.controls if c.side == control.side and c is not control):
        # share the strip between neighbouring control surfaces: each key takes half of it
        if other.s_end <= control.s_start:
            inner_room = min(inner_room, (control.s_start - other.s_end) * f / 2 - wall / 2)
        if other.s_start >= control.s_end:
            outer_room = min(outer_room, (other.s_start - control.s_end) * f / 2 - wall / 2)
    r0 = min(reach, inner_room) if inner_room > side_gap + 1.0 else 0.0
    r1 = min(reach, outer_room) if outer_room > side_gap + 1.0 else 0.0
    total = r0 + length + r1
    inside = []  # the fixed part's ends
    if r0 > 0:
        inside.append((0.0, (r0 - side_gap - 0.5) / total))
    if r1 > 0:
        inside.append(((r0 + length + side_gap + 0.5) / total, 1.0))
    moving = ((r0 + side_gap + 0.5) / total, (r0 + length - side_gap - 0.5) / total)
    return Hole(
        "hinge key",
        _scale_point(p0 - r0 * e, 1.0),
        _scale_point(p1 + r1 * e, 1.0),
        spec.hinge_key * 1000.0,
        tuple(float(v) for v in up),
        tuple(inside),
        moving,
    )


# --- fuselage ---------------------------------------------------------------------------------


def body_plan(layout: Layout, spec: ModelSpec, k: float, surface_holes: list[Hole]) -> PartPlan:
    """Cuts across x, dowels at each joint, the sting bore and the spar bores continued to
    the plane of symmetry."""
    body = layout.body
    assert body is not None
    f = 1000.0 * k
    start, end = body[0].x * f, body[-1].x * f
    longest = max(spec.build_volume) * 1000.0 - LENGTH_MARGIN
    avoid = []
    for sl in layout.surfaces:
        xs = [sl.junction.side_line[0][0], sl.junction.side_line[-1][0]] if sl.junction else []
        if xs:
            lo, hi = min(xs) * f, max(xs) * f
            avoid.append((lo - JOINT_CLEARANCE, hi + JOINT_CLEARANCE))
    holes: list[Hole] = []
    sting = _sting(layout, spec, f)
    holes.append(sting)
    lo = min(sting.start[0], sting.end[0]) - JOINT_CLEARANCE
    hi = max(sting.start[0], sting.end[0]) + JOINT_CLEARANCE
    avoid.append((lo, hi) if spec.sting_axis == "x" else (lo - spec.sting_diameter * 500, hi))
    for h in surface_holes:
        if h.kind == "spar":
            # continue the rod's line to the plane of symmetry, through the body
            a, b = np.array(h.start), np.array(h.end)
            e = (b - a) / np.linalg.norm(b - a)
            t = -a[1] / e[1]
            centre = a + t * e
            tip = a + 3.0 * e  # into the wing's root, past its face
            through = float(np.linalg.norm(a - centre) / np.linalg.norm(tip - centre))
            holes.append(
                Hole(
                    "spar",
                    _scale_point(centre, 1.0),
                    _scale_point(tip, 1.0),
                    h.size,
                    solid=((0.0, through),),
                )
            )
            avoid.append(
                (centre[0] - h.size - JOINT_CLEARANCE, centre[0] + h.size + JOINT_CLEARANCE)
            )
    cuts = plan_cuts(start, end, longest, avoid)
    from geomgen.geometry.body_side import body_loops

    joints = []
    r = spec.dowel_diameter * 500.0
    for i, x in enumerate(cuts, start=1):
        loops, _ = body_loops(body, np.array([x / f]))
        loop = loops[0] * f
        zc = 0.5 * (loop[:, 1].max() + loop[:, 1].min())
        half = 0.5 * (loop[:, 0].max() - loop[:, 0].min())
        y = 0.45 * half
        if half - y < r + spec.min_wall * 1000.0:
            raise GeometryError(
                f"the body is too thin at x = {x:.1f} mm for the joint's dowels",
                part="fuselage",
                operation="plan dowels",
            )
        reach = spec.dowel_length * 500.0 + DOWEL_CLEARANCE
        for yy in (-y, y):
            holes.append(Hole("dowel", (x - reach, yy, zc), (x + reach, yy, zc), 2 * r))
        joints.append(Joint("fuselage", i, x, (x, 0.0, zc), (1.0, 0.0, 0.0)))
    return PartPlan("fuselage", 0, 1.0, start, end, tuple(joints), tuple(holes))


def wing_root_sting(layout: Layout, spec: ModelSpec, f: float, dirs: tuple) -> Hole:
    """Without a fuselage: the sting bore runs spanwise into the right wing half's root face
    at 30 % of the root chord on the mean line."""
    sl = layout.surface("wing")
    ss = sl.sizing
    p = place(ss, "right", 0.0, np.array([[0.3, mean_line_offset(ss, 0.0, 0.3, dirs)]]))[0] * f
    depth = spec.sting_depth * 1000.0
    return Hole(
        "sting",
        (p[0], p[1] - 2.0, p[2]),
        (p[0], p[1] + depth, p[2]),
        spec.sting_diameter * 1000.0,
    )


# --- the tunnel -------------------------------------------------------------------------------


@dataclass(frozen=True)
class ScaleEffect:
    """Reynolds numbers on the wing's mean geometric chord."""

    model_chord: float  # m
    tunnel_speed: float  # m/s
    tunnel_density: float  # kg/m^3, ideal gas at the tunnel's pressure and temperature
    tunnel_viscosity: float  # Pa s, Sutherland's law
    model_reynolds: float
    full_chord: float  # m
    full_speed: float  # m/s, the stall speed of the design
    full_kinematic_viscosity: float  # m^2/s, ISA at the design altitude
    full_reynolds: float


def scale_effect(layout: Layout, spec: ModelSpec, k: float) -> ScaleEffect:
    """Model Reynolds number rho V c / mu at the tunnel's conditions (density from the ideal
    gas law, viscosity from Sutherland's law) against the full-size one at the stall speed
    in the standard atmosphere."""
    mgc = layout.sizing.wing.planform.mgc
    rho = spec.tunnel_pressure / (AIR_GAS_CONSTANT * spec.tunnel_temperature)
    mu = sutherland_viscosity(spec.tunnel_temperature)
    st = layout.sizing.stall
    nu_full = st.atmosphere.kinematic_viscosity
    return ScaleEffect(
        model_chord=mgc * k,
        tunnel_speed=spec.tunnel_speed,
        tunnel_density=rho,
        tunnel_viscosity=mu,
        model_reynolds=rho * spec.tunnel_speed * mgc * k / mu,
        full_chord=mgc,
        full_speed=st.stall_speed,
        full_kinematic_viscosity=nu_full,
        full_reynolds=st.stall_speed * mgc / nu_full,
    )


__all__ = [
    "Joint",
    "PartPlan",
    "ScaleEffect",
    "Variant",
    "body_plan",
    "deflections",
    "hinge_key",
    "model_scale",
    "parse_scale",
    "plan_cuts",
    "scale_effect",
    "surface_plan",
    "wing_root_sting",
]
