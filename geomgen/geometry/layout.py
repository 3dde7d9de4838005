"""Layout: corner points and hinge lines of every surface in the aircraft frame (pure math).

Aircraft frame: x aft, y right (starboard), z up, origin at the user's datum, metres.
Sections of the wing and horizontal tail lie in planes y = const; those of the fin in planes
z = const. Each section is turned by its local twist about the point at ``twist_axis`` of its
chord, then the whole surface by its incidence about a spanwise axis through the root's
``twist_axis`` point (nose up positive; for the fin, leading edge to starboard positive).
Corner points are the leading and trailing edges of the chord line at each panel end; hinge
points sit on the section's mean line (halfway between upper and lower surface) at the
hinge's local chord fraction, which is where a hinge axis goes in a built surface.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache
from typing import TYPE_CHECKING

import numpy as np

from geomgen.errors import InputError
from geomgen.geometry.frame import place
from geomgen.shapes import airfoils
from geomgen.shapes.outline import Airfoil
from geomgen.sizing.aircraft import Sizing, SurfaceSizing

if TYPE_CHECKING:
    from geomgen.design import BodyStation
    from geomgen.geometry.mount import Junction

Point = tuple[float, float, float]

#: Display names of surfaces and their parts.
PART_NAMES = {"wing": "wing", "horizontal_tail": "stabilizer", "vertical_tail": "fin"}


@dataclass(frozen=True)
class PanelCorners:
    """Four corners of one panel of one side, in the aircraft frame (m)."""

    side: str  # right | left | centre (fin)
    panel: int  # 0 at the root
    le_inner: Point
    te_inner: Point
    te_outer: Point
    le_outer: Point


@dataclass(frozen=True)
class HingePoint:
    s: float  # spanwise position from the root (m)
    chord_fraction: float  # local chord fraction of the hinge line
    point: Point  # aircraft frame, on the mean line (m)


@dataclass(frozen=True)
class ControlLayout:
    """One control surface on one side."""

    kind: str  # aileron | flap | elevator | rudder
    side: str
    name: str  # e.g. aileron-right, rudder
    hinge_kind: str  # constant_fraction | straight | common
    s_start: float  # m from the root
    s_end: float
    hinge: tuple[HingePoint, ...]  # inner end, panel breaks in between, outer end
    area: float  # m^2, projected area aft of the hinge line (one side)
    chord_inner: float  # m, chord of the moving part at its inner end
    chord_outer: float

    @property
    def hinge_length(self) -> float:
        a, b = self.hinge[0].point, self.hinge[-1].point
        return math.dist(a, b)


@dataclass(frozen=True)
class HingeComparison:
    """A common straight elevator hinge against two separate constant-fraction hinges."""

    common_area: float  # m^2, both halves
    common_fraction_of_tail: float
    common_chord_fractions: tuple[float, float]  # local hinge fraction at inner and outer end
    separate_area: float  # m^2, both halves, hinge at the same fraction everywhere
    separate_fraction_of_tail: float
    separate_chord_fraction: float


@dataclass(frozen=True)
class SurfaceLayout:
    sizing: SurfaceSizing
    corners: tuple[PanelCorners, ...]
    controls: tuple[ControlLayout, ...]
    hinge_comparison: HingeComparison | None
    junction: Junction | None = None  # where it meets the fuselage, when there is one

    @property
    def key(self) -> str:
        return self.sizing.key

    @property
    def mount_s(self) -> float:
        """Spanwise station (m) where the surface's solid starts: the root, or inside the
        fuselage by a small overlap when the surface is mounted on one."""
        return 0.0 if self.junction is None else self.junction.mount_s

    @property
    def sides(self) -> tuple[str, ...]:
        return ("right", "left") if self.sizing.planform.symmetric else ("centre",)


@dataclass(frozen=True)
class Layout:
    sizing: Sizing
    surfaces: tuple[SurfaceLayout, ...]
    body: tuple[BodyStation, ...] | None = None  # the fuselage's stations, when there is one

    def surface(self, key: str) -> SurfaceLayout:
        return next(s for s in self.surfaces if s.key == key)

    @property
    def part_names(self) -> tuple[str, ...]:
        """Every part a build makes, in build order."""
        names = []
        for s in self.surfaces:
            for side in s.sides:
                names.append(fixed_part_name(s.key, side))
                names += [c.name for c in s.controls if c.side == side]
        return tuple(names)


def part_name(base: str, side: str) -> str:
    """Plain part name with its side, e.g. ``aileron-right``; the fin's parts have no side."""
    return base if side == "centre" else f"{base}-{side}"


def fixed_part_name(key: str, side: str) -> str:
    """Name of what remains of a surface side once its control surfaces are cut free."""
    return part_name(PART_NAMES[key], side)


def _point(ss: SurfaceSizing, side: str, s: float, x: float, y: float = 0.0) -> Point:
    p = place(ss, side, s, np.array([[x, y]]))[0]
    return (float(p[0]), float(p[1]), float(p[2]))


@lru_cache(maxsize=64)
def _section(name: str, dirs: tuple) -> Airfoil:
    return airfoils.load(name, dirs)


def mean_line_offset(ss: SurfaceSizing, s: float, fraction: float, dirs: tuple = ()) -> float:
    """y/c of the section's mean line (halfway between the surfaces) at a chord fraction."""
    i, t = ss.planform.section_weight(s)
    a, b = ss.planform.stations[i], ss.planform.stations[i + 1]

    def mid(blend: tuple[str, str, float]) -> float:
        ya = _mid_y(_section(blend[0], dirs), fraction)
        yb = _mid_y(_section(blend[1], dirs), fraction)
        return (1 - blend[2]) * ya + blend[2] * yb

    return (1 - t) * mid(a.airfoil) + t * mid(b.airfoil)


def _mid_y(af: Airfoil, x: float) -> float:
    yu = np.interp(x, af.upper[:, 0], af.upper[:, 1])
    yl = np.interp(x, af.lower[:, 0], af.lower[:, 1])
    return float(0.5 * (yu + yl))


def lay_out(sizing: Sizing, airfoil_dirs: tuple = ()) -> Layout:
    """Corner points and control-surface hinge lines of every surface, both sides. Control
    surfaces placed from the body side find it on the sized fuselage."""
    source = sizing.design.source
    body = None
    if sizing.design.fuselage is not None:
        from geomgen.shapes.fuselage import expand

        body = expand(sizing.design.fuselage)
    return Layout(
        sizing=sizing,
        surfaces=tuple(
            _surface(ss, airfoil_dirs, source, sizing.design.solids.te_thickness, body)
            for ss in sizing.surfaces
        ),
    )


#: a hinge line lies at least this chord fraction behind the leading edge (the moving part's
#: rounded nose and the fixed part's cove need the section's thickness around it) ...
MIN_HINGE_FRACTION = 0.1
#: ... and leaves the moving part at least this fraction of the local chord
MIN_MOVING_FRACTION = 0.05
#: ... and at least this many times the minimum trailing-edge thickness (the thickened
#: trailing edge is blended in over the aft chord, so it must lie well inside the moving part)
MIN_MOVING_TE_RATIO = 4.0


def _check_hinge_room(
    s: float, f: float, chord: float, te_thickness: float, path: str, source: str
) -> None:
    """The hinge at chord fraction f of a local chord leaves room for both parts."""
    if f < MIN_HINGE_FRACTION:
        raise InputError(
            f"the hinge line lies too close to the leading edge: local chord fraction {f:.3f} "
            f"at {s:.3f} m from the root (at least {MIN_HINGE_FRACTION:g})",
            source=source,
            path=path,
        )
    aft = (1.0 - f) * chord
    need = max(MIN_MOVING_FRACTION * chord, MIN_MOVING_TE_RATIO * te_thickness)
    if aft < need:
        raise InputError(
            f"leaves the moving part only {aft * 1000:.1f} mm of chord at {s:.3f} m from the "
            f"root; it needs at least {need * 1000:.1f} mm ({MIN_MOVING_FRACTION:g} of the "
            f"local chord and {MIN_MOVING_TE_RATIO:g} x solids.te_thickness): move the hinge "
            f"forward (local chord fraction {f:.4g}, at most {1 - need / chord:.3f} here)",
            source=source,
            path=path,
        )


def _surface(
    ss: SurfaceSizing,
    dirs: tuple,
    source: str,
    te_thickness: float = 0.0,
    body: tuple[BodyStation, ...] | None = None,
) -> SurfaceLayout:
    pf = ss.planform
    sides = ("right", "left") if pf.symmetric else ("centre",)
    corners = []
    for side in sides:
        for i, (a, b) in enumerate(zip(pf.stations, pf.stations[1:], strict=False)):
            corners.append(
                PanelCorners(
                    side=side,
                    panel=i,
                    le_inner=_point(ss, side, a.s, 0.0),
                    te_inner=_point(ss, side, a.s, 1.0),
                    te_outer=_point(ss, side, b.s, 1.0),
                    le_outer=_point(ss, side, b.s, 0.0),
                )
            )
    spans = _resolve_spans(ss, source, body)
    controls = []
    comparison = None
    for spec in ss.spec.controls:
        s0, s1 = spans[spec.kind]
        fraction = _hinge_fraction_function(
            ss, spec.hinge, spec.common_hinge, spec.hinge_at, s0, s1
        )
        stations = [s0] + [st.s for st in pf.stations if s0 < st.s < s1] + [s1]
        fractions = [fraction(s) for s in stations]
        path = f"{ss.key}.controls.{spec.kind}.hinge_at"
        for s, f in zip(stations, fractions, strict=True):
            if not 0.0 < f < 1.0:
                raise InputError(
                    f"the hinge line leaves the chord: local chord fraction {f:.3f} at "
                    f"{s:.3f} m from the root (must stay in (0, 1))",
                    source=source,
                    path=path,
                )
        for s, f in zip(stations, fractions, strict=True):
            _check_hinge_room(s, f, pf.at(s)[1], te_thickness, path, source)
        _check_hinge_is_straight(ss, stations, fractions, path, source)
        area = _area_aft(ss, stations, fractions)
        hinge_kind = "common" if spec.common_hinge else spec.hinge
        for side in sides:
            hinge = tuple(
                HingePoint(
                    s=s,
                    chord_fraction=f,
                    point=_point(ss, side, s, f, mean_line_offset(ss, s, f, dirs)),
                )
                for s, f in zip(stations, fractions, strict=True)
            )
            controls.append(
                ControlLayout(
                    kind=spec.kind,
                    side=side,
                    name=part_name(spec.kind, side),
                    hinge_kind=hinge_kind,
                    s_start=s0,
                    s_end=s1,
                    hinge=hinge,
                    area=area,
                    chord_inner=(1 - fractions[0]) * pf.at(s0)[1],
                    chord_outer=(1 - fractions[-1]) * pf.at(s1)[1],
                )
            )
        if spec.common_hinge:
            f0 = spec.hinge_at[0]
            separate = _area_aft(ss, stations, [f0] * len(stations))
            comparison = HingeComparison(
                common_area=2 * area,
                common_fraction_of_tail=2 * area / pf.area,
                common_chord_fractions=(fractions[0], fractions[-1]),
                separate_area=2 * separate,
                separate_fraction_of_tail=2 * separate / pf.area,
                separate_chord_fraction=f0,
            )
    return SurfaceLayout(
        sizing=ss, corners=tuple(corners), controls=tuple(controls), hinge_comparison=comparison
    )


def _check_hinge_is_straight(
    ss: SurfaceSizing, stations: list[float], fractions: list[float], path: str, source: str
) -> None:
    """A moving part turns about one straight axis: refuse a hinge line that kinks at a panel
    break (a constant-fraction hinge across a change of taper or sweep, or any hinge across a
    change of dihedral). Tolerance: 0.1 % of the local chord."""
    if len(stations) < 3:
        return
    side = "centre" if not ss.planform.symmetric else "right"
    pts = [_point(ss, side, s, f) for s, f in zip(stations, fractions, strict=True)]
    a, b = np.array(pts[0]), np.array(pts[-1])
    axis = (b - a) / np.linalg.norm(b - a)
    for s, p in zip(stations[1:-1], pts[1:-1], strict=True):
        d = np.array(p) - a
        off = float(np.linalg.norm(d - np.dot(d, axis) * axis))
        if off > 1e-3 * ss.planform.at(s)[1]:
            raise InputError(
                f"the hinge line kinks at the panel break {s:.3f} m from the root (by "
                f"{off * 1000:.1f} mm), so the part could not turn about it; end the control "
                f"surface at the break, or use hinge: straight on panels of equal dihedral",
                source=source,
                path=path.rsplit(".", 1)[0] + ".span_end",
            )


def control_body_side(
    ss: SurfaceSizing, body: tuple[BodyStation, ...], chord_fraction: float, guess: float
) -> float:
    """Greatest station (m) of the body side along a moving part's chord (from the hinge's
    chord fraction to the trailing edge): the fuselage's side for a wing or tail half, its top
    for a fin. NaN where the body ends ahead of the moving part."""
    from geomgen.geometry.body_side import body_side

    unit = np.column_stack([np.linspace(chord_fraction, 1.0, 9), np.zeros(9)])
    s_side = body_side(ss, body, unit, np.full(9, guess))
    return math.nan if np.all(np.isnan(s_side)) else float(np.nanmax(s_side))


def settled_body_side(
    ss: SurfaceSizing, body: tuple[BodyStation, ...], chord_fraction: float, start: float = 0.0
) -> float:
    """``control_body_side`` started from its own answer until it stops moving (a swept fin
    moves its chord along x as the station changes, so one start from the root is not
    enough); NaN where the body ends ahead of the moving part."""
    s = start
    for _ in range(50):
        found = control_body_side(ss, body, chord_fraction, s)
        if math.isnan(found) or abs(found - s) < 1e-9:
            return found
        s = found
    return found


def _span_start(ss: SurfaceSizing, c, body: tuple[BodyStation, ...] | None) -> float:
    """Inner end of a control surface's span (m from the root): a fraction of the semi-span,
    a length from the root, or a length outboard of the body side plus the side gap."""
    if c.span_start_from == "body_side":
        side = 0.0
        if body is not None:
            found = settled_body_side(ss, body, c.hinge_at[0])
            side = 0.0 if math.isnan(found) else found
        return side + c.side_gap + c.span_start
    return c.span_start * ss.planform.semi_span if c.span_start_is_fraction else c.span_start


def _span_end(ss: SurfaceSizing, c) -> float:
    """Outer end of a control surface's span (m from the root): a fraction of the semi-span,
    a length from the root, or a length inboard of the tip."""
    semi = ss.planform.semi_span
    if c.span_end_from == "tip":
        return semi - c.span_end
    return c.span_end * semi if c.span_end_is_fraction else c.span_end


def _resolve_spans(
    ss: SurfaceSizing, source: str, body: tuple[BodyStation, ...] | None = None
) -> dict[str, tuple[float, float]]:
    """Spanwise limits (m from the root) of every control surface, checked against the tip and
    against each other."""
    semi = ss.planform.semi_span
    spans: dict[str, tuple[float, float]] = {}
    for c in ss.spec.controls:
        base = f"{ss.key}.controls.{c.kind}"
        s0 = _span_start(ss, c, body)
        s1 = _span_end(ss, c)
        if s1 > semi * (1 + 1e-9):
            raise InputError(
                f"runs past the tip: the semi-span is {semi:.3f} m (got {s1:.3f} m)",
                source=source,
                path=f"{base}.span_end",
            )
        if s0 > semi * (1 + 1e-9):
            raise InputError(
                f"lies past the tip: the semi-span is {semi:.3f} m (got {s0:.3f} m)",
                source=source,
                path=f"{base}.span_start",
            )
        if s1 - s0 < 1e-3 * semi:
            raise InputError(
                f"must be outboard of span_start (got {s0:.3f} m to {s1:.3f} m from the root)",
                source=source,
                path=f"{base}.span_end",
            )
        for other, (o0, o1) in spans.items():
            if s0 < o1 and o0 < s1:
                raise InputError(
                    f"overlaps the {other} ({o0:.3f} m to {o1:.3f} m from the root); control "
                    f"surfaces may not share span",
                    source=source,
                    path=f"{base}.span_start",
                )
        spans[c.kind] = (s0, min(s1, semi))
    return spans


def _hinge_fraction_function(ss, hinge: str, common: bool, hinge_at, s0: float, s1: float):
    """Local chord fraction of the hinge line as a function of spanwise position s."""
    pf = ss.planform
    if hinge == "constant_fraction":
        return lambda s: hinge_at[0]
    x0 = pf.at(s0)[0] + hinge_at[0] * pf.at(s0)[1]
    # a common hinge is perpendicular to the plane of symmetry: one x along the whole line
    x1 = x0 if common else pf.at(s1)[0] + hinge_at[1] * pf.at(s1)[1]

    def fraction(s: float) -> float:
        x_le, chord, _, _ = pf.at(s)
        xh = x0 + (x1 - x0) * (s - s0) / (s1 - s0)
        return (xh - x_le) / chord

    return fraction


def _area_aft(ss: SurfaceSizing, stations: list[float], fractions: list[float]) -> float:
    """Projected area aft of a hinge line, exact for piecewise-linear chords (trapezoid rule
    with nodes at every panel break, where the aft chord's slope changes)."""
    pf = ss.planform
    aft = [(1 - f) * pf.at(s)[1] for s, f in zip(stations, fractions, strict=True)]
    return float(np.trapezoid(aft, stations))


@dataclass(frozen=True)
class CornerLabel:
    """A short key for one corner point, shared by drawings, tables and reports."""

    key: str  # e.g. WR1 (wing, right, first), HL3, V2
    surface: str  # wing | horizontal_tail | vertical_tail
    side: str  # right | left | centre
    where: str  # e.g. "LE root", "LE panel 1 outer", "TE tip"
    point: Point  # aircraft frame, m


_LETTERS = {"wing": "W", "horizontal_tail": "H", "vertical_tail": "V"}
_SIDE_LETTERS = {"right": "R", "left": "L", "centre": ""}


def corner_labels(layout: Layout) -> tuple[CornerLabel, ...]:
    """Every distinct corner point with a key: per surface side, the leading edge from root to
    tip, then the trailing edge from tip back to root (the outline in drawing order)."""
    out: list[CornerLabel] = []
    for sl in layout.surfaces:
        for side in sl.sides:
            panels = [c for c in sl.corners if c.side == side]
            n = len(panels)

            def station(i: int, n: int = n) -> str:
                return "root" if i == 0 else "tip" if i == n else f"break {i}"

            outline = [(f"LE {station(0)}", panels[0].le_inner)]
            outline += [(f"LE {station(i + 1)}", c.le_outer) for i, c in enumerate(panels)]
            outline += [(f"TE {station(n)}", panels[-1].te_outer)]
            outline += [(f"TE {station(i)}", panels[i].te_inner) for i in range(n - 1, -1, -1)]
            prefix = _LETTERS[sl.key] + _SIDE_LETTERS[side]
            out += [
                CornerLabel(f"{prefix}{k}", sl.key, side, where, point)
                for k, (where, point) in enumerate(outline, start=1)
            ]
    return tuple(out)
