"""The three views of the three-view sheet: what each shows and where it sits on the paper.

Geometry is in the aircraft frame (m; x aft, y right, z up): outlines through the corner
points, control surfaces between hinge line and trailing edge, mean geometric chords with their
quarter-chord points and the fuselage outline. A :class:`View` maps such a point onto the paper
(mm from the sheet's lower-left corner) at one common scale for all three views:

- plan view, seen from above with the nose up: x aft runs down the page, y (starboard) right;
- front view, seen from ahead looking aft: y (starboard) runs to the left, z up;
- side view, seen from port with the nose to the left: x aft runs right, z up.

:func:`place_views` picks the largest 1-2-5 scale at which the three fit the sheet's left part.
No drawing library is imported here.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from geomgen.geometry.frame import place
from geomgen.geometry.layout import CornerLabel, Layout, SurfaceLayout, corner_labels
from geomgen.outputs.sheet import COLUMN_W, GUTTER, MARGIN, PAPER_H, PAPER_W, Page, Point


@dataclass(frozen=True)
class _Projection:
    name: str
    title: str
    note: str
    h: tuple[int, float]  # aircraft axis (0 x, 1 y, 2 z) and sign along the page's rightward
    v: tuple[int, float]  # ... and along the page's upward direction


_PLAN = _Projection(
    "plan",
    "PLAN VIEW",
    "from above, nose up: x aft down the page, y starboard right",
    (1, 1),
    (0, -1),
)
_FRONT = _Projection(
    "front", "FRONT VIEW", "looking aft: y starboard to the left, z up", (1, -1), (2, 1)
)
_SIDE = _Projection("side", "SIDE VIEW", "from port, nose left: x aft right, z up", (0, 1), (2, 1))
AXIS_NAMES = "xyz"


@dataclass(frozen=True)
class View:
    """One projection placed on the paper: page = origin + k * (signed aircraft coordinates)."""

    proj: _Projection
    k: float  # paper mm per metre
    ou: float  # paper position of the datum (mm)
    ov: float

    def __call__(self, p: Point) -> Page:
        (ih, sh), (iv, sv) = self.proj.h, self.proj.v
        return (self.ou + self.k * sh * p[ih], self.ov + self.k * sv * p[iv])


@dataclass(frozen=True)
class _Control:
    name: str
    surface: str
    hinge: tuple[Point, ...]  # inner end to outer end
    trailing_edge: tuple[Point, ...]  # the same stations, on the trailing edge


@dataclass(frozen=True)
class Mgc:
    surface: str
    side: str
    le: Point
    te: Point
    quarter: Point
    length: float


@dataclass(frozen=True)
class Geometry:
    outlines: tuple[tuple[str, str, tuple[CornerLabel, ...]], ...]  # surface, side, corners
    controls: tuple[_Control, ...]
    mgcs: tuple[Mgc, ...]
    symmetric: dict[str, bool]
    body: dict[str, tuple[Point, ...]] = field(default_factory=dict)  # view name -> outline

    def points(self) -> list[Point]:
        pts = [c.point for _, _, cs in self.outlines for c in cs]
        for outline in self.body.values():
            pts += list(outline)
        for c in self.controls:
            pts += list(c.hinge) + list(c.trailing_edge)
        for m in self.mgcs:
            pts += [m.le, m.te]
        return pts


def geometry(layout: Layout) -> Geometry:
    labels = corner_labels(layout)
    outlines = []
    for sl in layout.surfaces:
        for side in sl.sides:
            cs = tuple(c for c in labels if c.surface == sl.key and c.side == side)
            outlines.append((sl.key, side, cs))
    controls = []
    mgcs = []
    for sl in layout.surfaces:
        ss = sl.sizing
        for c in sl.controls:
            te = tuple(
                tuple(float(v) for v in place(ss, c.side, h.s, [[1.0, 0.0]])[0]) for h in c.hinge
            )
            controls.append(_Control(c.name, sl.key, tuple(h.point for h in c.hinge), te))
        mgcs += _mgcs(sl)
    return Geometry(
        outlines=tuple(outlines),
        controls=tuple(controls),
        mgcs=tuple(mgcs),
        symmetric={sl.key: sl.sizing.planform.symmetric for sl in layout.surfaces},
        body=_body_outlines(layout),
    )


def _body_outlines(layout: Layout) -> dict[str, tuple[Point, ...]]:
    """The fuselage's outline in each view (aircraft frame, m): half widths in plan, half
    heights in side view, the largest section in front view; empty without a fuselage."""
    spec = layout.sizing.design.fuselage
    if spec is None:
        return {}
    from geomgen.shapes.fuselage import expand, section_area, section_points

    st = expand(spec)
    plan = [(s.x, s.width / 2, s.z) for s in st] + [(s.x, -s.width / 2, s.z) for s in st[::-1]]
    side = [(s.x, 0.0, s.z + s.height / 2) for s in st]
    side += [(s.x, 0.0, s.z - s.height / 2) for s in st[::-1]]
    largest = max(st, key=section_area)
    front = [tuple(float(v) for v in p) for p in section_points(largest, 72)]
    return {"plan": tuple(plan), "side": tuple(side), "front": tuple(front)}


def _mgcs(sl: SurfaceLayout) -> list[Mgc]:
    """The mean geometric chord of each side as planned (before incidence), with its c/4."""
    ss = sl.sizing
    pf = ss.planform
    x_le = ss.apex_x + pf.mgc_x_le
    out = []
    for side in sl.sides:
        if pf.symmetric:
            y = pf.mgc_s if side == "right" else -pf.mgc_s
            z = ss.apex_z + pf.mgc_rise
        else:
            y, z = 0.0, ss.apex_z + pf.mgc_s
        out.append(
            Mgc(
                sl.key,
                side,
                (x_le, y, z),
                (x_le + pf.mgc, y, z),
                (x_le + 0.25 * pf.mgc, y, z),
                pf.mgc,
            )
        )
    return out


# --- scale and placement ------------------------------------------------------------------------


def _extent(proj: _Projection, pts: list[Point]) -> tuple[float, float, float, float]:
    (ih, sh), (iv, sv) = proj.h, proj.v
    hs = [sh * p[ih] for p in pts]
    vs = [sv * p[iv] for p in pts]
    return min(hs), max(hs), min(vs), max(vs)


def _scales():
    """Drawing scales 1:n with n in the 1-2-5 series (1:1 ... 1:5 000 000)."""
    return [a * 10**e for e in range(7) for a in (1, 2, 5)]


@dataclass(frozen=True)
class _Placement:
    views: dict[str, View]
    boxes: dict[str, tuple[float, float, float, float]]  # drawn extent on paper: u0, u1, v0, v1
    n: int  # scale 1:n


def place_views(geo: Geometry, pads: dict[str, tuple[float, float, float, float]]) -> _Placement:
    """Largest 1-2-5 scale at which the three views fit the left part of the sheet, stacked
    plan (top), front, side (bottom); plan and front share the page position of y = 0."""
    pts = geo.points()
    ext = {p.name: _extent(p, pts) for p in (_PLAN, _FRONT, _SIDE)}
    left, right = MARGIN + 2.0, PAPER_W - MARGIN - COLUMN_W - GUTTER
    bottom, top = MARGIN + 2.0, PAPER_H - MARGIN - 2.0
    width, height = right - left, top - bottom
    size = {k: (max(e[1] - e[0], 1e-6), max(e[3] - e[2], 1e-6)) for k, e in ext.items()}
    k_fit = min(
        min((width - pads[k][0] - pads[k][1]) / size[k][0] for k in size),
        (height - sum(pads[k][2] + pads[k][3] for k in size)) / sum(s[1] for s in size.values()),
    )
    n = next((n for n in _scales() if 1000.0 / n <= k_fit), _scales()[-1])
    k = 1000.0 / n
    used = sum(pads[name][2] + pads[name][3] + k * size[name][1] for name in size)
    gap = (height - used) / 4
    views: dict[str, View] = {}
    boxes = {}
    v_top = top - gap
    # plan and front: y = 0 at the same page u, centred on the plan view's box
    h0, h1 = ext["plan"][0], ext["plan"][1]
    span_w = pads["plan"][0] + k * (h1 - h0) + pads["plan"][1]
    ou_sym = left + (width - span_w) / 2 + pads["plan"][0] - k * h0
    for proj in (_PLAN, _FRONT, _SIDE):
        hmin, hmax, vmin, vmax = ext[proj.name]
        pl, pr, pb, pa = pads[proj.name]
        if proj.name == "side":
            box_w = pl + k * (hmax - hmin) + pr
            ou = left + (width - box_w) / 2 + pl - k * hmin
        else:
            ou = ou_sym
        ov = v_top - pa - k * vmax
        views[proj.name] = View(proj, k, ou, ov)
        boxes[proj.name] = (ou + k * hmin, ou + k * hmax, ov + k * vmin, ov + k * vmax)
        v_top = ov + k * vmin - pb - gap
    return _Placement(views, boxes, n)
