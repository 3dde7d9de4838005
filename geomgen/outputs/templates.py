"""Section templates: the sections a surface is lofted through, laid out at true scale (1:1, mm)
for the shop as strokes and notes; :mod:`geomgen.outputs.template_pdf` tiles them onto paper
and :mod:`geomgen.outputs.dxf` writes them as DXF.

A template lies in the section's own plane: x runs aft from the leading edge along the chord
line, y is perpendicular to it (up for the wing and the horizontal tail, to starboard for the
fin), both in mm. The outline is ``sections.unit_section`` times the local chord, with the
design's trailing-edge thickness and point count, so it is the section the solid is lofted
through. Templates sit at the root, every panel break, the tip and every
``drawings.template_spacing`` from the root (spanwise positions are projected, as everywhere in
geomgen).

A design with a fuselage also gets a former (bulkhead) template at every fuselage station that
is not a point (the stations as written, or those of the parametric form): the station's loop
in its own plane, seen from aft, X = y (right) and Y = z (up) of the aircraft frame in mm, with
a centre mark at (0, centre z), the centre water line and the vertical centre line for lining
the formers up on a building jig.

Pure geometry: no drawing library is imported here.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import ClassVar

import numpy as np

from geomgen.design import BodyStation
from geomgen.geometry.layout import PART_NAMES, Layout, SurfaceLayout
from geomgen.geometry.sections import unit_section
from geomgen.shapes.fuselage import Shares, body_shares, expand, is_point, section_points
from geomgen.sizing.aircraft import SurfaceSizing

#: Gap between a section's outline and the ends of its leading- and trailing-edge marks (mm).
EDGE_MARK_REACH = 6.0
#: How far hinge and spar marks stand beyond the surfaces (mm).
INNER_MARK_REACH = 4.0
#: Text heights (mm).
TEXT = 3.0
SMALL_TEXT = 2.2

#: Points on a former template's outline (the fuselage loop at the station).
FORMER_POINTS = 256
#: How far a former's water line and centre line stand beyond its outline (mm).
FORMER_LINE_REACH = 10.0
#: Radius of the ring marking a former's centre (mm).
CENTRE_MARK_RADIUS = 3.0

# Spanwise letter in template names: y from the plane of symmetry, h above the fin root.
_AXIS = {"wing": "y", "horizontal_tail": "y", "vertical_tail": "h"}
_SURFACE_WORDS = {"wing": "wing", "horizontal_tail": "horizontal tail", "vertical_tail": "fin"}


@dataclass(frozen=True)
class Stroke:
    """A polyline of a drawing (mm). ``kind``: outline, chord, edge, hinge, spar (sections);
    outline, waterline, centreline, centre (formers)."""

    kind: str
    points: tuple[tuple[float, float], ...]
    closed: bool = False


@dataclass(frozen=True)
class Note:
    """A line of text: ``at`` is the left end (align left) or the middle (align centre) of its
    baseline, ``height`` the letter height (mm)."""

    kind: str  # label, edge, hinge, spar, cross, waterline, centreline
    text: str
    at: tuple[float, float]
    height: float = TEXT
    align: str = "left"  # left | centre

    def box(self) -> tuple[float, float, float, float]:
        """Rough extent (x0, y0, x1, y1) in mm: sans-serif letters average 0.6 of the height."""
        w = 0.6 * self.height * len(self.text)
        x0 = self.at[0] - (w / 2 if self.align == "centre" else 0.0)
        return (x0, self.at[1] - 0.3 * self.height, x0 + w, self.at[1] + self.height)


@dataclass(frozen=True)
class HingeMark:
    control: str  # e.g. flap-right, rudder
    fraction: float  # local chord fraction of the hinge line


@dataclass(frozen=True, eq=False)
class SectionTemplate:
    """One section template in its own plane (mm, x aft from the LE along the chord line)."""

    surface: str  # wing | horizontal_tail | vertical_tail
    name: str  # e.g. wing-y0600, fin-h0250 (DXF layer name, page label)
    s: float  # m, spanwise position from the root (projected)
    chord: float  # m
    angle: float  # rad, chord line to the x axis: incidence + the ruled panel's twist here
    section: str  # name of the section (or blend)
    hinges: tuple[HingeMark, ...]
    spar: float | None  # chord fraction of the spar mark
    label: tuple[str, ...]  # lines naming the template (also drawn as the "label" notes)
    upper: np.ndarray  # (N, 2) mm, LE -> TE
    lower: np.ndarray  # (N, 2) mm, LE -> TE
    strokes: tuple[Stroke, ...]
    notes: tuple[Note, ...]
    #: what the drawing's x and y measure (alignment-cross labels)
    axes: ClassVar[tuple[str, str]] = ("x", "y")

    def surfaces_at(self, x: float) -> tuple[float, float]:
        """(lower, upper) y of the section at chord position x (mm); the chord line's y twice
        outside the section."""
        if not self.upper[:, 0].min() <= x <= self.upper[-1, 0]:
            return (0.0, 0.0)
        return (
            _surface_at(self.lower[:, 0], self.lower[:, 1], x),
            _surface_at(self.upper[:, 0], self.upper[:, 1], x),
        )

    def extent(self, labels: bool = True, pad: float = 0.0) -> tuple[float, float, float, float]:
        """(x0, y0, x1, y1) of everything drawn, text included (mm), grown by ``pad``; without
        the label lines if ``labels`` is False."""
        return _extent(self.strokes, self.notes, labels, pad)

    def page_lines(self) -> tuple[str, str, str]:
        """A PDF page's heading (before the tile count) and its two lines of detail."""
        where = self.label[0].split(": ", 1)[1]
        return (
            f"{self.name}   chord {self.chord * 1000:.1f} mm",
            f"{where}; section {self.section}",
            self.label[2],
        )


def _extent(strokes, notes, labels: bool, pad: float) -> tuple[float, float, float, float]:
    """(x0, y0, x1, y1) of strokes and notes (mm), grown by ``pad``; the label notes only if
    ``labels``."""
    pts = np.concatenate([np.asarray(s.points) for s in strokes])
    boxes = np.array([n.box() for n in notes if labels or n.kind != "label"])
    return (
        float(min(pts[:, 0].min(), boxes[:, 0].min())) - pad,
        float(min(pts[:, 1].min(), boxes[:, 1].min())) - pad,
        float(max(pts[:, 0].max(), boxes[:, 2].max())) + pad,
        float(max(pts[:, 1].max(), boxes[:, 3].max())) + pad,
    )


@dataclass(frozen=True, eq=False)
class FormerTemplate:
    """One fuselage former (bulkhead) template in its station's plane, seen from aft, 1:1:
    X = y (right), Y = z (up) of the aircraft frame, mm; the centre is at (0, station z)."""

    name: str  # e.g. former-x1300 (DXF layer name, page label)
    station: BodyStation  # m
    label: tuple[str, ...]  # lines naming the template (also drawn as the "label" notes)
    outline: np.ndarray  # (FORMER_POINTS, 2) mm, closed loop, first point not repeated
    strokes: tuple[Stroke, ...]
    notes: tuple[Note, ...]
    axes: ClassVar[tuple[str, str]] = ("y", "z")

    @property
    def centre(self) -> tuple[float, float]:
        """(y, z) of the section centre (mm)."""
        return (0.0, self.station.z * 1000.0)

    def surfaces_at(self, x: float) -> tuple[float, float]:
        """(lower, upper) Y of the outline at X = x (mm); the centre's Y twice outside it."""
        p = self.outline
        q = np.roll(p, -1, axis=0)
        lo, hi = np.minimum(p[:, 0], q[:, 0]), np.maximum(p[:, 0], q[:, 0])
        hit = (lo <= x) & (x <= hi) & (hi > lo)
        if not hit.any():
            return (self.centre[1], self.centre[1])
        t = (x - p[hit, 0]) / (q[hit, 0] - p[hit, 0])
        y = p[hit, 1] + t * (q[hit, 1] - p[hit, 1])
        return (float(y.min()), float(y.max()))

    def extent(self, labels: bool = True, pad: float = 0.0) -> tuple[float, float, float, float]:
        """(x0, y0, x1, y1) of everything drawn, text included (mm), grown by ``pad``; without
        the label lines if ``labels`` is False."""
        return _extent(self.strokes, self.notes, labels, pad)

    def page_lines(self) -> tuple[str, str, str]:
        """A PDF page's heading (before the tile count) and its two lines of detail."""
        st = self.station
        where = self.label[0].split(": ", 1)[1]
        return (
            f"{self.name}   {st.width * 1000:.1f} mm wide x {st.height * 1000:.1f} mm high",
            f"{where}; {_shape_words(st)}; centre z = {self.centre[1]:.1f} mm",
            self.label[2],
        )


# --- where the templates go -------------------------------------------------------------------


def template_positions(
    ss: SurfaceSizing, spacing: float | None, body_side: float | None = None
) -> tuple[float, ...]:
    """Spanwise positions (m) of the templates of one surface: root, panel breaks, tip, the
    body side (the first rib wholly outside the fuselage, when the surface is mounted on one)
    and every ``spacing`` from the root. A spaced position within 1 mm of another is dropped."""
    stations = [st.s for st in ss.planform.stations]
    tip = stations[-1]  # (before the body side joins the list: it is not the tip)
    if body_side is not None and all(abs(body_side - t) >= 1e-3 for t in stations):
        stations.append(body_side)
    extra = []
    if spacing:
        k = 1
        while k * spacing < tip:
            s = k * spacing
            if all(abs(s - t) >= 1e-3 for t in stations):
                extra.append(s)
            k += 1
    return tuple(sorted(stations + extra))


def template_name(key: str, s: float) -> str:
    """Template (and DXF layer) name: surface and spanwise position in whole mm."""
    return f"{PART_NAMES[key]}-{_AXIS[key]}{round(s * 1000):04d}"


def hinge_fraction(sl: SurfaceLayout, control, s: float) -> float:
    """Local chord fraction of a control's hinge line at spanwise position s.

    The hinge line is straight between its hinge points (the ends and any panel break), so
    its x in the surface's plane is linear in s between them; the fraction follows from the
    local leading edge and chord."""
    pf = sl.sizing.planform
    ss = [h.s for h in control.hinge]
    xs = [pf.at(h.s)[0] + h.chord_fraction * pf.at(h.s)[1] for h in control.hinge]
    x_le, chord, _, _ = pf.at(s)
    return (float(np.interp(s, ss, xs)) - x_le) / chord


def _where(sl: SurfaceLayout, s: float) -> str:
    stations = sl.sizing.planform.stations
    for i, st in enumerate(stations):
        if abs(st.s - s) < 1e-9:
            return "root" if i == 0 else "tip" if i == len(stations) - 1 else f"break {i}"
    if sl.junction is not None and abs(s - sl.junction.side_max) < 1e-9:
        return "fuselage side"
    return "between stations"


def _section_mix(ss: SurfaceSizing, s: float) -> str:
    """The named sections the section at s is made of, with their weights."""
    pf = ss.planform
    i, w = pf.section_weight(s)
    mix: dict[str, float] = {}
    for (a, b, wb), weight in ((pf.stations[i].airfoil, 1 - w), (pf.stations[i + 1].airfoil, w)):
        mix[a] = mix.get(a, 0.0) + weight * (1 - wb)
        mix[b] = mix.get(b, 0.0) + weight * wb
    parts = [(name, v) for name, v in mix.items() if v > 5e-4]
    if len(parts) == 1:
        return parts[0][0]
    return " + ".join(f"{v:.3f} {name}" for name, v in parts)


def _surface_at(x: np.ndarray, y: np.ndarray, at: float) -> float:
    """y of one surface polyline (running LE -> TE) at chord position ``at`` (same units)."""
    start = int(np.argmin(x))  # a cambered upper surface may dip a hair ahead of the LE
    return float(np.interp(at, x[start:], y[start:]))


def section_template(
    layout: Layout, key: str, s: float, dirs: tuple = (), side: str | None = None
) -> SectionTemplate:
    """The template of surface ``key`` at spanwise position s (m from the root)."""
    sl = layout.surface(key)
    ss = sl.sizing
    solids = layout.sizing.design.solids
    pf = ss.planform
    # the section the ruled panel has here: its chord and its (chord-weighted) twist
    chord_m, twist = pf.section_frame(s)
    af = unit_section(ss, s, solids.section_points, solids.te_thickness, tuple(dirs))
    c = chord_m * 1000.0
    up = af.upper * c
    lo = af.lower * c
    outline = np.concatenate([up, lo[::-1][:-1]])  # LE -> TE upper, TE -> LE lower, open
    # the chord line is the x axis of the unit-chord section, (0, 0) to (1, 0), as for the
    # corner and hinge points of the layout; a cambered nose may stand a hair ahead of it
    le, te = (0.0, 0.0), (c, 0.0)
    top = float(max(up[:, 1].max(), lo[:, 1].max()))
    bottom = float(min(up[:, 1].min(), lo[:, 1].min()))
    strokes = [
        Stroke("outline", tuple(map(tuple, outline.tolist())), closed=True),
        Stroke("chord", (le, te)),
    ]
    notes = []
    y_lo, y_hi = bottom - EDGE_MARK_REACH, top + EDGE_MARK_REACH
    for word, x in (("LE", le[0]), ("TE", te[0])):
        strokes.append(Stroke("edge", ((x, y_lo), (x, y_hi))))
        notes.append(Note("edge", word, (x + 1.0, y_hi + 1.0)))

    def inner_mark(kind: str, fraction: float) -> tuple[float, float, float]:
        x = fraction * c
        yu = _surface_at(up[:, 0], up[:, 1], x)
        yl = _surface_at(lo[:, 0], lo[:, 1], x)
        strokes.append(Stroke(kind, ((x, yl - INNER_MARK_REACH), (x, yu + INNER_MARK_REACH))))
        return x, yl, yu

    side = side or sl.sides[0]
    hinges = []
    for control in sl.controls:
        if control.side != side or not control.s_start - 1e-9 <= s <= control.s_end + 1e-9:
            continue
        f = hinge_fraction(sl, control, s)
        hinges.append(HingeMark(control.name, f))
        x, yl, yu = inner_mark("hinge", f)
        # the hinge axis lies on the mean line, halfway between the surfaces
        ym = 0.5 * (yl + yu)
        ring = [
            (x + 1.5 * math.cos(a), ym + 1.5 * math.sin(a)) for a in np.linspace(0, 2 * math.pi, 25)
        ]
        strokes.append(Stroke("hinge", tuple(ring[:-1]), closed=True))
        notes.append(Note("hinge", f"hinge {100 * f:.1f} % ({control.name})", (x + 1.0, yu + 5.0)))
    spar = ss.spec.spar_at
    if spar is not None:
        x, yl, _ = inner_mark("spar", spar)
        notes.append(Note("spar", f"spar {100 * spar:.1f} %", (x + 1.0, yl - 5.0 - TEXT)))

    name = template_name(key, s)
    word = _SURFACE_WORDS[key]
    if pf.symmetric:
        place = f"y = {s * 1000:.0f} mm from the plane of symmetry"
        turn = "nose up"
    else:
        place = f"{s * 1000:.0f} mm above the fin root"
        turn = "LE to starboard"
    angle = ss.spec.incidence + twist
    lines = [
        f"{name}: {word}, {_where(layout.surface(key), s)}, {place}",
        f"chord {c:.1f} mm; section {_section_mix(ss, s)}",
        f"chord line at {math.degrees(angle):+.2f} deg to the x axis ({turn}; twist of the ruled "
        "panel); drawn 1:1 in mm",
    ]
    y = y_lo - 3.0 - TEXT
    for line in lines:
        notes.append(Note("label", line, (0.0, y)))
        y -= 1.6 * TEXT
    return SectionTemplate(
        surface=key,
        name=name,
        s=s,
        chord=chord_m,
        angle=angle,
        section=_section_mix(ss, s),
        hinges=tuple(hinges),
        spar=spar,
        label=tuple(lines),
        upper=up,
        lower=lo,
        strokes=tuple(strokes),
        notes=tuple(notes),
    )


def section_templates(layout: Layout, dirs: tuple = ()) -> tuple[SectionTemplate, ...]:
    """Every template of every surface, root to tip, wing first."""
    spacing = layout.sizing.design.drawings.template_spacing
    return tuple(
        section_template(layout, sl.key, s, dirs)
        for sl in layout.surfaces
        for s in template_positions(
            sl.sizing, spacing, sl.junction.side_max if sl.junction is not None else None
        )
    )


# --- fuselage formers ----------------------------------------------------------------------------


def former_name(st: BodyStation) -> str:
    """Former template (and DXF layer) name: the fuselage station x in whole mm."""
    return f"former-x{round(st.x * 1000):04d}"


def _shape_words(st: BodyStation) -> str:
    if st.shape == "superellipse":
        return f"superellipse, exponent {st.exponent:g}"
    if st.shape == "rounded_rectangle":
        return f"rounded rectangle, corner radius {st.corner_radius * 1000:.1f} mm"
    return "ellipse"


def former_template(
    st: BodyStation, where: str, shares: Shares | None = None, name: str | None = None
) -> FormerTemplate:
    """The former template of one fuselage station (not a point): its loop of
    ``FORMER_POINTS`` points (``shares``: those of the body, see ``fuselage.body_shares``) in
    the station's plane, X = y, Y = z of the aircraft frame (mm), with the centre water line,
    the vertical centre line, a ring at the centre and the label lines below. ``where`` names
    the station among the body's (e.g. "station 3 of 9 from the nose")."""
    loop = section_points(st, FORMER_POINTS, shares)[:, 1:] * 1000.0  # (y, z) mm
    zc = st.z * 1000.0
    a = float(np.abs(loop[:, 0]).max())
    top, bottom = float(loop[:, 1].max()), float(loop[:, 1].min())
    reach = FORMER_LINE_REACH
    ring = [
        (CENTRE_MARK_RADIUS * math.cos(t), zc + CENTRE_MARK_RADIUS * math.sin(t))
        for t in np.linspace(0.0, 2.0 * math.pi, 25)[:-1]
    ]
    strokes = (
        Stroke("outline", tuple(map(tuple, loop.tolist())), closed=True),
        Stroke("waterline", ((-a - reach, zc), (a + reach, zc))),
        Stroke("centreline", ((0.0, bottom - reach), (0.0, top + reach))),
        Stroke("centre", tuple(ring), closed=True),
    )
    name = name or former_name(st)
    w, h = st.width * 1000.0, st.height * 1000.0
    lines = (
        f"{name}: fuselage former at x = {st.x * 1000:.1f} mm, {where}",
        f"{w:.1f} mm wide x {h:.1f} mm high, {_shape_words(st)}; centre on the water line "
        f"z = {zc:.1f} mm",
        "seen from aft: X = y (right), Y = z (up) of the aircraft frame; drawn 1:1 in mm",
    )
    notes = [
        Note("centreline", "CL", (1.0, top + reach + 1.0)),
        Note("waterline", f"WL {zc:.1f}", (a + reach + 1.0, zc + 1.0)),
    ]
    y = bottom - reach - 3.0 - TEXT
    for line in lines:
        notes.append(Note("label", line, (-a - reach, y)))
        y -= 1.6 * TEXT
    return FormerTemplate(name, st, lines, loop, strokes, tuple(notes))


#: formers closer than this fraction of the body length to the one kept before are left out
#: (the parametric form adds stations a few centimetres either side of its joins to steady
#: the spline; a builder needs no former there)
FORMER_MIN_SPACING = 0.02
#: sections within this size (m) of the former kept before are the same former
FORMER_SAME_SIZE = 5e-4


def former_stations(stations) -> list[tuple[int, BodyStation, list[float]]]:
    """The stations that get a former: (1-based index, station, x of later stations with the
    same section). Points get none; a station with the same section as the former kept before
    is listed on it instead of drawn again; one closer than FORMER_MIN_SPACING of the body
    length to the former kept before is left out, unless it is the last one."""
    length = stations[-1].x - stations[0].x
    solid = [(i, st) for i, st in enumerate(stations, start=1) if not is_point(st)]
    kept: list[tuple[int, BodyStation, list[float]]] = []
    for k, (i, st) in enumerate(solid):
        if kept:
            _, prev, same = kept[-1]
            if _same_section(prev, st):
                same.append(st.x)
                continue
            last = k == len(solid) - 1
            if not last and st.x - max([prev.x, *same]) < FORMER_MIN_SPACING * length:
                continue
        kept.append((i, st, []))
    return kept


def _same_section(a: BodyStation, b: BodyStation) -> bool:
    return (
        a.shape == b.shape
        and a.exponent == b.exponent
        and all(
            abs(u - v) <= FORMER_SAME_SIZE
            for u, v in (
                (a.width, b.width),
                (a.height, b.height),
                (a.z, b.z),
                (a.corner_radius, b.corner_radius),
            )
        )
    )


def former_templates(layout: Layout) -> tuple[FormerTemplate, ...]:
    """Former templates along the fuselage, nose to tail (see ``former_stations``); none
    without a fuselage. Stations within 1 mm of each other get names told apart by a suffix."""
    spec = layout.sizing.design.fuselage
    if spec is None:
        return ()
    stations = expand(spec)
    shares = body_shares(stations)
    out: list[FormerTemplate] = []
    used: set[str] = set()
    for i, st, same in former_stations(stations):
        name = base = former_name(st)
        k = 1
        while name in used:
            k += 1
            name = f"{base}-{k}"
        used.add(name)
        where = f"station {i} of {len(stations)} from the nose"
        if same:
            where += "; same former at x " + ", ".join(f"{x * 1000:.0f}" for x in same) + " mm"
        out.append(former_template(st, where, shares, name))
    return tuple(out)
